/**
 * The report's linearisation section: linear relative-motion guidance flown on the two-body problem misses by an
 * amount that grows with the square of the separation (the neglected terms of the expansion are second order:
 * common practice; Yamanaka & Ankersen 2002 state their matrix is first order). A mutant that drops the
 * first impulse makes the miss grow like the separation itself, and is caught.
 */
import { describe, it, expect } from "vitest";
import { linearisation } from "../harness/report/data.js";
import { release, mutant } from "./helpers.js";
import { slotsOf } from "../harness/module/routines.js";

/** Log-log slope of miss against separation between two separations (km) of one chief. */
function slope(points: readonly { chief: string; separation: number; miss: number }[], chief: string, s1: number, s2: number): number {
  const near = (s: number) => points.filter((p) => p.chief === chief).reduce((b, p) => (Math.abs(Math.log(p.separation / s)) < Math.abs(Math.log(b.separation / s)) ? p : b));
  const a = near(s1);
  const b = near(s2);
  return Math.log(b.miss / a.miss) / Math.log(b.separation / a.separation);
}

describe("report: linear guidance against the two-body problem", () => {
  it("the miss grows with the square of the separation (10 m to 1 km), for both chiefs", () => {
    const pts = linearisation(release());
    if (typeof pts === "string") throw new Error(pts);
    for (const chief of ["circular, 7000 km", "e = 0.1, a = 7000 km"]) {
      const p = slope(pts, chief, 0.01, 1);
      expect(p).toBeGreaterThan(1.9);
      expect(p).toBeLessThan(2.1);
    }
    // At 10 m the miss is below a millimetre (measured 5.1e-5 m for the circular chief).
    expect(pts.find((p) => p.separation === 0.01)!.miss).toBeLessThan(1e-6);
  });

  it("a mutant that drops the first impulse misses in proportion to the separation, and the slope shows it", () => {
    const DV = slotsOf("rendezvous_linear", "dv1x", "dv1y", "dv1z");
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "rendezvous_linear") for (const n of ["dv1x", "dv1y", "dv1z"] as const) out[DV[n]] = 0;
      return st;
    });
    const pts = linearisation(m);
    if (typeof pts === "string") throw new Error(pts);
    expect(slope(pts, "circular, 7000 km", 0.01, 1)).toBeLessThan(1.1);
  });
});
