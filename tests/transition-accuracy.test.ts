/**
 * The `transition` suite passes its limits (vectors/limits.json) on the release build: r, v as for propagate, and
 * each 3x3 block of Phi within max(1e-9, 10 cond_phi) of the largest entry of the scale-free Phi~ = D^-1 Phi D
 * against the independent reference (harness/reference/transition.ts: central differences of the decimal.js
 * propagation). The suite covers low, geostationary, Molniya-like, transfer, e = 0.999, hyperbolic and near-parabolic orbits over up to 25 revolutions both ways; output
 * mutants (one entry of Phi wrong in a small way) are rejected, so the check can fail.
 */
import { describe, it, expect } from "vitest";
import { release, mutant } from "./helpers.js";
import { runSuite } from "../harness/verify/check.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { transitionSpec, TRANSITION_CLASSES, MAX_REVS } from "../harness/verify/specs/transition.js";
import { limitsFor } from "../harness/verify/limits.js";

/** Output slot of phi_ij (1-based i, j). */
const slot = (i: number, j: number): number => 6 + 6 * (i - 1) + (j - 1);

describe("transition suite against the decimal.js reference", () => {
  it("passes its limits on the release build, every case ok", () => {
    const r = runSuite(transitionSpec, release());
    expect(r.reasons).toEqual([]);
    expect(r.statusFailures).toBe(0);
    expect(r.skipped).toBe(0);
    // The target for Phi~: 1e-9 of its largest entry.
    expect(limitsFor("transition", "f64").max_abs).toBeLessThanOrEqual(1e-9);
  });

  it("covers every class, both directions, up to 25 revolutions", () => {
    const v = readVectors(vectorPath("transition"));
    const dt = col(v, "dt");
    const revs = col(v, "revs");
    expect(new Set(v.tags)).toEqual(new Set(TRANSITION_CLASSES));
    expect(v.values.some((row) => row[dt]! < 0)).toBe(true);
    const maxRevs = Math.max(...v.values.map((row) => row[revs]!));
    expect(maxRevs).toBeGreaterThan(0.8 * MAX_REVS);
    expect(maxRevs).toBeLessThanOrEqual(MAX_REVS);
    for (const tag of ["leo", "geo", "molniya", "gto", "e0999"]) {
      const rows = v.values.filter((_, i) => v.tags[i] === tag);
      expect(rows.some((row) => row[revs]! > 5), tag).toBe(true);
      expect(rows.some((row) => row[dt]! < 0 && row[revs]! > 1), tag).toBe(true);
    }
  });

  // Mutants: one Phi entry off by 2e-9 of the largest scale-free entry, in each block; a sign flipped in the
  // (v, r0) block; the iteration count over its cap.
  const scaleCols = (): { rr: number; rv: number; vr: number } => {
    const v = readVectors(vectorPath("transition"));
    return { rr: col(v, "scale_rr"), rv: col(v, "scale_rv"), vr: col(v, "scale_vr") };
  };
  for (const [i, j, which] of [[1, 2, "rr"], [2, 5, "rv"], [6, 1, "vr"], [4, 4, "rr"]] as const) {
    it(`a mutant moving phi_${i}${j} by 2e-9 of the largest scale-free entry is rejected`, () => {
      const v = readVectors(vectorPath("transition"));
      const sc = scaleCols();
      // The row being checked is found from the inputs (the check calls the kernel with them, row by row).
      const byInputs = new Map(v.values.map((row) => [row.slice(0, 8).join(","), row]));
      const m = mutant(release(), (name, args, out, st) => {
        if (name === "transition") {
          const row = byInputs.get(args.join(","))!;
          out[slot(i, j)]! += 2e-9 * row[sc[which]]!;
        }
        return st;
      });
      const r = runSuite(transitionSpec, m);
      expect(r.pass).toBe(false);
      expect(r.reasons.join(" ")).toMatch(new RegExp(`phi_${i - ((i - 1) % 3)}${j - ((j - 1) % 3)}`));
    });
  }

  it("a mutant with the sign of phi_52 flipped is rejected", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "transition") out[slot(5, 2)] = -out[slot(5, 2)]!;
      return st;
    });
    expect(runSuite(transitionSpec, m).pass).toBe(false);
  });
});
