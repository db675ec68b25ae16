/**
 * Exact handling of IEEE 754 binary64 values: bit patterns, the exact hex-float form, ULP distance and
 * round-trip decimal strings. Every other harness module goes through these helpers; nothing else touches bits.
 */

const view = new DataView(new ArrayBuffer(8));

/** The 64-bit pattern of a double, as 16 lowercase hex digits. */
export function toBitsHex(x: number): string {
  view.setFloat64(0, x);
  return view.getBigUint64(0).toString(16).padStart(16, "0");
}

/** The double whose bit pattern is the given 16 hex digits. Throws on a malformed pattern. */
export function fromBitsHex(hex: string): number {
  if (!/^[0-9a-fA-F]{16}$/.test(hex)) throw new Error(`not a 64-bit hex pattern: '${hex}'`);
  view.setBigUint64(0, BigInt("0x" + hex));
  return view.getFloat64(0);
}

/** The 64-bit pattern as a BigInt. */
export function toBits(x: number): bigint {
  view.setFloat64(0, x);
  return view.getBigUint64(0);
}

/** The double with a given 64-bit pattern. */
export function fromBits(b: bigint): number {
  view.setBigUint64(0, BigInt.asUintN(64, b));
  return view.getFloat64(0);
}

/**
 * The exact value of a finite double as a binary-exponent hex string (`-0x1.8p-3`), for C source (a hex float
 * literal). Not for decimal.js: it parses binary exponents through Math.pow and a shortest decimal, which is off
 * by up to half an ulp below 2^-23 or so; build decimals with verify/reference/decimal.ts exact().
 */
export function exactHex(x: number): string {
  if (!Number.isFinite(x)) throw new Error(`exactHex needs a finite value, got ${x}`);
  const bits = toBits(x);
  const sign = bits >> 63n ? "-" : "";
  const exp = Number((bits >> 52n) & 0x7ffn);
  const man = (bits & ((1n << 52n) - 1n)).toString(16).padStart(13, "0");
  if (exp === 0) return `${sign}0x0.${man}p-1022`;
  return `${sign}0x1.${man}p${exp - 1023}`;
}


/** Map a double to an integer that is monotone in its value (-0 and +0 map to the same point). */
function ordinal(x: number): bigint {
  const b = toBits(x);
  return b >> 63n ? -(b & 0x7fffffffffffffffn) : b;
}

/**
 * Distance in units in the last place between two doubles: the number of representable doubles between them
 * (0 for equal values, 1 for neighbours). NaN against NaN is 0; NaN against a number is Infinity.
 */
export function ulpDistance(a: number, b: number): number {
  if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) && Number.isNaN(b) ? 0 : Infinity;
  const d = ordinal(a) - ordinal(b);
  return Number(d < 0n ? -d : d);
}

/** Same distance for binary32 values (both arguments are rounded to f32 first). */
export function ulpDistance32(a: number, b: number): number {
  if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) && Number.isNaN(b) ? 0 : Infinity;
  const f = new Float32Array(2);
  const u = new Int32Array(f.buffer);
  f[0] = a;
  f[1] = b;
  const ord = (i: number): number => {
    const v = u[i]!;
    return v < 0 ? -(v & 0x7fffffff) : v;
  };
  return Math.abs(ord(0) - ord(1));
}

/** True when two doubles have the same bit pattern, with every NaN equal to every NaN. +0 and -0 differ. */
export function sameBits(a: number, b: number): boolean {
  if (Number.isNaN(a) && Number.isNaN(b)) return true;
  return Object.is(a, b);
}

const ULP_F64 = new Float64Array(1);
const ULP_U32 = new Uint32Array(ULP_F64.buffer);
const ULP_HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0; // index of the high word
/** ULP by biased exponent: 2^(ex - 1075) for normal numbers, the smallest subnormal for ex = 0. */
const ULP_BY_EXPONENT = new Float64Array(2048);
for (let ex = 0; ex < 2047; ex++) ULP_BY_EXPONENT[ex] = Math.pow(2, Math.max(ex, 1) - 1075);
ULP_BY_EXPONENT[2047] = NaN;

/**
 * The ULP of x: the spacing of doubles in x's binade, 2^(exponent - 52) (2^971 at the largest double, 2^-1074
 * for subnormals and zero), NaN for NaN and infinities. The one ULP function of the harness: a table lookup on
 * the exponent bits, cheap enough for the sweep's inner loop.
 */
export function ulpOf(x: number): number {
  ULP_F64[0] = x;
  return ULP_BY_EXPONENT[(ULP_U32[ULP_HI]! >>> 20) & 0x7ff]!;
}

/** The shortest decimal string that parses back to the same double (JavaScript's own algorithm). */
export function shortest(x: number): string {
  if (Object.is(x, -0)) return "-0";
  return String(x);
}

/** A decimal number cell: optional sign, digits with an optional point (or a point and digits), optional exponent. */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Parse a number cell: a decimal (shortest round-trip or longer), `nan`, `inf`, `-inf`, or a 16-digit hex bit
 * pattern prefixed by `0x`. Returns undefined for anything else, so the caller can name the cell.
 */
export function parseNumber(cell: string): number | undefined {
  // The common case first, without trimming or case folding: a decimal with no space around it.
  if (DECIMAL.test(cell)) return Number(cell);
  const s = cell.trim();
  if (s === "") return undefined;
  if (/^0x[0-9a-fA-F]{16}$/.test(s)) return fromBitsHex(s.slice(2));
  const low = s.toLowerCase();
  if (low === "nan") return NaN;
  if (low === "inf" || low === "+inf" || low === "infinity" || low === "+infinity") return Infinity;
  if (low === "-inf" || low === "-infinity") return -Infinity;
  if (!DECIMAL.test(s)) return undefined;
  return Number(s);
}

/**
 * What single precision does to an input that changes its meaning, or undefined when it keeps it: a finite double
 * beyond the f32 range becomes infinite, a non-zero one below half the smallest f32 subnormal becomes 0, and an
 * eccentricity (an input named `e`) other than 1 rounds to exactly 1 (a parabola: 1 - 2^-25 < e < 1 + 2^-24).
 * Rounding within the range is not a loss of meaning; the f32 build's suites hold exact f32 inputs for that.
 */
export function singlePrecisionLoss(name: string, x: number): string | undefined {
  if (!Number.isFinite(x)) return undefined;
  const f = Math.fround(x);
  if (!Number.isFinite(f)) return `${name} beyond the f32 range, became infinite`;
  if (x !== 0 && f === 0) return `${name} below the f32 range, became 0`;
  if (name === "e" && x !== 1 && f === 1) return "e rounded to 1";
  return undefined;
}
