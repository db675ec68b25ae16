/**
 * `transition` on hyperbolas that swing close to the focus, where propagate re-anchors its solution at periapsis
 * (universal.ts step 7) and Phi is the product Phi_p(chi) Phi_p(chi_a)^-1 (transition.ts step 6): checked against
 * the independent reference (harness/reference/transition.ts) with the suite's limits. Scenarios are invented;
 * Earth's GM is the WGS 84 value 398600.4418 km^3/s^2 (NIMA TR8350.2).
 */
import { describe, it, expect } from "vitest";
import { release, outputsNow } from "./helpers.js";
import { referenceTransition } from "../harness/verify/reference/transition.js";
import { stateOf } from "../harness/verify/specs/twobody.js";
import { GM_EARTH } from "../harness/core/constants.js";
import { limitsFor } from "../harness/verify/limits.js";

const LIMITS = limitsFor("transition", "f64");

/** An inbound hyperbola (r_p, e) starting at r0 = ratio r_p, propagated over `frac` times the time to periapsis. */
function inbound(rp: number, e: number, ratio: number, frac: number): number[] {
  const mu = GM_EARTH;
  const p = rp * (1 + e);
  const nu = -Math.acos((p / (ratio * rp) - 1) / e);
  const s = stateOf({ mu, p, e, i: 0.4, raan: 0.3, argp: 1.1, nu: nu + 2 * Math.PI, cls: "hyperbolic", planar: false });
  const a = -p / (e * e - 1);
  const H0 = 2 * Math.atanh(Math.sqrt((e - 1) / (e + 1)) * Math.tan(nu / 2));
  const n = Math.sqrt(mu / (-a) ** 3);
  return [mu, ...s, (-(e * Math.sinh(H0) - H0) / n) * frac];
}

describe("transition through periapsis of hairpin hyperbolas", () => {
  const cases: [string, number[]][] = [
    ["r_p = 0.7 m, r0 = 7071 km, dt = 1 s", [GM_EARTH, 7000, 1000, -300, -16447.94042304474, -2349.709372833961, 704.9107969067494, 1]],
    ["e = 1.5, r0 = 100 r_p, out to the same distance", inbound(7000, 1.5, 100, 2)],
    ["e = 1.2, r0 = 1000 r_p, out to the same distance", inbound(7000, 1.2, 1000, 2)],
    ["e = 1.05, r0 = 50 r_p, to periapsis", inbound(10000, 1.05, 50, 1)],
  ];
  for (const [name, x] of cases) {
    it(name, () => {
      const k = release();
      expect(k.call("transition", x)).toBe(0);
      const out = outputsNow(k, "transition");
      const ref = referenceTransition(x);
      const L = Math.hypot(x[1]!, x[2]!, x[3]!);
      const V = Math.sqrt(x[0]! / L);
      const d = (i: number): number => (i < 3 ? L : V);
      let err = 0;
      for (let q = 0; q < 36; q++) err = Math.max(err, (Math.abs(out[6 + q]! - ref[6 + q]!) * d(q % 6)) / d(Math.floor(q / 6)));
      const [condPhi, scale] = [ref[44]!, ref[45]!];
      expect(err / scale).toBeLessThanOrEqual(Math.max(LIMITS.max_abs!, LIMITS.cond_factor! * condPhi));
    });
  }
});
