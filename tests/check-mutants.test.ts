/**
 * `areal check` is proven by mutants: builds that are wrong in one small way each, which the suites must
 * reject, while the real build passes.
 */
import { describe, it, expect } from "vitest";
import { release, mutant } from "./helpers.js";
import { runSuite, caseError } from "../harness/verify/check.js";
import { findSpec } from "../harness/verify/specs/index.js";
import { fromBits, toBits } from "../harness/core/float.js";
import { findRoutine, slotsOf } from "../harness/module/routines.js";
import { FIRST_ERROR, statusWord } from "../harness/module/status.js";
import { limitsFor } from "../harness/verify/limits.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";

const KE = slotsOf("kepler_elliptic", "E");
const KH = slotsOf("kepler_hyperbolic", "iterations");
const AT = slotsOf("anomaly_to_true", "nu");
const TOF = slotsOf("time_of_flight", "tof");

/** The output slot of a routine's output by name (from the ABI table). */
function slotOf(routine: string, output: string): number {
  const i = findRoutine(routine)!.outputs.indexOf(output);
  if (i < 0) throw new Error(`${routine} has no output ${output}`);
  return i;
}

const bumpUlps = (x: number, n: number): number => fromBits(toBits(x) + BigInt(n));

describe("the checks catch wrong builds", () => {
  const spec = (s: string) => findSpec(s)!;

  it("the release build passes the Kepler suites", () => {
    for (const s of ["kepler-elliptic", "kepler-hyperbolic", "kepler-parabolic", "true-to-anomaly", "time-of-flight"]) {
      const r = runSuite(spec(s), release());
      expect(r.reasons).toEqual([]);
      expect(r.verdict).toBe("pass");
    }
  });

  it("5 ulp off, only in the corner (e >= 0.99, tiny |M|): kepler-elliptic fails and names a corner case", () => {
    const m = mutant(release(), (name, [e, M], out, st) => {
      if (name === "kepler_elliptic" && e! >= 0.99 && Math.abs(M!) < 0.0045 && M !== 0) out[KE.E] = bumpUlps(out[KE.E]!, 5);
      return st;
    });
    const r = runSuite(spec("kepler-elliptic"), m);
    expect(r.verdict).toBe("fail");
    expect(r.metrics[0]!.max).toBeGreaterThanOrEqual(3);
    expect(r.metrics[0]!.worst!.inputs.e).toBeGreaterThanOrEqual(0.99);
  });

  it("one iteration too many: the iteration limit fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "kepler_hyperbolic") out[KH.iterations] = 5;
      return st;
    });
    const r = runSuite(spec("kepler-hyperbolic"), m);
    expect(r.verdict).toBe("fail");
    expect(r.reasons.join()).toMatch(/iterations 5 > 4/);
  });

  it("a failure status on one case fails the suite", () => {
    let n = 0;
    const m = mutant(release(), (name, _a, _o, st) => (name === "kepler_parabolic" && n++ === 17 ? 18 : st));
    const r = runSuite(spec("kepler-parabolic"), m);
    expect(r.verdict).toBe("fail");
    expect(r.statusFailures).toBe(1);
  });

  it("a NaN output with ok fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "anomaly_to_true") out[AT.nu] = NaN;
      return st;
    });
    expect(runSuite(spec("anomaly-to-true"), m).verdict).toBe("fail");
  });

  it("a relative error of 1e-11 in the time of flight fails", () => {
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "time_of_flight") out[TOF.tof] = out[TOF.tof]! * (1 + 1e-11);
      return st;
    });
    expect(runSuite(spec("time-of-flight"), m).verdict).toBe("fail");
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
    expect(r.verdict).toBe("fail");
  });

  // The NaN guard must hold for every metric: NaN > limit is false, so without it a NaN output passes.
  it("a NaN output with ok fails a relative suite (time-of-flight), an absolute one (elements i) and a vector one (propagate r)", () => {
    const nanAt = (routine: string, output: string) =>
      mutant(release(), (name, _a, out, st) => {
        if (name === findRoutine(routine)!.exportName && st === 0) out[slotOf(routine, output)] = NaN;
        return st;
      });
    for (const [suite, routine, output] of [
      ["time-of-flight", "time-of-flight", "tof"],
      ["elements", "elements", "i"],
      ["propagate", "propagate", "ry"],
    ] as const) {
      const r = runSuite(spec(suite), nanAt(routine, output));
      expect(r.verdict, suite).toBe("fail");
      expect(r.reasons.join(), suite).toMatch(/broke the ABI|exceeds the limit/);
    }
  });

  it("the metric itself counts a NaN as an infinite error, whatever the metric (behind the ABI check, which sees it first)", () => {
    for (const metric of ["ulp", "rel", "abs"] as const) {
      expect(caseError(metric, NaN, 1, NaN, false), metric).toBe(Infinity);
      expect(caseError(metric, NaN, -2, NaN, true), metric).toBe(Infinity);
      expect(caseError(metric, 1, 1, 0, false), metric).toBe(0);
    }
  });

  it("each output is widened by its own conditioning column: r off by more than its limit fails where v's would allow it", () => {
    // Limits recomputed here from vectors/limits.json and the file's columns (not through check.ts).
    const v = readVectors(vectorPath("propagate"));
    const lim = limitsFor("propagate", "f64");
    const [cr, cv, rv] = [col(v, "cond_r"), col(v, "cond_v"), col(v, "revs")];
    const limOf = (row: readonly number[], c: number) => Math.max(lim.max_rel! * (1 + Math.abs(row[rv]!)), lim.cond_factor! * row[c]!);
    // The row where v's limit is largest against r's.
    let best = -1;
    let gap = 0;
    v.values.forEach((row, i) => {
      const g = limOf(row, cv) / limOf(row, cr);
      if (g > gap) [gap, best] = [g, i];
    });
    expect(gap).toBeGreaterThan(100);
    const row = v.values[best]!;
    const factor = 1 + Math.sqrt(limOf(row, cr) * limOf(row, cv)); // 10x r's limit or more, 10x below v's
    const ins = findRoutine("propagate")!.inputs.map((inp) => row[col(v, inp.name)]!);
    const m = mutant(release(), (name, a, out, st) => {
      if (name === "propagate" && a.every((x, q) => x === ins[q])) for (let j = 0; j < 3; j++) out[j] = out[j]! * factor;
      return st;
    });
    const r = runSuite(spec("propagate"), m, { rows: [best] });
    expect(r.verdict).toBe("fail");
    expect(r.reasons.join()).toMatch(/rx/);
    expect(runSuite(spec("propagate"), release(), { rows: [best] }).verdict).toBe("pass");
  });

  it("a relative error on negative references fails too (the error is |got - want| / |want|, not over a signed want)", () => {
    // Only the cases whose time of flight is negative are made 1e-11 off.
    const m = mutant(release(), (name, _a, out, st) => {
      if (name === "time_of_flight" && out[TOF.tof]! < 0) out[TOF.tof] = out[TOF.tof]! * (1 + 1e-11);
      return st;
    });
    const r = runSuite(spec("time-of-flight"), m);
    expect(r.verdict).toBe("fail");
    expect(r.metrics.find((x) => x.output === "tof")!.worst!.want).toBeLessThan(0);
  });

  it("the first error code (FIRST_ERROR, the lowest failure) on one case fails the suite: it is not a success", () => {
    let n = 0;
    const first = FIRST_ERROR;
    expect(statusWord(first)).not.toMatch(/^ok/);
    const m = mutant(release(), (name, _a, _o, st) => (name === "kepler_parabolic" && n++ === 5 ? first : st));
    const r = runSuite(spec("kepler-parabolic"), m);
    expect(r.verdict).toBe("fail");
    expect(r.statusFailures).toBe(1);
  });
});
