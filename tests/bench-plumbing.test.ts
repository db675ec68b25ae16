/**
 * The bench plumbing, never its speed: the JSON structure CI reads, the operation counters (on a hand-written
 * module and against the release build's bits), the target-profile arithmetic, and the host-JS fallback.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { existsSync } from "node:fs";
import binaryen from "binaryen";
import { runBench, formatBench, tryLoadJs, ensureBenchModules, SMOKE_SETTINGS, EXAMPLE_PROFILE, routineInputs, type BenchResult } from "../harness/perf/bench.js";
import { loadCounting, countOps, predictCost, validateProfile, readProfile, zeroCounts, ProfileError, OP_NAMES, type Profile } from "../harness/perf/opcount.js";
import { loadNamedBuild } from "../harness/module/builds.js";
import { findRoutine, ROUTINES } from "../harness/module/routines.js";
import { SPECS } from "../harness/verify/specs/index.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { sameBits } from "../harness/core/float.js";
import { release } from "./helpers.js";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { moduleSizes } from "../harness/perf/size.js";
import { BUILD_DIR } from "../harness/core/paths.js";

const r0Sizes = () => moduleSizes();
// @ts-expect-error: a plain JavaScript build script without types
import { instrument } from "../scripts/instrument-wat.mjs";
import { slotsOf } from "../harness/module/routines.js";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { countAll } from "../harness/perf/count-all.js";
import { argValues, readCountInputs } from "../harness/perf/count.js";
import { missingPackages } from "../harness/perf/toolchain.js";
import { BUILD_FILES } from "../harness/core/paths.js";

beforeAll(() => {
  ensureBenchModules();
});

describe("areal bench result", () => {
  let r: BenchResult;
  beforeAll(async () => {
    r = await runBench(SMOKE_SETTINGS, { loadJs: () => loadNamedBuild("js") });
  });

  it("has the ratios CI tracks, as positive finite numbers, and wasm_vs_js for every kernel timed in both builds", () => {
    expect(Number.isFinite(r.ratios.elliptic_vs_newton) && r.ratios.elliptic_vs_newton > 0).toBe(true);
    expect(Number.isFinite(r.ratios.elliptic_vs_sincos) && r.ratios.elliptic_vs_sincos > 0).toBe(true);
    const both = r.kernels.filter((k) => k.wasmNs !== undefined && k.jsNs !== undefined).map((k) => k.routine).sort();
    expect(both.length).toBeGreaterThan(0);
    expect(Object.keys(r.ratios.wasm_vs_js).sort()).toEqual(both);
    for (const k of r.kernels) if (k.speedup !== undefined) expect(r.ratios.wasm_vs_js[k.routine]).toBeCloseTo(k.jsNs! / k.wasmNs!, 12);
    // the ratio definitions stated in harness/bench.ts
    expect(r.ratios.elliptic_vs_newton).toBeCloseTo(r.baselines.newtonNs / r.baselines.solverNs, 12);
    expect(r.ratios.elliptic_vs_sincos).toBeCloseTo(r.baselines.solverNs / r.baselines.sincosNs, 12);
    expect(r.ratios.floor_vs_sincos).toBeCloseTo(r.baselines.floorNs / r.baselines.sincosNs, 12);
    expect(r.ratios.sincos_dep_vs_sincos).toBeCloseTo(r.baselines.sincosDepNs / r.baselines.sincosNs, 12);
    for (const o of r.others) expect(o.speedup).toBeCloseTo(o.baselineNs / o.solverNs, 12);
    expect(r.others.map((o) => o.routine)).toEqual(["kepler-hyperbolic", "propagate"]);
    expect(r.targets.map((t) => t.name)).toEqual(["elliptic_vs_newton", "elliptic_vs_sincos", "hyperbolic_vs_newton", "propagate_vs_naive", "wasm_vs_js"]);
    expect(JSON.parse(JSON.stringify(r)).ratios.wasm_vs_js).toEqual(r.ratios.wasm_vs_js);
  });

  it("times eval against the kernel alone over the same rows, with the share as their ratio (no speed asserted)", () => {
    const ev = r.eval;
    expect([ev.routine, ev.rows]).toEqual(["kepler-elliptic", SMOKE_SETTINGS.evalRows]);
    for (const v of [ev.bytesRowsPerS, ev.stringRowsPerS, ev.kernelCallsPerS]) expect(Number.isFinite(v) && v > 0).toBe(true);
    expect(ev.kernelShare).toBeCloseTo(ev.bytesRowsPerS / ev.kernelCallsPerS, 12);
    expect(ev.bytesVsString).toBeCloseTo(ev.bytesRowsPerS / ev.stringRowsPerS, 12);
    expect(formatBench(r)).toMatch(/the kernel is [0-9.]+% of eval's time/);
  });

  it("lists every routine of the table, timed exactly when a vector suite gives it inputs", () => {
    expect(r.kernels.map((k) => k.routine)).toEqual(ROUTINES.map((x) => x.name));
    for (const k of r.kernels) {
      const hasSuite = SPECS.some((s) => s.routine === k.routine);
      if (k.wasmNs !== undefined) expect(hasSuite && k.cases > 0).toBe(true);
      else expect(k.note).toBeTruthy();
    }
  });

  it("iteration histograms cover the whole grid, and the worst case is where the grid says", () => {
    const { solver, newton, grid } = r.iterations;
    const n = SMOKE_SETTINGS.gridE * SMOKE_SETTINGS.gridM;
    for (const s of [solver, newton]) {
      expect(s.cases).toBe(n);
      expect(Object.values(s.histogram).reduce((a, b) => a + b, 0)).toBe(n);
    }
    const i = grid.e.indexOf(solver.worstAt.e);
    const j = grid.M.indexOf(solver.worstAt.M);
    expect(grid.solver[i * grid.M.length + j]).toBe(solver.worst);
    expect(Math.max(...grid.solver)).toBe(solver.worst);
  });

  it("has operation counts and a model check for every timed kernel, and the example profile's predictions", () => {
    const timed = r.kernels.filter((k) => k.wasmNs !== undefined).map((k) => k.routine);
    expect(r.opcounts.map((o) => o.routine)).toEqual(timed);
    expect(r.model.map((m) => m.routine)).toEqual(timed);
    for (const o of r.opcounts) for (const n of OP_NAMES) expect(o.mean[n]).toBeLessThanOrEqual(o.max[n]);
    expect(r.profile?.predictions.map((p) => p.routine)).toEqual(timed);
  });
});

describe("module sizes per export (harness/perf/size.ts)", () => {
  it("lists every function export of the release module, the file size, and at least as many functions as binaryen reads", () => {
    const s = r0Sizes();
    const file = readFileSync(join(BUILD_DIR, "areal.wasm"));
    const exported = WebAssembly.Module.exports(new WebAssembly.Module(file)).filter((x) => x.kind === "function").map((x) => x.name).sort();
    expect(s.exports.map((x) => x.name).sort()).toEqual(exported);
    expect(s.totalBytes).toBe(file.length);
    for (const x of s.exports) expect(x.reachedBytes).toBeGreaterThanOrEqual(x.ownBytes);
    // binaryen (independent of size.ts) reads the functions of the same binary
    const m = binaryen.readBinary(file);
    expect(m.getNumFunctions()).toBeGreaterThanOrEqual(s.exports.length);
    m.dispose();
    expect(s.codeBytes + s.dataBytes).toBeLessThan(s.totalBytes);
    // the elliptic solver's node table (assembly/sincos_table.ts, 8,224 bytes) is in the static data
    expect(s.dataBytes).toBeGreaterThanOrEqual(8224);
  });
});

describe("host-JS fallback", () => {
  it("a loader that fails leaves the JS build out with the reason in the notes", () => {
    const notes: string[] = [];
    expect(tryLoadJs(() => { throw new Error("no typescript here"); }, notes)).toBeUndefined();
    expect(notes.join(" ")).toMatch(/not available \(no typescript here\); wasm_vs_js is empty/);
    expect(tryLoadJs(undefined, [])).toBeUndefined();
  });
});

describe("operation counters", () => {
  it("count the instructions of a hand-written module: (a*b + c) / d, sqrt, and nothing inside a marked library call", async () => {
    // Written here, outside the project's kernels: one mul feeding an add (a fusable pair), one div, one sqrt.
    // $lib does three muls while the depth global is 1: they must not count.
    const wat = `(module
 (global $depth (mut i32) (i32.const 0))
 (func $lib (param $0 f64) (result f64)
  local.get $0
  local.get $0
  f64.mul
  local.get $0
  f64.mul
  local.get $0
  f64.mul
 )
 (func $k (export "k") (param $0 f64) (param $1 f64) (param $2 f64) (param $3 f64) (result f64)
  local.get $0
  local.get $1
  f64.mul
  local.get $2
  f64.add
  local.get $3
  f64.div
  f64.sqrt
  i32.const 1
  global.set $depth
  call $lib
  i32.const 0
  global.set $depth
 )
)`;
    const mod = binaryen.parseText(instrument(wat, "$depth") as string);
    expect(mod.validate()).toBeTruthy();
    const bin = mod.emitBinary();
    mod.dispose();
    const ex = new WebAssembly.Instance(new WebAssembly.Module(bin as Uint8Array<ArrayBuffer>), {}).exports as Record<string, (...a: number[]) => number>;
    const got = ex.k!(2, 3, 10, 4);
    const x = Math.sqrt((2 * 3 + 10) / 4);
    expect(got).toBe(x * x * x * x);
    expect([0, 1, 2, 3, 4].map((i) => ex.count_arith!(i))).toEqual([1, 1, 1, 1, 1]); // div mul add fma sqrt
    ex.count_arith_reset!();
    expect([0, 1, 2, 3, 4].map((i) => ex.count_arith!(i))).toEqual([0, 0, 0, 0, 0]);
  });

  it("the counting module gives the release module's bits on a spread of every suite", () => {
    const cm = loadCounting();
    const k = release();
    let compared = 0;
    for (const spec of SPECS) {
      const r = findRoutine(spec.routine);
      if (!r || !cm.kernels.has(r.exportName) || !existsSync(vectorPath(spec.suite))) continue; // a suite still being written
      const v = readVectors(vectorPath(spec.suite));
      const cols = r.inputs.map((i) => col(v, i.name));
      for (let row = 0; row < v.values.length; row += Math.max(1, Math.floor(v.values.length / 150))) {
        const args = cols.map((c) => v.values[row]![c]!);
        const a = k.call(r.exportName, args);
        const outA = Array.from(k.out.slice(0, r.outputs.length));
        const b = cm.count(r.exportName, args).status;
        expect(b).toBe(a);
        if (a >= 16) continue;
        r.outputs.forEach((_, j) => expect(sameBits(cm.kernels.out[j]!, outA[j]!), `${spec.suite} row ${row} output ${j}`).toBe(true));
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(1000);
  });

  it("kepler_elliptic: no library sin, cos or cube root (node tables, short cube root); table starter: no sqrt and one division per step; Markley's (corner cells): one sqrt and 2 + steps divisions (1/(1+e), its quotient, one per step); none for e = 0", () => {
    const cm = loadCounting();
    const r = findRoutine("kepler-elliptic")!;
    const { rows } = routineInputs(r, release(), 200);
    const stats = countOps(cm, r.name, r.exportName, rows);
    let stepped = 0;
    let markley = 0;
    for (const c of stats.perCase) {
      cm.count("kepler_elliptic", c.inputs);
      const steps = cm.kernels.out[slotsOf("kepler_elliptic", "iterations").iterations]!;
      expect([c.counts.sin, c.counts.cos, c.counts.cbrt]).toEqual([0, 0, 0]);
      if (steps >= 1) {
        expect([0, 1]).toContain(c.counts.sqrt);
        expect(c.counts.div).toBe((c.counts.sqrt === 1 ? 2 : 0) + steps);
        if (c.counts.sqrt === 1) markley++;
        stepped++;
      }
    }
    expect(stepped).toBeGreaterThan(100);
    expect(markley).toBeGreaterThan(10); // the vectors' e -> 1 corner takes Markley's starter
    expect(stepped - markley).toBeGreaterThan(50);
    const e0 = cm.count("kepler_elliptic", [0, 1.5]).counts;
    expect([e0.sin, e0.cos, e0.cbrt, e0.div]).toEqual([0, 0, 0, 0]);
  });
});

describe("target profiles", () => {
  const hand: Profile = { format: "areal-op-profile/1", name: "hand", unit: "cycles", call: 10, ops: { add: 1, mul: 2, div: 20, fma: 2 }, fused_multiply_add: true };

  it("cost = call + sum count x cost, a fusable pair costing fma instead of mul + add", () => {
    const c = { ...zeroCounts(), add: 2, mul: 3, fma: 1, div: 1 };
    // 10 + 2*1 + 3*2 + 1*20, then the one pair: + 2 - (2 + 1)  = 37 (worked by hand)
    expect(predictCost(hand, c)).toBe(37);
    expect(predictCost({ ...hand, fused_multiply_add: false }, c)).toBe(38);
    expect(() => predictCost(hand, { ...c, sin: 1 })).toThrow(/no cost for 'sin'/);
  });

  it("a bad profile is refused with the field named; the example profile is valid", () => {
    expect(() => validateProfile({ ...hand, unit: "furlongs" }, "p.json")).toThrow(/"unit"/);
    expect(() => validateProfile({ ...hand, ops: { add: 1, sine: 3 } }, "p.json")).toThrow(/ops\.sine/);
    expect(() => validateProfile({ ...hand, call: -1 }, "p.json")).toThrow(/"call"/);
    expect(() => validateProfile({ ...hand, ops: { add: 1 } }, "p.json")).toThrow(/ops\.fma/);
    expect(() => validateProfile({ ...hand, format: "x" }, "p.json")).toThrow(ProfileError);
    const p = readProfile(EXAMPLE_PROFILE);
    expect(p.unit).toBe("cycles");
  });
});

// Two independent ways of seeing the same operations: the divisions and square roots QEMU's disassembler finds on
// x86-64 (divsd, sqrtsd: the plugin's fdiv class, harness/perf/count/insn-plugin.c) and those the instrumented
// WebAssembly build counts (f64.div, f64.sqrt) for the same inputs. Here, after beforeAll has built the
// instrumented module (tests/count.test.ts skips the same tools with its own line).
describe.skipIf(missingPackages("x86-64").length > 0)("exact counts by class against the instrumented build", () => {
  it("kepler_elliptic on x86-64: the fdiv class is the divisions and square roots counted in WebAssembly", async () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-count-class-"));
    try {
      const r = await countAll(["x86-64"], [{ key: "f64", wasm: BUILD_FILES.f64 }], { kernels: ["kepler_elliptic"], dir, jobs: 1 });
      const k = r.targets["x86-64"]!.f64!.kepler_elliptic!;
      const typical = readCountInputs().kepler_elliptic!.typical;
      const { counts } = loadCounting().count("kepler_elliptic", argValues("kepler_elliptic", typical.args));
      expect(k.typical_classes.fdiv).toBeGreaterThan(0);
      expect(k.typical_classes.fdiv).toBe((counts.div ?? 0) + (counts.sqrt ?? 0));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});
