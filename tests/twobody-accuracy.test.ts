/**
 * The two-body suites pass their limits (vectors/limits.json) on the release build: propagation within
 * max(1e-13 (1 + revolutions), 10 cond) for r and for v on every case, the conversions within their limits; the
 * elements kernel reports the convention status the reference chose; and mutants (builds wrong in one small
 * way) are rejected, so the checks can fail.
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import { loadBuild, type Kernels } from "../harness/module/load.js";
import { runSuite } from "../harness/verify/check.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { TWOBODY_SPECS, elementsSpec, propagateSpec } from "../harness/verify/specs/twobody.js";

function mutant(k: Kernels, tamper: (name: string, out: Float64Array | Float32Array, status: number) => number): Kernels {
  return { ...k, label: "mutant", has: (n) => k.has(n), arity: (n) => k.arity(n), call: (name, args) => tamper(name, k.out, k.call(name, args)) };
}

describe("two-body suites against the decimal.js references", () => {
  for (const spec of TWOBODY_SPECS) {
    it(`${spec.suite} (f64)`, () => {
      const r = runSuite(spec, release());
      expect(r.reasons).toEqual([]);
      expect(r.skipped).toBe(0);
      expect(r.statusFailures).toBe(0);
    });
    if (spec.suite.endsWith("-f32in")) {
      it(`${spec.suite} (f32)`, () => {
        const r = runSuite(spec, single());
        expect(r.applicable).toBe(true);
        expect(r.reasons).toEqual([]);
      });
    }
  }

  it("propagate covers every orbit class, both signs of dt, 1 s to 100 periods", () => {
    const v = readVectors(vectorPath("propagate"));
    const dt = col(v, "dt");
    const revs = col(v, "revs");
    expect(v.values.length).toBeGreaterThanOrEqual(3000);
    expect(new Set(v.tags).size).toBeGreaterThanOrEqual(14);
    expect(v.values.some((row) => row[dt]! < 0)).toBe(true);
    expect(Math.max(...v.values.map((row) => row[revs]!))).toBeGreaterThan(90);
    expect(Math.min(...v.values.map((row) => Math.abs(row[dt]!)))).toBeLessThan(2);
  });

  it("the elements kernel returns the convention status the reference chose, case by case", () => {
    const k = release();
    const v = readVectors(vectorPath("elements"));
    const want = col(v, "status_ref");
    const ins = elementsSpec.inputs.map((n) => col(v, n));
    const seen = new Set<number>();
    v.values.forEach((row) => {
      expect(k.call("elements", ins.map((c) => row[c]!))).toBe(row[want]!);
      seen.add(row[want]!);
    });
    expect([...seen].sort()).toEqual([0, 1, 2, 3]);
  });

  it("the debug build (assertions on) runs the propagate suite without an assertion firing", () => {
    expect(runSuite(propagateSpec, loadBuild("debug")).reasons).toEqual([]);
  });
});

describe("mutants are rejected", () => {
  it("r off by 2e-13 relative on well-conditioned cases: propagate fails", () => {
    const m = mutant(release(), (name, out, st) => {
      if (name === "propagate") for (let j = 0; j < 3; j++) out[j] = out[j]! * (1 + 2e-13);
      return st;
    });
    const r = runSuite(propagateSpec, m);
    expect(r.pass).toBe(false);
    expect(r.reasons.join()).toMatch(/rx/);
  });

  it("v rotated by 1e-12 rad: propagate fails on v", () => {
    const m = mutant(release(), (name, out, st) => {
      if (name === "propagate") {
        const [x, y] = [out[3]!, out[4]!];
        out[3] = x - 1e-12 * y;
        out[4] = y + 1e-12 * x;
      }
      return st;
    });
    const r = runSuite(propagateSpec, m);
    expect(r.pass).toBe(false);
    expect(r.reasons.join()).toMatch(/vx/);
  });

  it("one iteration too many on one case: the iteration limit fails", () => {
    let n = 0;
    const m = mutant(release(), (name, out, st) => {
      if (name === "propagate" && n++ === 100) out[6] = 5;
      return st;
    });
    expect(runSuite(propagateSpec, m).reasons.join()).toMatch(/iterations 5 > 4/);
  });

  it("argp swapped for its supplement on eccentric orbits: elements fails", () => {
    const m = mutant(release(), (name, out, st) => {
      if (name === "elements" && st === 0) out[4] = (2 * Math.PI - out[4]!) % (2 * Math.PI);
      return st;
    });
    expect(runSuite(elementsSpec, m).pass).toBe(false);
  });
});
