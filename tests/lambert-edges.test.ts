/**
 * Lambert's problem at the edges of the transfer angle: next to 0 and 360 degrees the chord turns
 * radial and, before the fix, sigma = sqrt(1 - rho^2) cancelled (v lost about 1e-17 / theta relative, 6.7e-10 at
 * 1e-6 degree); below sin theta = 1.2e-10 the kernel gave up (degenerate). The setup: r1 = 7000 km on x,
 * r2 = 9000 km at the transfer angle in the xy plane, mu = 398600.4418 km^3/s^2 (WGS 84, NIMA TR8350.2),
 * tof = 3980 s (revs 0) and 16915 s (revs 1, both branches); here also in a rotated frame and in both senses.
 *
 * Each solution is checked against the independent decimal.js reference (harness/reference/lambert.ts: the
 * p-iteration polished by shooting on a Kepler propagator, 50 digits) with the suite's own limit from
 * vectors/limits.json: |v - v_ref| / |v_ref| <= max(max_rel, cond_factor * cond), cond from the reference.
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { referenceLambert } from "../harness/verify/reference/lambert.js";
import { limitsFor, type Limits } from "../harness/verify/limits.js";

const OK = 0;
const DEGENERATE = 19;
const NO_SOLUTION = 20;
const MU = 398600.4418; // WGS 84, km^3/s^2 (NIMA TR8350.2)
const DEG = Math.PI / 180;
/** The three problems at each angle: [revs, tof in s, branch]. */
const SETUPS: readonly (readonly [number, number, number])[] = [[0, 3980, 0], [1, 16915, 0], [1, 16915, 1]];

type V = readonly number[];
const norm = (a: V): number => Math.hypot(a[0]!, a[1]!, a[2]!);
const relErr = (got: V, want: V): number => norm([got[0]! - want[0]!, got[1]! - want[1]!, got[2]! - want[2]!]) / norm(want);

/** A fixed generic rotation (z-x-z Euler angles 0.7, 1.1, -2.3 rad), applied in double precision. */
function rotate(v: V): number[] {
  const [a, b, c] = [0.7, 1.1, -2.3];
  const rz = (t: number, w: V): number[] => [Math.cos(t) * w[0]! - Math.sin(t) * w[1]!, Math.sin(t) * w[0]! + Math.cos(t) * w[1]!, w[2]!];
  const rx = (t: number, w: V): number[] => [w[0]!, Math.cos(t) * w[1]! - Math.sin(t) * w[2]!, Math.sin(t) * w[1]! + Math.cos(t) * w[2]!];
  return rz(a, rx(b, rz(c, v)));
}

/**
 * Frames: the xy plane (r1 on the x axis), the rotated frame, and the rotated frame with the radii swapped
 * (r1 = 9000 km, r2 = 7000 km: the chord's radial part then points inwards, rho goes to +1 instead of -1).
 */
type Frame = "xy" | "rotated" | "rotated, inwards";

/** The positions at `deg` degrees in a frame; `round` maps each component. */
function positions(deg: number, frame: Frame, round: (x: number) => number = (x) => x): [number[], number[]] {
  const th = deg * DEG;
  const [a, b] = frame === "rotated, inwards" ? [9000, 7000] : [7000, 9000];
  const r1 = [a, 0, 0];
  const r2 = [b * Math.cos(th), b * Math.sin(th), 0];
  const f = (v: V): number[] => (frame === "xy" ? [...v] : rotate(v)).map(round);
  return [f(r1), f(r2)];
}

interface Outcome {
  solved: number;
  worstRatio: number;
}

/**
 * Every setup, both senses: the status agrees with the reference (a solution or none), and v1, v2 are within
 * the limit. Returns how many were solved and the worst error as a fraction of its limit.
 */
function checkAngle(k: ReturnType<typeof release>, lim: Limits, r1: number[], r2: number[]): Outcome {
  let solved = 0;
  let worstRatio = 0;
  for (const [revs, tof, branch] of SETUPS) {
    for (const retro of [0, 1]) {
      const [st, ...out] = run(k, "lambert", [MU, ...r1, ...r2, tof, revs, retro, branch], 6);
      const ref = referenceLambert(MU, r1, r2, tof, revs, retro, branch);
      if (ref === undefined) {
        expect(st).toBe(NO_SOLUTION);
        continue;
      }
      expect(st).toBe(OK);
      const e1 = relErr(out.slice(0, 3), ref.v1) / Math.max(lim.max_rel!, lim.cond_factor! * ref.cond1);
      const e2 = relErr(out.slice(3, 6), ref.v2) / Math.max(lim.max_rel!, lim.cond_factor! * ref.cond2);
      worstRatio = Math.max(worstRatio, e1, e2);
      solved++;
    }
  }
  return { solved, worstRatio };
}

describe("lambert at transfer angles next to 0, 180 and 360 degrees, release build", () => {
  const lim = limitsFor("lambert", "f64");
  const ANGLES = [0.1, 1e-4, 1e-6, 1e-9, 359.9, 359.9999, 359.999999, 359.999999999, 179.9, 179.9999999, 180.0000001, 180.1];
  for (const frame of ["xy", "rotated", "rotated, inwards"] as const) {
    for (const deg of ANGLES) {
      it(`${deg} deg, ${frame} frame: revs 0 and revs 1 (both branches), prograde and retrograde, within the suite's limit`, () => {
        const [r1, r2] = positions(deg, frame);
        const o = checkAngle(release(), lim, r1, r2);
        expect(o.solved).toBe(2 * SETUPS.length);
        expect(o.worstRatio).toBeLessThanOrEqual(1);
      });
    }
  }

  it("the plane is undefined only within the rounding: sin theta = 2.1e-15 (19 unit roundoffs) is solved, 8.7e-16 (below 8) is degenerate", () => {
    for (const frame of ["xy", "rotated"] as const) {
      const [r1, r2] = positions(1.2e-13, frame);
      const o = checkAngle(release(), lim, r1, r2);
      expect(o.solved).toBe(2 * SETUPS.length);
      expect(o.worstRatio).toBeLessThanOrEqual(1);
      const [q1, q2] = positions(5e-14, frame);
      for (const [revs, tof, branch] of SETUPS) expect(run(release(), "lambert", [MU, ...q1, ...q2, tof, revs, 0, branch])[0]).toBe(DEGENERATE);
    }
  });
});

describe("lambert at small transfer angles, single-precision build (inputs rounded to f32, reference on those inputs)", () => {
  const lim = limitsFor("lambert", "f32");
  for (const deg of [0.1, 1e-4, 359.9, 359.9999]) {
    it(`${deg} deg, rotated frame: solved within the f32 limit`, () => {
      const [r1, r2] = positions(deg, "rotated", Math.fround);
      const o = checkAngle(single(), lim, r1, r2);
      expect(o.solved).toBe(2 * SETUPS.length);
      expect(o.worstRatio).toBeLessThanOrEqual(1);
    });
  }
});

describe("lambert over the whole size range of the domain", () => {
  // Similarity of two-body motion (common practice): scaling lengths by a and times by a^1.5 at fixed mu scales
  // velocities by a^-0.5. With a = 4^k every step of the kernel scales exactly, so the bits must scale too.
  const cases: readonly (readonly [string, number[], number[], number, number, number])[] = [
    ["an ordinary transfer", [7000, 1000, -300], [-2000, 9000, 2500], 3000, 0, 0],
    ["two revolutions, long-period", [7000, 1000, -300], [-2000, 9000, 2500], 40000, 2, 1],
    ["about 0.01 degree from 180", [7000, 1000, -300], [-7000.5, -1000, 301], 3000, 0, 0],
    ["1e-6 degree from 0", ...positions(1e-6, "rotated"), 3980, 0, 0],
  ];
  for (const [name, r1, r2, tof, revs, branch] of cases) {
    it(`${name}: r1, r2 scaled by 4^k, tof by 8^k (|k| <= 240, lengths 1e-144 to 1e144): v scaled by 2^-k exactly`, () => {
      const [st0, ...base] = run(release(), "lambert", [MU, ...r1, ...r2, tof, revs, 0, branch], 6);
      expect(st0).toBe(OK);
      for (let k = -240; k <= 240; k += 16) {
        const a = 4 ** k;
        const [st, ...out] = run(release(), "lambert", [MU, ...r1.map((x) => x * a), ...r2.map((x) => x * a), tof * 8 ** k, revs, 0, branch], 6);
        expect(st).toBe(OK);
        expect(out.map((x) => x * 2 ** k)).toEqual(base);
      }
    });
  }
});
