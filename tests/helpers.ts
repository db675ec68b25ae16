/** Shared test helpers: the built modules, loaded once per test file; the CLI as a child process; mutants. */
import { spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { loadBuild, type Kernels } from "../harness/module/load.js";
import { abiExport, slotsOf } from "../harness/module/routines.js";

/** The `areal` entry point a user runs. */
export const BIN = fileURLToPath(new URL("../bin/areal.mjs", import.meta.url));

/** Run `areal ARGS` as a child process (in `cwd`, default this process's): exit code, stdout, stderr. */
export function arealIn(cwd: string | undefined, ...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: "utf8", cwd, env: { ...process.env, NO_COLOR: "1" } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

/** Run `areal ARGS` as a child process: exit code, stdout, stderr. */
export function areal(...args: string[]): { code: number; out: string; err: string } {
  return arealIn(undefined, ...args);
}

/** A build that behaves like `k` except that `tamper` may edit the output slots (and the status) after each call. */
export function mutant(k: Kernels, tamper: (name: string, args: readonly number[], out: Float64Array | Float32Array, status: number) => number): Kernels {
  return {
    ...k,
    label: "mutant",
    has: (n) => k.has(n),
    arity: (n) => k.arity(n),
    call(name, args) {
      const st = k.call(name, args);
      return tamper(name, args, k.out, st);
    },
  };
}

let f64: Kernels | undefined;
let f32: Kernels | undefined;

/** The release (f64) module. Build first: `npm run build` (npm install does it). */
export function release(): Kernels {
  f64 ??= loadBuild("f64");
  return f64;
}

/** The single-precision module. */
export function single(): Kernels {
  f32 ??= loadBuild("f32");
  return f32;
}

/**
 * Call a kernel and return [status, ...its outputs in the ABI table's slot order] (a copy; only the `first`
 * ones when given, for a state to pass on to another kernel). Tests read the
 * region through this, `outs` or `slotsOf` (harness/module/routines.ts): never by a bare slot number.
 */
export function run(k: Kernels, name: string, args: readonly number[], first?: number): [number, ...number[]] {
  const st = k.call(name, args);
  return [st, ...Array.from(k.out.slice(0, first ?? abiExport(name).outputs.length))];
}

/** Every output of the last call of `name`, in the ABI table's slot order (a copy). */
export function outputsNow(k: Kernels, name: string): number[] {
  return Array.from(k.out.slice(0, abiExport(name).outputs.length));
}

/** The named outputs of the last call of `name`, in the order asked. */
export function outs(k: Kernels, name: string, ...names: string[]): number[] {
  const s = slotsOf(name, ...names);
  return names.map((n) => k.out[s[n]!]!);
}

/** Position, velocity and the like: the names of a three-vector output. */
export const R = ["rx", "ry", "rz"] as const;
export const V = ["vx", "vy", "vz"] as const;

export const DEG = Math.PI / 180;
