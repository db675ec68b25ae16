/**
 * Bad input and edge cases of the Kepler kernels: every failure is a status, never a NaN with ok, never a trap.
 * The status table is assembly/status.ts (mirrored in harness/status.ts).
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { STATUS_WORDS } from "../harness/module/status.js";
import { readFileSync } from "node:fs";
import { referenceHyperbolic } from "../harness/verify/reference/kepler.js";
import { ulpDistance } from "../harness/core/float.js";

const NONFINITE = 16;
const DOMAIN = 17;

describe("status codes", () => {
  it("the harness table and the kernel table agree", () => {
    const src = readFileSync(new URL("../assembly/status.ts", import.meta.url), "utf8");
    const codes = [...src.matchAll(/export const (\w+): i32 = (\d+);/g)].filter((m) => m[1] !== "FIRST_ERROR").map((m) => Number(m[2]));
    expect(codes.sort((a, b) => a - b)).toEqual(Object.keys(STATUS_WORDS).map(Number).sort((a, b) => a - b));
  });

  for (const [label, k] of [["f64", release], ["f32", single]] as const) {
    it(`${label}: non-finite inputs give nonfinite-input`, () => {
      for (const bad of [NaN, Infinity, -Infinity]) {
        expect(run(k(), "kepler_elliptic", [bad, 1])[0]).toBe(NONFINITE);
        expect(run(k(), "kepler_elliptic", [0.5, bad])[0]).toBe(NONFINITE);
        expect(run(k(), "kepler_hyperbolic", [bad, 1])[0]).toBe(NONFINITE);
        expect(run(k(), "kepler_hyperbolic", [2, bad])[0]).toBe(NONFINITE);
        expect(run(k(), "kepler_parabolic", [bad])[0]).toBe(NONFINITE);
        expect(run(k(), "true_to_anomaly", [bad, 1])[0]).toBe(NONFINITE);
        expect(run(k(), "time_of_flight", [1, 1, 0.5, bad, 1])[0]).toBe(NONFINITE);
      }
    });

    it(`${label}: eccentricity outside the conic's domain gives out-of-domain`, () => {
      for (const e of [-1e-30, -0.5, 1, 1.5, 1e30]) expect(run(k(), "kepler_elliptic", [e, 1])[0]).toBe(DOMAIN);
      for (const e of [1, 0.999, 0, -2]) expect(run(k(), "kepler_hyperbolic", [e, 1])[0]).toBe(DOMAIN);
      expect(run(k(), "true_to_anomaly", [-0.1, 1])[0]).toBe(DOMAIN);
      expect(run(k(), "time_of_flight", [0, 1, 0.5, 0, 1])[0]).toBe(DOMAIN);
      expect(run(k(), "time_of_flight", [1, -1, 0.5, 0, 1])[0]).toBe(DOMAIN);
    });
  }

  it("true anomaly beyond the asymptote gives unreachable (hyperbola, parabola)", () => {
    const k = release();
    const e = 2;
    const lim = Math.acos(-1 / e);
    expect(run(k, "true_to_anomaly", [e, lim * 1.0001])[0]).toBe(22);
    expect(run(k, "true_to_anomaly", [e, -3])[0]).toBe(22);
    expect(run(k, "true_to_anomaly", [1, Math.PI])[0]).toBe(22);
    expect(run(k, "true_to_mean", [e, 2.5])[0]).toBe(22);
    expect(run(k, "true_to_anomaly", [e, lim * 0.9999])[0]).toBe(0);
  });

  it("a result that would overflow is a status, not an infinity with ok", () => {
    const k = release();
    // nu = 1.5 on a hyperbola with huge e: H = 2 atanh(tan(0.75)) = 3.3, sinh H = 13, so M_h = e sinh H - H is
    // 1.3e301 (finite) for e = 1e300 and 1.3e309 (beyond the double range) for e = 1e308.
    expect(run(k, "true_to_mean", [1e308, 1.5])[0]).toBe(21);
    expect(run(k, "time_of_flight", [1, 1, 1e308, 0, 1.5])[0]).toBe(21);
    const [st, M] = run(k, "true_to_mean", [1e300, 1.5]);
    expect(st).toBe(0);
    expect(Number.isFinite(M)).toBe(true);
  });

  it("edge values: e = 0, M = 0, -0, huge |M|", () => {
    const k = release();
    expect(run(k, "kepler_elliptic", [0, 1.25], 2)).toEqual([0, 1.25, 0]);
    const [s0, E0] = run(k, "kepler_elliptic", [0.9, -0]);
    expect(s0).toBe(0);
    expect(Object.is(E0, -0)).toBe(true);
    // |M| >= 2^53: every double there is an even integer and |E - M| <= e < 1, so E = M is the correctly rounded root.
    expect(run(k, "kepler_elliptic", [0.99, 2 ** 60])[1]).toBe(2 ** 60);
    const [sh, H] = run(k, "kepler_hyperbolic", [1.5, 1.7976931348623157e308]);
    expect(sh).toBe(0);
    expect(Number.isFinite(H)).toBe(true);
    expect(H).toBeGreaterThan(700);
    const [sp, D] = run(k, "kepler_parabolic", [-1.7976931348623157e308]);
    expect(sp).toBe(0);
    expect(D).toBeLessThan(-1e102);
  });

  it("hyperbolic: no overflow for |M| up to 1e12 and e up to 1e6 (issue target), and the residual is small", () => {
    const k = release();
    for (const e of [1 + 2 ** -52, 1.001, 2, 1e3, 1e6]) {
      for (const M of [1e-9, 1, 1e6, 1e9, 1e12, -1e12]) {
        const [st, H] = run(k, "kepler_hyperbolic", [e, M]);
        expect(st).toBe(0);
        expect(Number.isFinite(H)).toBe(true);
        expect(Math.sign(H!)).toBe(Math.sign(M));
        const resid = e * Math.sinh(H!) - H! - M;
        expect(Math.abs(resid)).toBeLessThanOrEqual(1e-12 * Math.abs(M) + 1e-15 * e * Math.cosh(H!));
      }
    }
  });

  it("hyperbolic at the top of the range: huge e and M stay within 4 ulp of the 60-digit reference (fuzz finds)", () => {
    const k = release();
    // Found by the fuzzer: the logarithmic form once lost an ulp of ln e (~600), and e cosh H once overflowed.
    for (const [e, M] of [[4.309913395599058e253, 1.0455100801069408e262], [1.401444307291909e308, -1.7976931348623143e308], [1e300, -1.2e300], [1.5, 1.7976931348623157e308]]) {
      const [st, H] = run(k, "kepler_hyperbolic", [e!, M!]);
      expect(st).toBe(0);
      expect(ulpDistance(H!, referenceHyperbolic(e!, M!))).toBeLessThanOrEqual(4);
    }
  });

  it("time of flight: overflow of h/2 and anomalies beyond 2^53 rad on the ellipse are failures, not wrong times", () => {
    const k = release();
    expect(run(k, "time_of_flight", [1.7976931348623157e308, 6.283185307179586, 0, 0, 0])[0]).toBe(21);
    expect(run(k, "time_of_flight", [1, 1, 0.5, 0, 1e17])[0]).toBe(DOMAIN);
    expect(run(k, "time_of_flight", [1, 1, 0.5, 1.7976931348623157e308, 6.283185307179586])[0]).toBe(DOMAIN);
    expect(run(k, "time_of_flight", [1, 1, 0.5, 0, 2 ** 52])[0]).toBe(0);
  });
});
