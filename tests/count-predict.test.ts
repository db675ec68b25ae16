/**
 * Predictions of `areal bench --counts-json` (harness/perf/count-model.ts predictFromCounts): exact instruction
 * counts by class priced with a profile's cycles per class. The expected figures are worked by hand below; the
 * profile and the counts file are checked for what a prediction needs.
 */
import { describe, it, expect } from "vitest";
import { predictFromCounts } from "../harness/perf/count-model.js";
import { validateProfile, type Profile } from "../harness/perf/opcount.js";

const PROFILE: Profile = validateProfile({ format: "areal-op-profile/1", name: "hand", unit: "cycles", clock_hz: 100e6, call: 0, ops: {},
  classes: { fdiv: 14, fp: 1, mem: 2, branch: 3, int: 1 } }, "hand profile");
const COUNTS = { targets: { "cortex-m4f": { f32: { k: {
  typical: 27, worst: 40, worst_inputs: {},
  typical_classes: { fdiv: 2, fp: 10, mem: 5, branch: 3, int: 7 },
  worst_classes: { fdiv: 4, fp: 12, mem: 8, branch: 6, int: 10 },
} } } } };

describe("predictions from exact counts", () => {
  it("price each class by the profile: typical 2*14 + 10 + 5*2 + 3*3 + 7 = 64, worst 4*14 + 12 + 16 + 18 + 10 = 112", () => {
    expect(predictFromCounts(COUNTS, PROFILE, "counts.json")).toEqual([{ target: "cortex-m4f", build: "f32", kernel: "k", typical: 64, worst: 112 }]);
  });
  it("a profile without cycles for every class is refused, naming the classes", () => {
    const p = validateProfile({ format: "areal-op-profile/1", name: "partial", unit: "cycles", call: 0, ops: {}, classes: { fp: 1, int: 1 } }, "p");
    expect(() => predictFromCounts(COUNTS, p, "counts.json")).toThrow(/partial: the profile has no "classes" cycles for fdiv, mem, branch/);
  });
  it("a counts file without classes (an older count) is refused, naming the kernel", () => {
    const old = { targets: { armhf: { f64: { kepler_elliptic: { typical: 1, worst: 2, worst_inputs: {} } } } } };
    expect(() => predictFromCounts(old, PROFILE, "old.json")).toThrow(/old\.json: armhf f64 kepler_elliptic has no instruction classes/);
  });
  it("an unknown class in a profile is refused", () => {
    expect(() => validateProfile({ format: "areal-op-profile/1", name: "x", unit: "cycles", call: 0, ops: {}, classes: { simd: 1 } }, "x.json")).toThrow(/x\.json: "classes\.simd": unknown instruction class/);
  });
});
