/**
 * `propagate` in the band where the Stumpff functions switch to their exponential form (x = sqrt(-psi) from 30 to
 * 40, the hyperbolic anomaly swept), against the decimal.js reference (harness/verify/reference/twobody.ts, which
 * propagates through elements and Kepler's equation, not universal variables). The propagate vectors reach at most
 * |dH| of about 11, so nothing else looks here: dropping e^-x there (the form moved from x = 40 to 30) costs about
 * 2e-13 relative at x = 30, and a wrong high series coefficient shows too. Limit: 10 x the case's conditioning
 * with a floor of 1e-14, tighter than the suite's 1e-13 (measured within 6 x cond on these cases).
 */
import { describe, it, expect } from "vitest";
import { referencePropagate } from "../harness/verify/reference/twobody.js";
import { slotsOf } from "../harness/module/routines.js";
import { release } from "./helpers.js";

/** From periapsis of a hyperbola (mu = 1, q = 1, eccentricity e) to hyperbolic anomaly H. */
function fromPeriapsis(e: number, H: number): number[] {
  const a = 1 / (1 - e);
  const n = Math.sqrt(1 / -(a * a * a));
  return [1, 1, 0, 0, 0, Math.sqrt(e + 1), 0, (e * Math.sinh(H) - H) / n];
}

describe("propagate where the Stumpff functions take their exponential form", () => {
  const S = slotsOf("propagate", "rx", "ry", "rz", "vx", "vy", "vz");
  const cases: [number, number][] = [];
  for (const e of [1.5, 2, 3]) for (const H of [29.5, 30.02, 30.2, 30.6, 31.5, 34, 38, 39.9, 41]) cases.push([e, H]);
  it.each(cases)("e = %d, H = %d", (e, H) => {
    const x = fromPeriapsis(e, H);
    const k = release();
    expect(k.call("propagate", x)).toBe(0);
    const r = [k.out[S.rx]!, k.out[S.ry]!, k.out[S.rz]!];
    const v = [k.out[S.vx]!, k.out[S.vy]!, k.out[S.vz]!];
    const ref = referencePropagate(x);
    const [condR, condV] = [ref[6]!, ref[7]!];
    const relErr = (got: number[], want: number[]) => Math.hypot(...got.map((g, i) => g - want[i]!)) / Math.hypot(...want);
    expect(relErr(r, ref.slice(0, 3))).toBeLessThanOrEqual(Math.max(1e-14, 10 * condR));
    expect(relErr(v, ref.slice(3, 6))).toBeLessThanOrEqual(Math.max(1e-14, 10 * condV));
  });
});
