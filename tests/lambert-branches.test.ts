/**
 * Lambert's problem: the two multi-revolution branches, the direction of motion, and the extremes of the time of
 * flight. Branch names are the kernel's own: short-period (0) is the solution with the smaller semi-major axis,
 * long-period (1) the larger. The reference labels a solution without the kernel's variable (the sign of the
 * change of time of flight along the family of conics through r1 and r2, harness/reference/lambert.ts).
 */
import { describe, it, expect } from "vitest";
import { release, run } from "./helpers.js";
import { LambertDecimal as D, branchOf, vecExact, vecDouble, withDigits, referenceLambert, propagateDec } from "../harness/verify/reference/lambert.js";
import { exact } from "../harness/verify/reference/decimal.js";

const MU = 398600.4418; // WGS 84, km^3/s^2 (NIMA TR8350.2)
const norm = (a: readonly number[]): number => Math.hypot(a[0]!, a[1]!, a[2]!);
const sub = (a: readonly number[], b: readonly number[]): number[] => [a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!];
const cross = (a: readonly number[], b: readonly number[]): number[] => [
  a[1]! * b[2]! - a[2]! * b[1]!,
  a[2]! * b[0]! - a[0]! * b[2]!,
  a[0]! * b[1]! - a[1]! * b[0]!,
];

/** Semi-major axis from vis-viva. */
const semiMajor = (mu: number, r: readonly number[], v: readonly number[]): number => 1 / (2 / norm(r) - (v[0]! ** 2 + v[1]! ** 2 + v[2]! ** 2) / mu);

/** Solve, then propagate (r1, v1) over tof with the universal-variable kernel: v1, v2, relative landing error. */
function solveAndClose(mu: number, r1: number[], r2: number[], tof: number, revs: number, retro: number, branch: number): { v1: number[]; v2: number[]; miss: number; vmiss: number } {
  const k = release();
  const [st, ...out] = run(k, "lambert", [mu, ...r1, ...r2, tof, revs, retro, branch], 7);
  expect(st).toBe(0);
  const v1 = out.slice(0, 3);
  const v2 = out.slice(3, 6);
  const [ps, ...s] = run(k, "propagate", [mu, ...r1, ...v1, tof], 6);
  expect(ps).toBe(0);
  return { v1, v2, miss: norm(sub(s.slice(0, 3), r2)) / norm(r2), vmiss: norm(sub(s.slice(3, 6), v2)) / norm(v2) };
}

// Invented geometries (km): a low orbit to a higher one, both ways round, inclined and equatorial.
const GEOMETRIES: [string, number[], number[]][] = [
  ["inclined", [7000, 1000, -300], [-2000, 9000, 2500]],
  ["equatorial", [6800, 0, 0], [-5000, -9000, 0]],
  ["wide", [12000, -3000, 4000], [3000, 20000, -6000]],
];

describe("lambert: the two branches of each revolution count", () => {
  for (const [name, r1, r2] of GEOMETRIES) {
    for (const revs of [1, 2, 4]) {
      for (const retro of [0, 1]) {
        it(`${name}, revs ${revs}, ${retro ? "retrograde" : "prograde"}: both branches land on r2; short-period has the smaller a; the reference labels each as the kernel does`, () => {
          // A time of flight well above the minimum: revs + 0.8 periods of the minimum-energy ellipse.
          const c = norm(sub(r2, r1));
          const am = (norm(r1) + norm(r2) + c) / 4;
          const tof = (revs + 0.8) * 2 * Math.PI * Math.sqrt(am ** 3 / MU);
          const s = solveAndClose(MU, r1, r2, tof, revs, retro, 0);
          const l = solveAndClose(MU, r1, r2, tof, revs, retro, 1);
          for (const x of [s, l]) {
            expect(x.miss).toBeLessThan(1e-10);
            expect(x.vmiss).toBeLessThan(1e-10);
            // Direction of motion: the angular momentum's z component has the sign asked for.
            expect(Math.sign(cross(r1, x.v1)[2]!)).toBe(retro ? -1 : 1);
          }
          expect(semiMajor(MU, r1, s.v1)).toBeLessThan(semiMajor(MU, r1, l.v1));
          withDigits(34, () => {
            const [mu, a, b] = [exact(D, MU), vecExact(r1), vecExact(r2)];
            expect(branchOf(mu, a, b, vecExact(s.v1), revs)).toBe(0);
            expect(branchOf(mu, a, b, vecExact(l.v1), revs)).toBe(1);
          });
          // And the reference's own solutions of the two branches.
          for (const [branch, x] of [[0, s], [1, l]] as const) {
            const ref = referenceLambert(MU, r1, r2, tof, revs, retro, branch)!;
            expect(norm(sub(x.v1, ref.v1)) / norm(ref.v1)).toBeLessThan(1e-11);
          }
        });
      }
    }
  }

  it("revs = 0: the branch argument is ignored (same bits)", () => {
    const k = release();
    const a = run(k, "lambert", [MU, 7000, 1000, -300, -2000, 9000, 2500, 3000, 0, 0, 0], 6);
    const b = run(k, "lambert", [MU, 7000, 1000, -300, -2000, 9000, 2500, 3000, 0, 0, 1], 6);
    expect(b).toEqual(a);
  });
});

describe("lambert: extremes of the time of flight", () => {
  const r1 = [7000, 1000, -300];
  const r2 = [-2000, 9000, 2500];
  // From 1 s (a fast, nearly rectilinear hyperbola: x >> 1) to 1e7 s with no complete revolution (x near -1), and
  // 50 revolutions. Closure here uses the reference's own decimal propagation (Kepler's equation at 34 digits), so
  // that only the rounding of v1 limits it; the allowance is 1e-10 or 4 times the worst miss of the correctly rounded
  // v1 scaled by 1 - 2^-52, 1 or 1 + 2^-52 (where the landing point is very sensitive to v1, that is 1e-9).
  for (const [tof, revs] of [[1, 0], [60, 0], [1e5, 0], [1e7, 0], [3e6, 50]] as const) {
    for (const retro of [0, 1]) {
      it(`tof ${tof} s, revs ${revs}, ${retro ? "retrograde" : "prograde"}: v1 within 1e-11 of the reference; closure as good as the rounded reference`, () => {
        for (const branch of revs > 0 ? [0, 1] : [0]) {
          const [st, ...out] = run(release(), "lambert", [MU, ...r1, ...r2, tof, revs, retro, branch], 7);
          expect(st).toBe(0);
          const v1 = out.slice(0, 3);
          const ref = referenceLambert(MU, r1, r2, tof, revs, retro, branch)!;
          expect(norm(sub(v1, ref.v1)) / norm(ref.v1)).toBeLessThan(1e-11);
          // Closure floor: where the landing point is very sensitive to v1, even the correctly rounded v1 misses.
          const miss = (v: readonly number[]): number =>
            norm(sub(withDigits(34, () => vecDouble(propagateDec(exact(D, MU), vecExact(r1), vecExact(v), exact(D, tof)).r)), r2)) / norm(r2);
          const ulp = 2 ** -52;
          const floor = Math.max(...[0, ulp, -ulp].map((d) => miss(ref.v1.map((x) => x * (1 + d)))));
          expect(miss(v1)).toBeLessThan(Math.max(1e-10, 4 * floor));
        }
      });
    }
  }
});
