/**
 * The shim under the host-JS build (jsbuild.ts): the AssemblyScript builtins the kernels use, written in plain
 * JavaScript with the semantics of the WebAssembly instructions behind them, and `RMath` as the host's Math.
 * This is the only file that knows what those builtins mean outside WebAssembly.
 */

/** Type names a type-assertion conversion may name (`<i32>x`, `x as real`). */
export const CONVERSIONS: ReadonlySet<string> = new Set(["i8", "u8", "i16", "u16", "i32", "u32", "i64", "u64", "isize", "usize", "f32", "f64", "real", "bool"]);
/** Builtins whose meaning depends on their type argument; jsbuild.ts passes the type name first. */
export const TYPED_BUILTINS: ReadonlySet<string> = new Set(["load", "store", "sizeof", "alignof", "reinterpret", "isInteger", "isFloat"]);

type Num = number | bigint | boolean;

/** Saturating truncation to [lo, hi], NaN -> 0: WebAssembly's `trunc_sat` (AssemblyScript's float-to-int cast). */
function truncSat(x: number, lo: number, hi: number): number {
  if (Number.isNaN(x)) return 0;
  if (x <= lo) return lo;
  if (x >= hi) return hi;
  return Math.trunc(x) + 0; // + 0 turns -0 into 0, as an integer has no sign of zero
}

function toNumber(x: Num): number {
  return typeof x === "bigint" ? Number(x) : +x;
}

function intConv(bits: 8 | 16 | 32, signed: boolean): (x: Num) => number {
  const lo = signed ? -(2 ** (bits - 1)) : 0;
  const hi = signed ? 2 ** (bits - 1) - 1 : 2 ** bits - 1;
  return (x) => {
    if (typeof x === "bigint") return Number(signed ? BigInt.asIntN(bits, x) : BigInt.asUintN(bits, x));
    const t = truncSat(+x, signed ? -(2 ** 31) : 0, signed ? 2 ** 31 - 1 : 2 ** 32 - 1);
    if (bits === 32) return t;
    // narrower types wrap the 32-bit value, as the store or the sign/zero extension would
    const m = t & (2 ** bits - 1);
    return signed && m > hi ? m - 2 ** bits : m < lo ? lo : m;
  };
}

/** 64-bit conversions always give a BigInt (so `<u64>a << <u64>32` shifts like i64.shl instead of mixing types). */
function int64Conv(signed: boolean): (x: Num) => bigint {
  return (x) => {
    const b = typeof x === "bigint" ? x : BigInt(truncSat(+x, signed ? -(2 ** 63) : 0, signed ? 2 ** 63 : 2 ** 64));
    return signed ? BigInt.asIntN(64, b) : BigInt.asUintN(64, b);
  };
}

const i32 = intConv(32, true);
const u32 = intConv(32, false);
const f64 = (x: Num): number => toNumber(x);
const f32 = (x: Num): number => Math.fround(toNumber(x));

/** Conversion functions by type name; `real` is f64 in this build. */
export const conv: Readonly<Record<string, (x: Num) => Num>> = {
  i8: intConv(8, true),
  u8: intConv(8, false),
  i16: intConv(16, true),
  u16: intConv(16, false),
  i32,
  u32,
  isize: i32,
  usize: u32,
  i64: int64Conv(true),
  u64: int64Conv(false),
  f32,
  f64,
  real: f64,
  bool: (x) => (typeof x === "bigint" ? x !== 0n : +x !== 0),
};

const SIZES: Readonly<Record<string, number>> = {
  i8: 1, u8: 1, bool: 1, i16: 2, u16: 2, i32: 4, u32: 4, isize: 4, usize: 4, f32: 4, i64: 8, u64: 8, f64: 8, real: 8,
};

function sizeOfType(t: string): number {
  const s = SIZES[t];
  if (s === undefined) throw new Error(`the js build does not know the size of type '${t}'`);
  return s;
}

/** WebAssembly's f64.nearest: round to the nearest integer, ties to even, keeping the sign of zero. */
function nearest(x: number): number {
  if (!Number.isFinite(x) || Math.abs(x) >= 4503599627370496) return x;
  const f = Math.floor(x);
  const d = x - f;
  const r = d < 0.5 ? f : d > 0.5 ? f + 1 : f % 2 === 0 ? f : f + 1;
  return r === 0 ? (x < 0 || Object.is(x, -0) ? -0 : 0) : r;
}

function copysign(x: number, y: number): number {
  const neg = y < 0 || Object.is(y, -0);
  return neg ? -Math.abs(x) : Math.abs(x);
}

/** x * 2^n without intermediate overflow or double rounding for the exponents the kernels use. */
function scalbn(x: number, n: number): number {
  let y = x;
  let k = n;
  while (k > 1023) {
    y *= 2 ** 1023;
    k -= 1023;
  }
  while (k < -1022) {
    y *= 2 ** -969; // 2^-1022 * 2^53: keep the significand exact until the last step
    k += 969;
  }
  return y * 2 ** k;
}

/** Everything a transpiled kernel file may reach. */
export interface Shim {
  readonly globals: Readonly<Record<string, unknown>>;
  readonly conv: typeof conv;
  readonly typed: Readonly<Record<string, (type: string, ...a: never[]) => unknown>>;
}

/** A shim over one linear memory (each js-build instance has its own). */
export function makeShim(memory: WebAssembly.Memory): Shim {
  const view = new DataView(memory.buffer);
  let top = 1024; // static data starts here, as in the compiled module (address 0 stays unused)
  // memory.data(size, align) reserves bytes; memory.data<T>([values]) (the type argument is erased by the
  // transpiler) places the values: as f64, the one element type the kernels' tables use here (real is f64).
  const data = (size: number | readonly number[], align = 16): number => {
    const values = typeof size === "number" ? undefined : size;
    const bytes = values ? values.length * 8 : (size as number);
    top = Math.ceil(top / align) * align;
    const at = top;
    top += bytes;
    if (top > memory.buffer.byteLength) throw new Error("memory.data: static data exceeds the js build's one page");
    values?.forEach((v, i) => view.setFloat64(at + 8 * i, v, true));
    return at;
  };
  const load = (t: string, addr: number, off = 0): Num => {
    const p = addr + off;
    switch (t) {
      case "f64": case "real": return view.getFloat64(p, true);
      case "f32": return view.getFloat32(p, true);
      case "i32": case "isize": return view.getInt32(p, true);
      case "u32": case "usize": return view.getUint32(p, true);
      case "i64": return view.getBigInt64(p, true);
      case "u64": return view.getBigUint64(p, true);
      case "i16": return view.getInt16(p, true);
      case "u16": return view.getUint16(p, true);
      case "i8": return view.getInt8(p);
      case "u8": case "bool": return view.getUint8(p);
      default: throw new Error(`load<${t}> is not supported by the js build`);
    }
  };
  const store = (t: string, addr: number, v: Num, off = 0): void => {
    const p = addr + off;
    switch (t) {
      case "f64": case "real": view.setFloat64(p, toNumber(v), true); return;
      case "f32": view.setFloat32(p, toNumber(v), true); return;
      case "i32": case "isize": case "u32": case "usize": view.setInt32(p, i32(v) | 0, true); return;
      case "i64": case "u64": view.setBigInt64(p, typeof v === "bigint" ? BigInt.asIntN(64, v) : BigInt(Math.trunc(+v)), true); return;
      case "i16": case "u16": view.setInt16(p, Number(v) | 0, true); return;
      case "i8": case "u8": case "bool": view.setInt8(p, Number(v) | 0); return;
      default: throw new Error(`store<${t}> is not supported by the js build`);
    }
  };
  const scratch = new DataView(new ArrayBuffer(8));
  const reinterpret = (t: string, x: Num): Num => {
    switch (t) {
      case "u64": case "i64":
        scratch.setFloat64(0, toNumber(x));
        return t === "u64" ? scratch.getBigUint64(0) : scratch.getBigInt64(0);
      case "f64": case "real":
        scratch.setBigUint64(0, BigInt.asUintN(64, BigInt(x as bigint)));
        return scratch.getFloat64(0);
      case "u32": case "i32":
        scratch.setFloat32(0, toNumber(x));
        return t === "u32" ? scratch.getUint32(0) : scratch.getInt32(0);
      case "f32":
        scratch.setUint32(0, Number(x) >>> 0);
        return scratch.getFloat32(0);
      default: throw new Error(`reinterpret<${t}> is not supported by the js build`);
    }
  };
  // RMath: the host Math, plus the members AssemblyScript's NativeMath has and Math lacks.
  const rmath: Record<string, unknown> = {};
  for (const k of Object.getOwnPropertyNames(Math)) rmath[k] = (Math as unknown as Record<string, unknown>)[k];
  Object.assign(rmath, {
    sincos_sin: 0,
    sincos_cos: 0,
    sincos(x: number): void {
      rmath.sincos_sin = Math.sin(x);
      rmath.sincos_cos = Math.cos(x);
    },
    scalbn,
    signbit: (x: number): boolean => x < 0 || Object.is(x, -0),
    mod: (x: number, y: number): number => x % y,
    rem(x: number, y: number): number {
      if (!Number.isFinite(x) || Number.isNaN(y) || y === 0) return NaN;
      if (!Number.isFinite(y)) return x;
      return x - nearest(x / y) * y; // IEEE remainder; exact for the moderate quotients the kernels use
    },
    exp2: (x: number): number => 2 ** x,
  });
  const globals: Record<string, unknown> = {
    abs: Math.abs,
    min: Math.min,
    max: Math.max,
    sqrt: Math.sqrt,
    floor: Math.floor,
    ceil: Math.ceil,
    trunc: Math.trunc,
    nearest,
    copysign,
    isNaN: (x: number): boolean => Number.isNaN(x),
    isFinite: (x: number): boolean => Number.isFinite(x),
    unchecked: <T>(x: T): T => x,
    select: <T>(a: T, b: T, c: unknown): T => (c ? a : b),
    assert: <T>(x: T, msg?: string): T => {
      if (!x) throw new Error(`assertion failed${msg ? `: ${msg}` : ""}`);
      return x;
    },
    unreachable: (): never => {
      throw new Error("unreachable executed");
    },
    memory: { data },
    RMath: rmath,
    NativeMath: rmath,
    ...conv,
    // Without a type argument these cannot know the type: fail with a plain message.
    load: () => { throw new Error("load without a type argument is not supported by the js build"); },
    store: () => { throw new Error("store without a type argument is not supported by the js build"); },
  };
  // Number constants AssemblyScript hangs on the type names (f64.EPSILON, i32.MAX_VALUE, ...).
  Object.assign(f64, { EPSILON: Number.EPSILON, MAX_VALUE: Number.MAX_VALUE, MIN_VALUE: 5e-324, MIN_POSITIVE_VALUE: 2.2250738585072014e-308, MAX_SAFE_INTEGER: Number.MAX_SAFE_INTEGER, MIN_SAFE_INTEGER: Number.MIN_SAFE_INTEGER, NaN: NaN, POSITIVE_INFINITY: Infinity, NEGATIVE_INFINITY: -Infinity });
  Object.assign(i32, { MAX_VALUE: 2 ** 31 - 1, MIN_VALUE: -(2 ** 31) });
  Object.assign(u32, { MAX_VALUE: 2 ** 32 - 1, MIN_VALUE: 0 });
  const typed = {
    load,
    store,
    sizeof: (t: string): number => sizeOfType(t),
    alignof: (t: string): number => Math.log2(sizeOfType(t)),
    reinterpret,
    isInteger: (t: string): boolean => /^[iu](8|16|32|64|size)$/.test(t) || t === "bool",
    isFloat: (t: string): boolean => t === "f32" || t === "f64" || t === "real",
  } as unknown as Shim["typed"];
  return { globals, conv, typed };
}
