/**
 * `areal check` is proven by mutants: builds that are wrong in one small way each, which the suites must
 * reject, while the real build passes.
 */
import { describe, it, expect } from "vitest";
import { release, mutant } from "./helpers.js";
import { runSuite } from "../harness/verify/check.js";
import { findSpec } from "../harness/verify/specs/index.js";
import { fromBits, toBits } from "../harness/core/float.js";
import { slotsOf } from "../harness/module/routines.js";

const KE = slotsOf("kepler_elliptic", "E");
const KH = slotsOf("kepler_hyperbolic", "iterations");
const AT = slotsOf("anomaly_to_true", "nu");
const TOF = slotsOf("time_of_flight", "tof");

const bumpUlps = (x: number, n: number): number => fromBits(toBits(x) + BigInt(n));

describe("the checks catch wrong builds", () => {
  const spec = (s: string) => findSpec(s)!;

  it("the release build passes the Kepler suites", () => {
    for (const s of ["kepler-elliptic", "kepler-hyperbolic", "kepler-parabolic", "true-to-anomaly", "time-of-flight"]) {
      const r = runSuite(spec(s), release());
      expect(r.reasons).toEqual([]);
      expect(r.pass).toBe(true);
    }
  });

  it("5 ulp off, only in the corner (e >= 0.99, tiny |M|): kepler-elliptic fails and names a corner case", () => {
    const m = mutant(release(), (name, [e, M], out, st) => {
      if (name === "kepler_elliptic" && e! >= 0.99 && Math.abs(M!) < 0.0045 && M !== 0) out[KE.E] = bumpUlps(out[KE.E]!, 5);
      return st;
    });
    const r = runSuite(spec("kepler-elliptic"), m);
    expect(r.pass).toBe(false);
    expect(r.metrics[0]!.max).toBeGreaterThanOrEqual(3);
    expect(r.metrics[0]!.worst!.inputs.e).toBeGreaterThanOrEqual(0.99);
  });

  it("one iteration too many: the iteration limit fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "kepler_hyperbolic") out[KH.iterations] = 5;
      return st;
    });
    const r = runSuite(spec("kepler-hyperbolic"), m);
    expect(r.pass).toBe(false);
    expect(r.reasons.join()).toMatch(/iterations 5 > 4/);
  });

  it("a failure status on one case fails the suite", () => {
    let n = 0;
    const m = mutant(release(), (name, _a, _o, st) => (name === "kepler_parabolic" && n++ === 17 ? 18 : st));
    const r = runSuite(spec("kepler-parabolic"), m);
    expect(r.pass).toBe(false);
    expect(r.statusFailures).toBe(1);
  });

  it("a NaN output with ok fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "anomaly_to_true") out[AT.nu] = NaN;
      return st;
    });
    expect(runSuite(spec("anomaly-to-true"), m).pass).toBe(false);
  });

  it("a relative error of 1e-11 in the time of flight fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "time_of_flight") out[TOF.tof] = out[TOF.tof]! * (1 + 1e-11);
      return st;
    });
    expect(runSuite(spec("time-of-flight"), m).pass).toBe(false);
  });

  it("plain Newton from E = M with a loose tolerance (a naive solver) fails kepler-elliptic", () => {
    const m = mutant(release(), (name, [e, M], out, st) => {
      if (name !== "kepler_elliptic" || st !== 0) return st;
      let E = M!;
      for (let i = 0; i < 50; i++) {
        const d = (E - e! * Math.sin(E) - M!) / (1 - e! * Math.cos(E));
        E -= d;
        if (Math.abs(d) < 1e-10) break;
      }
      out[KE.E] = E;
      return st;
    });
    const r = runSuite(spec("kepler-elliptic"), m);
    expect(r.pass).toBe(false);
  });
});
