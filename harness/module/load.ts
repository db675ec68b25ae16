/**
 * Loading a kernel module and calling its exports. A module is any WebAssembly binary that follows
 * docs/abi.md: `areal_out` gives the output region, `areal_real_bytes` its element size, and each kernel
 * returns a status and writes its outputs there. Nothing in the harness reads module memory elsewhere.
 */
import { readFileSync, existsSync } from "node:fs";
import { BUILD_FILES } from "../core/paths.js";
import type { KernelSource } from "../core/pool.js";

/** A loaded module, ready to call. */
export interface Kernels {
  /** Where it came from, for messages and tables: `f64`, `f32`, a file name, ... */
  readonly label: string;
  /** 8 for a double-precision build, 4 for single precision. */
  readonly realBytes: 4 | 8;
  /** The module's exported function names. */
  readonly exportNames: readonly string[];
  /** True when the module exports a function of this name. */
  has(name: string): boolean;
  /** Number of parameters of an exported function (its declared arity). */
  arity(name: string): number;
  /**
   * Call an export with numeric arguments; returns the status. Outputs are then in `out` (slot i at out[i]),
   * valid until the next call.
   */
  call(name: string, args: readonly number[]): number;
  /**
   * The output region, as reals of the module's precision. Read it after a call: a module that grows its
   * memory during a call gets a new buffer, and the view is taken again after every call that did.
   */
  readonly out: Float64Array | Float32Array;
  /** The module's linear memory (for the no-allocation checks). */
  readonly memory: WebAssembly.Memory;
  /** The raw exports. */
  readonly exports: WebAssembly.Exports;
  /** Release what the module holds (a worker thread for a bounded module); nothing for the others. */
  close?(): void;
}

export class ModuleError extends Error {}

/** Compile module bytes; throws ModuleError naming `label` when they are not a WebAssembly module. */
function compile(bytes: Uint8Array<ArrayBuffer>, label: string): WebAssembly.Module {
  try {
    return new WebAssembly.Module(bytes);
  } catch (err) {
    throw new ModuleError(`${label}: not a WebAssembly module (${(err as Error).message})`);
  }
}

/** Instantiate a module from bytes. Throws ModuleError with a plain message on anything that is not a kernel module. */
export function instantiate(bytes: Uint8Array<ArrayBuffer>, label: string): Kernels {
  return instantiateModule(compile(bytes, label), label);
}

/**
 * Instantiate a compiled module (instantiate's checks and messages). A worker thread gets the module its
 * parent compiled (compiledBuild): structured clone shares the compiled code, so the worker compiles nothing.
 */
export function instantiateModule(mod: WebAssembly.Module, label: string): Kernels {
  const imports: Record<string, Record<string, WebAssembly.ImportValue>> = {};
  for (const imp of WebAssembly.Module.imports(mod)) {
    if (imp.module === "env" && imp.name === "abort" && imp.kind === "function") {
      (imports.env ??= {}).abort = (_msg: number, _file: number, line: number, col: number): never => {
        throw new ModuleError(`${label}: assertion failed in the module at ${line}:${col}`);
      };
    } else {
      throw new ModuleError(`${label}: the module imports ${imp.module}.${imp.name}; kernel modules must be self-contained (only env.abort is provided, for debug builds)`);
    }
  }
  let inst: WebAssembly.Instance;
  try {
    inst = new WebAssembly.Instance(mod, imports);
  } catch (err) {
    throw new ModuleError(`${label}: instantiation failed (${(err as Error).message})`);
  }
  const ex = inst.exports;
  const memory = ex.memory;
  if (!(memory instanceof WebAssembly.Memory)) throw new ModuleError(`${label}: the module exports no memory named 'memory'`);
  const outFn = ex.areal_out;
  const bytesFn = ex.areal_real_bytes;
  if (typeof outFn !== "function" || typeof bytesFn !== "function") {
    throw new ModuleError(`${label}: the module lacks areal_out() or areal_real_bytes() (see docs/abi.md)`);
  }
  const realBytes = Number((bytesFn as () => number)());
  if (realBytes !== 4 && realBytes !== 8) throw new ModuleError(`${label}: areal_real_bytes() returned ${realBytes}, expected 4 or 8`);
  const base = Number((outFn as () => number)());
  if (!Number.isInteger(base) || base < 0 || base % realBytes !== 0 || base + 64 * realBytes > memory.buffer.byteLength) {
    throw new ModuleError(`${label}: areal_out() returned ${base}, not an aligned address with 64 slots inside memory`);
  }
  const view = (): Float64Array | Float32Array => (realBytes === 8 ? new Float64Array(memory.buffer, base, 64) : new Float32Array(memory.buffer, base, 64));
  let out = view();
  const fns = new Map<string, (...a: number[]) => number>();
  for (const [k, v] of Object.entries(ex)) if (typeof v === "function") fns.set(k, v as (...a: number[]) => number);
  const exportNames = [...fns.keys()];
  const k: Kernels = {
    label,
    realBytes,
    exportNames,
    get out() {
      return out;
    },
    memory,
    exports: ex,
    has: (name) => fns.has(name),
    arity: (name) => fns.get(name)?.length ?? -1,
    call(name, args) {
      const fn = fns.get(name);
      if (!fn) throw new ModuleError(`${label}: no export named ${name}`);
      try {
        const st = fn(...args);
        // memory.grow detaches the old buffer: the outputs are in the new one (docs/abi.md allows growing).
        if (out.buffer !== memory.buffer) out = view();
        return st;
      } catch (err) {
        throw trapped(err, name, args);
      }
    },
  };
  ROW_CALLERS.set(k, (name, args, na, rows, o, nOut, status) => {
    const fn = fns.get(name);
    if (!fn) throw new ModuleError(`${label}: no export named ${name}`);
    const call = rowCaller(fn, args, na);
    let r = 0;
    try {
      for (; r < rows; r++) {
        status[r] = call(r * na);
        if (out.buffer !== memory.buffer) out = view();
        for (let i = 0, b = r * nOut; i < nOut; i++) o[b + i] = out[i]!;
      }
    } catch (err) {
      throw trapped(err, name, Array.from(args.subarray(r * na, r * na + na)));
    }
  });
  return k;
  function trapped(err: unknown, name: string, args: readonly number[]): unknown {
    if (err instanceof WebAssembly.RuntimeError) {
      return new ModuleError(`${label}: the kernel module trapped in ${name}(${args.join(", ")}) (${err.message}); the module is faulty, nothing was written`);
    }
    return err;
  }
}

/** A call of fn with the `na` arguments at args[at, at + na), without an array per call for up to 6 arguments. */
function rowCaller(fn: (...a: number[]) => number, args: Float64Array, na: number): (at: number) => number {
  const a = args;
  switch (na) {
    case 0: return () => fn();
    case 1: return (at) => fn(a[at]!);
    case 2: return (at) => fn(a[at]!, a[at + 1]!);
    case 3: return (at) => fn(a[at]!, a[at + 1]!, a[at + 2]!);
    case 4: return (at) => fn(a[at]!, a[at + 1]!, a[at + 2]!, a[at + 3]!);
    case 5: return (at) => fn(a[at]!, a[at + 1]!, a[at + 2]!, a[at + 3]!, a[at + 4]!);
    case 6: return (at) => fn(a[at]!, a[at + 1]!, a[at + 2]!, a[at + 3]!, a[at + 4]!, a[at + 5]!);
    default: return (at) => fn(...a.subarray(at, at + na));
  }
}

/**
 * Calls of one export over many rows at once: row r's arguments are args[r * na, r * na + na), its status goes
 * to status[r] and its first nOut output slots to out[r * nOut, r * nOut + nOut). The same checks and messages
 * as Kernels.call; a throw stops the batch (the rows before it are done).
 */
export type RowCaller = (name: string, args: Float64Array, na: number, rows: number, out: Float64Array, nOut: number, status: Int32Array) => void;

/**
 * The batch callers of the Kernels objects that have one, by object: a wrapper built from a Kernels (a spread
 * with its own `call`, as tests build mutants) is another object and goes through its own `call`, row by row.
 */
const ROW_CALLERS = new WeakMap<Kernels, RowCaller>();

/** Give a Kernels object a batch caller (load.ts, bounded.ts, library.ts). */
export function setRowCaller(k: Kernels, caller: RowCaller): void {
  ROW_CALLERS.set(k, caller);
}

/** One export over many rows (RowCaller): the object's own batch caller when it has one, else one `call` per row. */
export function callRows(k: Kernels, name: string, args: Float64Array, na: number, rows: number, out: Float64Array, nOut: number, status: Int32Array): void {
  const own = ROW_CALLERS.get(k);
  if (own) return own(name, args, na, rows, out, nOut, status);
  rowByRow(k)(name, args, na, rows, out, nOut, status);
}

/**
 * Rows from..from + rows - 1 of `args` (na a row), each as an array of its arguments (one array, refilled),
 * handed to `fn` with its row index: the one loop of the harness that takes a batch one call at a time.
 */
export function forEachRow(args: Float64Array, na: number, from: number, rows: number, fn: (a: number[], r: number) => void): void {
  const a = new Array<number>(na).fill(0);
  for (let r = from; r < from + rows; r++) {
    for (let i = 0; i < na; i++) a[i] = args[r * na + i]!;
    fn(a, r);
  }
}

/** A RowCaller through `k.call`, one row at a time (for objects without a batch caller, and as a fallback). */
export function rowByRow(k: Kernels): RowCaller {
  return (name, args, na, rows, out, nOut, status) =>
    forEachRow(args, na, 0, rows, (a, r) => {
      status[r] = k.call(name, a);
      const o = k.out;
      for (let i = 0; i < nOut; i++) out[r * nOut + i] = o[i]!;
    });
}

/** Load a module file. */
export function loadFile(path: string, label = path): Kernels {
  if (!existsSync(path)) throw new ModuleError(`${label}: no such file: ${path}`);
  return instantiate(readFileSync(path), label);
}

/** The built-in WebAssembly builds. */
export type WasmBuild = keyof typeof BUILD_FILES;

/** This thread's compiled built-in builds (compiledBuild). */
const COMPILED = new Map<WasmBuild, WebAssembly.Module>();

/**
 * A built-in build compiled, once a thread; says how to build it when the file is missing. Worker threads are
 * sent this module (core/pool.ts KernelSource.compiled) instead of compiling their own.
 */
function compiledBuild(build: WasmBuild): WebAssembly.Module {
  let mod = COMPILED.get(build);
  if (mod === undefined) {
    const path = BUILD_FILES[build];
    if (!existsSync(path)) throw new ModuleError(`the ${build} build is missing (${path}); run 'npm run build'`);
    mod = compile(readFileSync(path), build);
    COMPILED.set(build, mod);
  }
  return mod;
}

/** Load one of the built-in builds (a new instance of its compiled module); says how to build it when the file is missing. */
export function loadBuild(build: WasmBuild): Kernels {
  return instantiateModule(compiledBuild(build), build);
}

/** True for the name of a built-in WebAssembly build. */
export function isWasmBuild(name: string): name is WasmBuild {
  return Object.hasOwn(BUILD_FILES, name);
}

/** `src` with the compiled module of its build (compiledBuild) when it names a WebAssembly build, for a worker's set-up. */
export function withCompiled(src: KernelSource): KernelSource {
  if (src.module !== undefined || src.compiled !== undefined) return src;
  const b = src.build ?? "f64";
  return isWasmBuild(b) ? { ...src, compiled: compiledBuild(b) } : src;
}
