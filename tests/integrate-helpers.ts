/** Helpers shared by tests/integrate-*.test.ts: plain-double element conversions used to make inputs and read results. */
import { abiExport, enumValue } from "../harness/module/routines.js";
import type { Kernels } from "../harness/module/load.js";

/** The integrators by name, from the ABI table's method enumeration. */
export const METHODS = {
  rk4: enumValue("method", "rk4"),
  verlet: enumValue("method", "verlet"),
  yoshida4: enumValue("method", "yoshida4"),
  butcher6: enumValue("method", "butcher6"),
} as const;
export type Method = keyof typeof METHODS;

/** Every slot of the integration calls by name (the ABI table's integration layout). */
export const S: Readonly<Record<string, number>> = Object.fromEntries(
  abiExport("integrate_step").outputs.map((o, i) => [o.name, i]),
);
/** Slot of a named integration output (throws for a name the layout does not have). */
export function slot(name: string): number {
  const i = S[name];
  if (i === undefined) throw new Error(`the integration layout has no slot ${name}`);
  return i;
}
/** Named integration outputs of the last call, in the order asked. */
export function read(k: Kernels, ...names: string[]): number[] {
  return names.map((n) => k.out[slot(n)]!);
}
export const POS = ["rx", "ry", "rz"];
export const VEL = ["vx", "vy", "vz"];
export const STATE = [...POS, ...VEL];
export const FIRSTS = ["energy_step", "h_step", "ecc_step", "areal_step"];

export type Vec = [number, number, number];

/** State from classical elements (perifocal frame rotated by RAAN, i, argp); plain doubles, only to make inputs. */
export function stateFromElements(mu: number, a: number, e: number, i: number, raan: number, argp: number, nu: number): [Vec, Vec] {
  const p = a * (1 - e * e);
  const r = p / (1 + e * Math.cos(nu));
  const P: Vec = [r * Math.cos(nu), r * Math.sin(nu), 0];
  const Q: Vec = [-Math.sqrt(mu / p) * Math.sin(nu), Math.sqrt(mu / p) * (e + Math.cos(nu)), 0];
  const rot = (v: Vec): Vec => {
    let [x, y, z] = v;
    [x, y] = [Math.cos(argp) * x - Math.sin(argp) * y, Math.sin(argp) * x + Math.cos(argp) * y];
    [y, z] = [Math.cos(i) * y - Math.sin(i) * z, Math.sin(i) * y + Math.cos(i) * z];
    [x, y] = [Math.cos(raan) * x - Math.sin(raan) * y, Math.sin(raan) * x + Math.cos(raan) * y];
    return [x, y, z];
  };
  return [rot(P), rot(Q)];
}

/** Osculating RAAN, argument of periapsis, inclination, eccentricity and semi-major axis of a state (radians, km). */
export function elementsOf(mu: number, r: Vec, v: Vec): { raan: number; argp: number; inc: number; e: number; a: number } {
  const [x, y, z] = r;
  const [vx, vy, vz] = v;
  const hx = y * vz - z * vy;
  const hy = z * vx - x * vz;
  const hz = x * vy - y * vx;
  const hm = Math.hypot(hx, hy, hz);
  const rm = Math.hypot(x, y, z);
  const v2 = vx * vx + vy * vy + vz * vz;
  const rv = x * vx + y * vy + z * vz;
  const ex = ((v2 - mu / rm) * x - rv * vx) / mu;
  const ey = ((v2 - mu / rm) * y - rv * vy) / mu;
  const ez = ((v2 - mu / rm) * z - rv * vz) / mu;
  const nx = -hy; // node vector k x h
  const ny = hx;
  const nm = Math.hypot(nx, ny);
  const raan = Math.atan2(ny, nx);
  // argp: angle from the node to e, measured in the orbit plane (sign from h . (n x e)).
  const cosw = (nx * ex + ny * ey) / nm;
  const sinw = ((hx * (ny * ez) + hy * (-nx * ez) + hz * (nx * ey - ny * ex)) / hm) / nm;
  return { raan, argp: Math.atan2(sinw, cosw), inc: Math.acos(hz / hm), e: Math.hypot(ex, ey, ez), a: 1 / (2 / rm - v2 / mu) };
}

/** Unwrap a sequence of angles (radians) so that consecutive values differ by less than pi. */
export function unwrap(xs: readonly number[]): number[] {
  const out: number[] = [];
  let shift = 0;
  for (let i = 0; i < xs.length; i++) {
    if (i > 0) {
      const d = xs[i]! + shift - out[i - 1]!;
      if (d > Math.PI) shift -= 2 * Math.PI;
      else if (d < -Math.PI) shift += 2 * Math.PI;
    }
    out.push(xs[i]! + shift);
  }
  return out;
}

/** Least-squares slope of y against t. */
export function slope(t: readonly number[], y: readonly number[]): number {
  const n = t.length;
  const mt = t.reduce((s, x) => s + x, 0) / n;
  const my = y.reduce((s, x) => s + x, 0) / n;
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    num += (t[i]! - mt) * (y[i]! - my);
    den += (t[i]! - mt) ** 2;
  }
  return num / den;
}
