/**
 * Lambert's problem: bad input, the undefined transfer plane and the minimum time of flight of a revolution count.
 * The minimum comes from the independent reference (golden-section search on the time of flight along the
 * family of conics through r1 and r2, parameterized by the semi-latus rectum, at 34 digits), not from the kernel.
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { LambertDecimal as D, minimumTime, motionNormal, vecExact, withDigits } from "../harness/verify/reference/lambert.js";
import { exact } from "../harness/verify/reference/decimal.js";

const OK = 0;
const NONFINITE = 16;
const DOMAIN = 17;
const DEGENERATE = 19;
const NO_SOLUTION = 20;
const MU = 398600.4418; // WGS 84, km^3/s^2 (NIMA TR8350.2)

const R1 = [7000, 1000, -300];
const R2 = [-2000, 9000, 2500];
const base = (over: Partial<Record<number, number>> = {}): number[] => {
  const a = [MU, ...R1, ...R2, 20000, 0, 0, 0];
  for (const [i, x] of Object.entries(over)) a[Number(i)] = x!;
  return a;
};

/** The reference minimum time of flight for revs complete revolutions (direction from `retrograde`). */
function tmin(r1: number[], r2: number[], revs: number, retrograde: number): number {
  return withDigits(34, () => {
    const a = vecExact(r1);
    const b = vecExact(r2);
    return minimumTime(exact(D, MU), a, b, motionNormal(a, b, retrograde), revs, new D(10).pow(-14))[0].toNumber();
  });
}

const norm = (a: readonly number[]): number => Math.hypot(a[0]!, a[1]!, a[2]!);

for (const [label, k] of [["f64", release], ["f32", single]] as const) {
  describe(`lambert status codes (${label})`, () => {
    it("a NaN or infinite real input gives nonfinite-input", () => {
      for (let i = 0; i < 8; i++) for (const bad of [NaN, Infinity, -Infinity]) expect(run(k(), "lambert", base({ [i]: bad }))[0]).toBe(NONFINITE);
    });

    it("mu <= 0, tof <= 0, a zero position, revs < 0, retrograde or branch other than 0 or 1 give out-of-domain", () => {
      for (const bad of [
        { 0: 0 }, { 0: -1 }, { 7: 0 }, { 7: -5 }, { 1: 0, 2: 0, 3: 0 }, { 4: 0, 5: 0, 6: 0 },
        { 8: -1 }, { 9: 2 }, { 9: -1 }, { 10: 2 }, { 10: -1 },
      ]) {
        expect(run(k(), "lambert", base(bad))[0]).toBe(DOMAIN);
      }
    });

    it("the 180-degree and 0-degree transfers (plane undefined) give degenerate; a slightly tilted one solves", () => {
      expect(run(k(), "lambert", base({ 4: -2 * R1[0]!, 5: -2 * R1[1]!, 6: -2 * R1[2]! }))[0]).toBe(DEGENERATE);
      expect(run(k(), "lambert", base({ 4: 1.5 * R1[0]!, 5: 1.5 * R1[1]!, 6: 1.5 * R1[2]!, 8: 1 }))[0]).toBe(DEGENERATE);
      // Equatorial 180-degree transfer, exactly representable in both builds.
      expect(run(k(), "lambert", [1, 1, 0, 0, -2, 0, 0, 3, 0, 0, 0])[0]).toBe(DEGENERATE);
      // Tilted by 1e-2 rad out of the straight line: a plane exists.
      expect(run(k(), "lambert", [1, 1, 0, 0, -2, 0.02, 0, 3, 0, 0, 0])[0]).toBe(OK);
    });
  });
}

describe("lambert: the minimum time of flight of each revolution count (reference minimum, 34 digits)", () => {
  for (const revs of [1, 2, 3, 5]) {
    for (const retrograde of [0, 1]) {
      it(`revs ${revs}, ${retrograde ? "retrograde (long way)" : "prograde (short way)"}: 1e-9 below the minimum -> no-solution; 1e-9 above -> two solutions that land on r2`, () => {
        const t = tmin(R1, R2, revs, retrograde);
        const k = release();
        for (const branch of [0, 1]) {
          expect(run(k, "lambert", base({ 7: t * (1 - 1e-9), 8: revs, 9: retrograde, 10: branch }))[0]).toBe(NO_SOLUTION);
        }
        const sols: number[][] = [];
        for (const branch of [0, 1]) {
          const [st, ...out] = run(k, "lambert", base({ 7: t * (1 + 1e-9), 8: revs, 9: retrograde, 10: branch }), 7);
          expect(st).toBe(OK);
          sols.push(out);
          // Closure with the universal-variable propagator (both branches sit close to the minimum, where the
          // velocity is sensitive to the time of flight; the landing point is still tight).
          const [ps, ...r] = run(k, "propagate", [MU, ...R1, out[0]!, out[1]!, out[2]!, t * (1 + 1e-9)], 6);
          expect(ps).toBe(OK);
          expect(norm([r[0]! - R2[0]!, r[1]! - R2[1]!, r[2]! - R2[2]!]) / norm(R2)).toBeLessThan(1e-10);
        }
        // Near the minimum the two branches are close together but distinct.
        const gap = norm([sols[0]![0]! - sols[1]![0]!, sols[0]![1]! - sols[1]![1]!, sols[0]![2]! - sols[1]![2]!]) / norm(sols[0]!);
        expect(gap).toBeGreaterThan(0);
        expect(gap).toBeLessThan(1e-2);
      });
    }
  }
});
