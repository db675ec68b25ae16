/**
 * The Lambert reference checked against where its cases come from: each case was built by propagating a state
 * (orbital elements -> (r1, v1), Kepler's equation -> r2 after tof), and the reference solves the rounded
 * (r1, r2, tof) from scratch (p-iteration, then shooting). It must give back the starting velocity, to within
 * the problem's conditioning (the rounding of r2 and tof moves the exact solution by about cond_v1).
 */
import { describe, it, expect } from "vitest";
import { lambertCasesAt, lambertCaseCount, lambertSpec } from "../harness/verify/specs/lambert.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { Rng } from "../harness/core/rng.js";

const v = readVectors(vectorPath("lambert"));
const V1 = ["v1x_ref", "v1y_ref", "v1z_ref"].map((n) => col(v, n));
const COND = col(v, "cond_v1");

describe("lambert reference: the starting velocity comes back", () => {
  it("on a seeded sample of 40 cases (every kind), |v1_ref - v1_start| / |v1| <= 4 cond_v1 + 2^-53", () => {
    const n = lambertCaseCount();
    expect(n).toBe(v.values.length);
    const rng = new Rng(77);
    const picks = Array.from({ length: 40 }, () => rng.below(n));
    const cases = lambertCasesAt(picks);
    const kinds = new Set<string>();
    cases.forEach((c, j) => {
      const row = v.values[picks[j]!]!;
      // The case rebuilt on its own is the row of the file (same inputs, bit for bit).
      lambertSpec.inputs.forEach((_, i) => expect(Object.is(row[i], c.inputs[i])).toBe(true));
      const ref = V1.map((q) => row[q]!);
      const d = Math.hypot(ref[0]! - c.v1Start[0], ref[1]! - c.v1Start[1], ref[2]! - c.v1Start[2]) / Math.hypot(ref[0]!, ref[1]!, ref[2]!);
      expect(d).toBeLessThanOrEqual(4 * row[COND]! + 2 ** -53);
      kinds.add(c.tag.replace(/-(short|long)$/, "").replace(/^rev\d$/, "rev"));
    });
    expect(kinds.size).toBeGreaterThanOrEqual(4);
  });
});
