/** 3-vectors of decimals for the references (each operation at the precision of its operands' class). */
import type { Dec } from "./decimal.js";

export type V3 = [Dec, Dec, Dec];

export const add = (a: V3, b: V3): V3 => [a[0].plus(b[0]), a[1].plus(b[1]), a[2].plus(b[2])];
export const sub = (a: V3, b: V3): V3 => [a[0].minus(b[0]), a[1].minus(b[1]), a[2].minus(b[2])];
export const scale = (a: V3, k: Dec): V3 => [a[0].times(k), a[1].times(k), a[2].times(k)];
export const dot = (a: V3, b: V3): Dec => a[0].times(b[0]).plus(a[1].times(b[1])).plus(a[2].times(b[2]));
export const cross = (a: V3, b: V3): V3 => [
  a[1].times(b[2]).minus(a[2].times(b[1])),
  a[2].times(b[0]).minus(a[0].times(b[2])),
  a[0].times(b[1]).minus(a[1].times(b[0])),
];
export const norm = (a: V3): Dec => dot(a, a).sqrt();
