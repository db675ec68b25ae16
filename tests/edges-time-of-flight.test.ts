/**
 * time_of_flight at two edges of its domain, against the independent decimal.js reference
 * (harness/verify/reference/anomaly.ts: the closed-form mean anomalies at 70 digits from the exact input doubles).
 *
 * - Huge e: |e^2 - 1|^(3/2) overflows (e above about 1e102, 7e12 in single precision) while the time, about
 *   (M2 - M1) / e^3, is an ordinary number; before the fix the kernel divided by infinity and returned 0 with an
 *   ok status.
 * - Next to a hyperbola's asymptote the time is ill-conditioned (one ulp of nu moves it by up to 50% two ulps
 *   below the asymptote), which the time-of-flight suite, having no conditioning column, cannot allow for: here the
 *   conditioning is measured from the reference (each input moved by one ulp) and the error held to 10 x that,
 *   the factor the two-body suites use.
 */
import { describe, it, expect } from "vitest";
import { release, single, outs } from "./helpers.js";
import { referenceTimeOfFlight } from "../harness/verify/reference/anomaly.js";
import { limitsFor } from "../harness/verify/limits.js";
import { fromBits, toBits } from "../harness/core/float.js";
import type { Kernels } from "../harness/module/load.js";

const OK = 0;
const MU = 398600.4418; // WGS 84, km^3/s^2 (NIMA TR8350.2)
const up = (x: number): number => fromBits(toBits(x) + (x >= 0 ? 1n : -1n));
const down = (x: number): number => fromBits(toBits(x) - (x > 0 ? 1n : -1n));

function tof(k: Kernels, x: readonly number[]): { status: number; t: number; area: number } {
  const status = k.call("time_of_flight", [...x]);
  const [t, area] = outs(k, "time_of_flight", "tof", "area");
  return { status, t: t!, area: area! };
}

const rel = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

describe("time_of_flight with a huge eccentricity", () => {
  const CASES: readonly (readonly number[])[] = [
    [MU, 7000, 1e120, -1.0247267279830032, -1.4555181761896174],
    [MU, 1e50, 1e150, 0.3, 1.2], // (e^2 - 1)^(3/2) = 1e450 overflows; the integral is about 1e-300
    [1, 1e60, 1e156, -1, 1.5], // e^2 overflows
    [MU, 7000, 1e15, 0.40458086133003235, -0.0045407116413116455],
  ];
  for (const x of CASES) {
    it(`e = ${x[2]}: the release build's time and area within the suite's limit of the reference`, () => {
      const [tRef, aRef] = referenceTimeOfFlight(x[0]!, x[1]!, x[2]!, x[3]!, x[4]!);
      expect(tRef).not.toBe(0);
      const got = tof(release(), x);
      expect(got.status).toBe(OK);
      const lim = limitsFor("time-of-flight", "f64").max_rel!;
      expect(rel(got.t, tRef!)).toBeLessThanOrEqual(lim);
      expect(rel(got.area, aRef!)).toBeLessThanOrEqual(lim);
    });
  }
  it("e = 1e15 rounded to f32 (beyond the single-precision build's 7e12): within the f32 limit", () => {
    const x = [MU, 7000, 1e15, 0.40458086133003235, -0.0045407116413116455].map(Math.fround);
    const [tRef] = referenceTimeOfFlight(x[0]!, x[1]!, x[2]!, x[3]!, x[4]!);
    const got = tof(single(), x);
    expect(got.status).toBe(OK);
    expect(rel(got.t, tRef!)).toBeLessThanOrEqual(limitsFor("time-of-flight-f32in", "f32").max_rel!);
  });
});

describe("time_of_flight next to a hyperbola's asymptote (e = 1.5), against the conditioning from the reference", () => {
  const lim = Math.acos(-1 / 1.5);
  const CASES: readonly [string, number, number][] = [
    ["2 ulps below the asymptote, both sides", -down(down(lim)), down(down(lim))],
    ["1e-9 below the asymptote", 0, (1 - 1e-9) * lim],
    ["1e-6 below the asymptote", -0.5, (1 - 1e-6) * lim],
  ];
  for (const [name, nu1, nu2] of CASES) {
    it(`${name}: |t - t_ref| / |t_ref| <= 10 x the conditioning (and the suite's 1e-12 where that is larger)`, () => {
      const x = [MU, 7000, 1.5, nu1, nu2];
      const tRef = referenceTimeOfFlight(x[0]!, x[1]!, x[2]!, x[3]!, x[4]!)[0]!;
      let cond = 0;
      for (const i of [0, 1, 3, 4]) {
        const y = [...x];
        y[i] = up(y[i]!);
        const t = referenceTimeOfFlight(y[0]!, y[1]!, y[2]!, y[3]!, y[4]!)[0]!;
        if (Number.isFinite(t)) cond = Math.max(cond, rel(t, tRef));
      }
      const got = tof(release(), x);
      expect(got.status).toBe(OK);
      expect(rel(got.t, tRef)).toBeLessThanOrEqual(Math.max(limitsFor("time-of-flight", "f64").max_rel!, 10 * cond));
    });
  }
});
