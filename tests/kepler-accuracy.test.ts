/**
 * Every Kepler and anomaly suite passes its limits (vectors/limits.json) on the release and the
 * single-precision builds: the targets of at most 4 ulp from the correctly rounded root and at most
 * 4 correction steps, on every case of the vector sets, the e -> 1 corner included.
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import { loadBuild } from "../harness/module/load.js";
import { runSuite } from "../harness/verify/check.js";
import { KEPLER_SPECS } from "../harness/verify/specs/kepler.js";

describe("Kepler suites against the 60-digit references", () => {
  for (const spec of KEPLER_SPECS) {
    it(`${spec.suite} (f64)`, () => {
      const r = runSuite(spec, release());
      expect(r.reasons).toEqual([]);
      expect(r.skipped).toBe(0);
      if (spec.suite.startsWith("kepler-elliptic") || spec.suite.startsWith("kepler-hyperbolic")) {
        expect(r.metrics[0]!.max).toBeLessThanOrEqual(4);
        expect(r.maxIterations!).toBeLessThanOrEqual(4);
      }
    });
    it(`${spec.suite} (f32)`, () => {
      const r = runSuite(spec, single());
      expect(r.reasons).toEqual([]);
      if (spec.suite.endsWith("-f32in")) expect(r.applicable).toBe(true);
    });
  }

  it("the debug build (assertions on: output slot range, |E - M| <= e) runs the solver suites without an assertion firing", () => {
    const debug = loadBuild("debug");
    for (const spec of KEPLER_SPECS.filter((s) => s.suite.startsWith("kepler-"))) {
      expect(runSuite(spec, debug).reasons).toEqual([]);
    }
  });

  it("the corner (e >= 0.99, |M| <= 0.0045) is in the elliptic set, thousands of cases deep", () => {
    const spec = KEPLER_SPECS.find((s) => s.suite === "kepler-elliptic")!;
    const corner = spec.cases().filter((c) => c.inputs[0]! >= 0.99 && Math.abs(c.inputs[1]!) <= 0.0045 && c.inputs[1] !== 0);
    expect(corner.length).toBeGreaterThan(5000);
  });
});
