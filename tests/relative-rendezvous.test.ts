/**
 * rendezvous_linear (assembly/rendezvous.ts): against the two-impulse solution written here from the
 * Clohessy & Wiltshire (1960) matrices for a circular chief; on elliptic chiefs, the impulses flown through the
 * decimal.js first-order reference (harness/verify/reference/relative.ts) reach the target at rest; ERR_NO_SOLUTION at
 * the singular transfer times, and only near them.
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { stateOf } from "../harness/verify/specs/twobody.js";
import { GM_EARTH as MU } from "../harness/core/constants.js";
import { referenceRelativeMotion } from "../harness/verify/reference/relative.js";

const norm = (x: readonly number[]): number => Math.hypot(...x);
const sub = (a: readonly number[], b: readonly number[]): number[] => a.map((q, i) => q - b[i]!);

/** Clohessy & Wiltshire (1960) transition blocks (x radial, y in-track, z cross-track; recalled from memory). */
function cwBlocks(n: number, t: number): { rr: number[][]; rv: number[][]; vr: number[][]; vv: number[][] } {
  const S = Math.sin(n * t), C = Math.cos(n * t), nt = n * t;
  return {
    rr: [[4 - 3 * C, 0, 0], [6 * (S - nt), 1, 0], [0, 0, C]],
    rv: [[S / n, (2 / n) * (1 - C), 0], [(-2 / n) * (1 - C), (4 * S - 3 * nt) / n, 0], [0, 0, S / n]],
    vr: [[3 * n * S, 0, 0], [-6 * n * (1 - C), 0, 0], [0, 0, -n * S]],
    vv: [[C, 2 * S, 0], [-2 * S, 4 * C - 3, 0], [0, 0, C]],
  };
}
const mv = (m: number[][], v: readonly number[]): number[] => m.map((row) => row[0]! * v[0]! + row[1]! * v[1]! + row[2]! * v[2]!);
/** Solve the 3x3 system m x = b by Cramer's rule. */
function solve3(m: number[][], b: readonly number[]): number[] {
  const det = (a: number[][]): number =>
    a[0]![0]! * (a[1]![1]! * a[2]![2]! - a[1]![2]! * a[2]![1]!) - a[0]![1]! * (a[1]![0]! * a[2]![2]! - a[1]![2]! * a[2]![0]!) + a[0]![2]! * (a[1]![0]! * a[2]![1]! - a[1]![1]! * a[2]![0]!);
  const d = det(m);
  return [0, 1, 2].map((j) => det(m.map((row, i) => row.map((q, k) => (k === j ? b[i]! : q)))) / d);
}

const circ = (r: number): { s: number[]; n: number; T: number } => {
  const n = Math.sqrt(MU / r ** 3);
  return { s: stateOf({ mu: MU, p: r, e: 0, i: 0.7, raan: 0.3, argp: 1.9, nu: 0.2, cls: "leo", planar: false }), n, T: (2 * Math.PI) / n };
};

describe("circular chief: the Clohessy-Wiltshire (1960) two-impulse solution", () => {
  it("LEO and GEO, 0.1 to 3.3 orbits away from the singular times: dv1, dv2 within 1e-9 relative", () => {
    for (const r of [6778, 42164]) {
      const c = circ(r);
      const x0 = [0.1, -1.0, 0.2, 1e-4, -2e-4, 5e-5];
      const rf = [0.0, 0.05, -0.01];
      for (const f of [0.1, 0.3, 0.7, 1.2, 2.2, 3.3]) {
        const t = f * c.T;
        const B = cwBlocks(c.n, t);
        const v0p = solve3(B.rv, sub(rf, mv(B.rr, x0.slice(0, 3))));
        const dv1 = sub(v0p, x0.slice(3));
        const dv2 = mv(B.vr, x0.slice(0, 3)).map((q, i) => -(q + mv(B.vv, v0p)[i]!));
        const [st, ...got] = run(release(), "rendezvous_linear", [MU, ...c.s, ...x0, ...rf, t], 7);
        expect(st).toBe(0);
        expect(norm(sub(got.slice(0, 3), dv1)) / norm(dv1)).toBeLessThan(1e-9);
        expect(norm(sub(got.slice(3, 6), dv2)) / norm(dv2)).toBeLessThan(1e-9);
      }
    }
  });
});

describe("elliptic chiefs: the impulses flown through the decimal.js first-order reference", () => {
  for (const e of [0.05, 0.3, 0.7, 0.95]) {
    it(`e = ${e}: arrival at rf within 1e-9 of the geometry, relative velocity nulled within 1e-9 of the impulses`, () => {
      const rp = 7000, p = rp * (1 + e), a = p / (1 - e * e), T = 2 * Math.PI * Math.sqrt(a ** 3 / MU);
      const chief = stateOf({ mu: MU, p, e, i: 1.1, raan: 2.0, argp: 0.4, nu: 2.6, cls: "leo", planar: false });
      const x0 = [2.0, -8.0, 0.5, 1e-3, 2e-3, -1e-3];
      const rf = [0.0, -0.1, 0.0];
      for (const f of [0.15, 0.35, 0.8, 1.3]) {
        const [st, ...dv] = run(release(), "rendezvous_linear", [MU, ...chief, ...x0, ...rf, f * T], 7);
        expect(st).toBe(0);
        const v0p = x0.slice(3).map((q, i) => q + dv[i]!);
        const arr = referenceRelativeMotion([MU, ...chief, ...x0.slice(0, 3), ...v0p, f * T]);
        expect(norm(sub(arr.slice(0, 3), rf)) / norm(x0.slice(0, 3))).toBeLessThan(1e-9);
        expect(norm(arr.slice(3).map((q, i) => q + dv[3 + i]!)) / Math.max(norm(dv.slice(0, 3)), norm(dv.slice(3, 6)))).toBeLessThan(1e-9);
      }
    });
  }
});

describe("singular transfer times", () => {
  const c = circ(6778);
  const x0 = [0.1, -1.0, 0.2, 0, 0, 0];
  const call = (k = release(), t: number): [number, ...number[]] => run(k, "rendezvous_linear", [MU, ...c.s, ...x0, 0, 0, 0, t], 7);
  /** The in-plane roots of det B other than whole orbits: 8 (1 - cos p) = 3 p sin p (CW matrix), by bisection. */
  const root = (lo: number, hi: number): number => {
    const f = (q: number): number => 8 * (1 - Math.cos(q)) - 3 * q * Math.sin(q);
    for (let i = 0; i < 200; i++) {
      const m = (lo + hi) / 2;
      if (f(lo) * f(m) <= 0) hi = m;
      else lo = m;
    }
    return lo;
  };
  it("dt = 0, half orbits (out of plane), whole orbits and the other zeros of det B (in plane): no-solution (20)", () => {
    const times = [0, 0.5 * c.T, c.T, 1.5 * c.T, 2 * c.T, root(8.5, 9.2) / c.n, root(15, 15.6) / c.n];
    for (const k of [release(), single()]) for (const t of times) expect(call(k, t)[0]).toBe(20);
  });
  it("a transfer in the chief's plane (z0 = zf = 0) is solved at half an orbit, as Clohessy-Wiltshire's in-plane block gives it", () => {
    const s0 = [0.1, -1.0, 0, 1e-4, -2e-4, 3e-4];
    const rf = [0, 0.05, 0];
    const t = 0.5 * c.T;
    const [st, ...got] = run(release(), "rendezvous_linear", [MU, ...c.s, ...s0, ...rf, t], 7);
    expect(st).toBe(0);
    const B = cwBlocks(c.n, t);
    const free = mv(B.rr, s0.slice(0, 3));
    const det = B.rv[0]![0]! * B.rv[1]![1]! - B.rv[0]![1]! * B.rv[1]![0]!;
    const ex = rf[0]! - free[0]!, ey = rf[1]! - free[1]!;
    const v0p = [(B.rv[1]![1]! * ex - B.rv[0]![1]! * ey) / det, (B.rv[0]![0]! * ey - B.rv[1]![0]! * ex) / det, 0];
    const dv1 = sub(v0p, s0.slice(3));
    const dv2 = mv(B.vr, s0.slice(0, 3)).map((q, i) => -(q + mv(B.vv, v0p)[i]!));
    expect(norm(sub(got.slice(0, 3), dv1)) / norm(dv1)).toBeLessThan(1e-9);
    expect(norm(sub(got.slice(3, 6), dv2)) / norm(dv2)).toBeLessThan(1e-9);
    // Out of the plane at the start, the same time has no solution.
    expect(run(release(), "rendezvous_linear", [MU, ...c.s, 0.1, -1.0, 0.01, 1e-4, -2e-4, 3e-4, ...rf, t], 7)[0]).toBe(20);
  });
  it("the conditioning output falls linearly into a singular time; ok down to 2^-26, ok far from it", () => {
    for (const d of [1e-3, 1e-5]) {
      const [st, , , , , , , cond] = call(release(), c.T * (1 + d));
      expect(st).toBe(0);
      expect(cond).toBeGreaterThan(0.3 * d);
      expect(cond).toBeLessThan(3 * d);
    }
    expect(call(release(), c.T * (1 + 1e-9))[0]).toBe(20);
    for (const f of [0.1, 0.3, 0.7, 0.9, 1.2, 1.7, 2.2]) expect(call(release(), f * c.T)[0]).toBe(0);
  });
  it("statuses: non-finite -> 16, hyperbolic chief -> 17", () => {
    const ok = [MU, ...c.s, ...x0, 0, 0, 0, 0.3 * c.T];
    for (let i = 0; i < ok.length; i++) expect(release().call("rendezvous_linear", ok.map((q, j) => (j === i ? NaN : q)))).toBe(16);
    expect(release().call("rendezvous_linear", ok.map((q, j) => (j >= 4 && j <= 6 ? q * 1.5 : q)))).toBe(17);
  });
});

describe("the linearisation error against Lambert (scripts/relative-linearisation.mjs)", () => {
  it("vanishes in proportion to the separation: 1e-6 of dv at 10 m, ten times more per decade (LEO, 0.25 orbit)", async () => {
    // @ts-expect-error: a plain .mjs script, no type declarations
    const { compare } = (await import("../scripts/relative-linearisation.mjs")) as {
      compare: (mu: number, chief: number[], rel: number[], target: number[], dt: number) => { err1: number; err2: number; missKm: number };
    };
    const c = circ(6778);
    const errs = [0.01, 0.1, 1].map((s) => compare(MU, c.s, [-0.2 * s, -0.97 * s, 0.14 * s, 0, 0, 0], [0, 0, 0], 0.25 * c.T));
    expect(Math.max(errs[0]!.err1, errs[0]!.err2)).toBeLessThan(3e-6);
    for (let i = 1; i < errs.length; i++) {
      expect(errs[i]!.err1 / errs[i - 1]!.err1).toBeGreaterThan(7);
      expect(errs[i]!.err1 / errs[i - 1]!.err1).toBeLessThan(13);
      expect(errs[i]!.missKm / errs[i - 1]!.missKm).toBeGreaterThan(70); // the miss is second order
    }
  });
});
