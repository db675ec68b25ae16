/** Shared test helpers: the built modules, loaded once per test file. */
import { loadBuild, type Kernels } from "../harness/load.js";

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

/** Call a kernel and return [status, slot0, slot1, ...] (a copy of the first n slots). */
export function run(k: Kernels, name: string, args: readonly number[], n = 4): [number, ...number[]] {
  const st = k.call(name, args);
  return [st, ...Array.from(k.out.slice(0, n))];
}

export const DEG = Math.PI / 180;
