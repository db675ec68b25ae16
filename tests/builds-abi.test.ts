/**
 * External modules through the documented ABI (docs/abi.md): signatures read from the binary, suites skipped
 * with the missing exports named, wrong signatures rejected, and the naive example (examples/naive-kepler)
 * failing every Kepler suite: the mutant proof that each of those suites can fail.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { readSignatures, planModule, AbiError, formatSignature, skippedLines } from "../harness/module/signatures.js";
import { instantiate } from "../harness/module/load.js";
import { BUILD_FILES, ROOT } from "../harness/core/paths.js";
import { ROUTINES } from "../harness/module/routines.js";
import { SPECS } from "../harness/verify/specs/index.js";
import { runSuite } from "../harness/verify/check.js";
import { loadModule } from "../harness/module/builds.js";
import { encodeModule, CORE, i32const } from "./builds-helpers.js";

describe("signatures from the binary", () => {
  it("match what the engine reports for every export of the release module (names, kinds, arity)", () => {
    const bytes = readFileSync(BUILD_FILES.f64);
    const sigs = readSignatures(bytes, "f64");
    const mod = new WebAssembly.Module(bytes);
    const engine = WebAssembly.Module.exports(mod);
    expect([...sigs.keys()].sort()).toEqual(engine.map((e) => e.name).sort());
    const inst = new WebAssembly.Instance(mod, {});
    for (const e of engine) {
      expect(sigs.get(e.name)!.kind).toBe(e.kind);
      if (e.kind === "function") expect(sigs.get(e.name)!.signature!.params.length).toBe((inst.exports[e.name] as () => void).length);
    }
    expect(formatSignature(sigs.get("kepler_elliptic")!.signature!)).toBe("(f64, f64) -> i32");
  });

  it("read f32 parameters in the single-precision module", () => {
    const sigs = readSignatures(readFileSync(BUILD_FILES.f32), "f32");
    expect(formatSignature(sigs.get("kepler_elliptic")!.signature!)).toBe("(f32, f32) -> i32");
  });

  it("reject a file that is not WebAssembly with a plain message", () => {
    expect(() => readSignatures(new TextEncoder().encode("hello world"), "x.wasm")).toThrow(/x\.wasm: not a WebAssembly binary/);
  });

  it("the release modules import nothing", () => {
    for (const f of [BUILD_FILES.f64, BUILD_FILES.f32]) {
      expect(WebAssembly.Module.imports(new WebAssembly.Module(readFileSync(f)))).toEqual([]);
    }
  });
});

describe("planning a module's suites", () => {
  const keplerOnly = encodeModule([
    ...CORE,
    // returns ERR_NOT_CONVERGED (18) for everything: a valid export with the right signature
    { name: "kepler_elliptic", params: ["f64", "f64"], results: ["i32"], body: i32const(18) },
  ]);

  it("runs the suites whose exports exist and names the missing exports of the others", () => {
    const sigs = readSignatures(keplerOnly, "one.wasm");
    const plan = planModule(sigs, 8, SPECS, ROUTINES, "one.wasm");
    expect(plan.run.map((s) => s.suite).sort()).toEqual(SPECS.filter((s) => s.routine === "kepler-elliptic").map((s) => s.suite).sort());
    const hyper = plan.skipped.find((s) => s.suite === "kepler-hyperbolic");
    expect(hyper?.missing).toEqual(["kepler_hyperbolic"]);
    expect(skippedLines(plan)).toContain("skipped kepler-hyperbolic: the module has no kepler_hyperbolic (docs/abi.md)");
  });

  it("a module whose kernel always fails is a failing suite, not a crash", () => {
    const k = instantiate(keplerOnly, "one.wasm");
    const spec = SPECS.find((s) => s.suite === "kepler-elliptic")!;
    const r = runSuite(spec, k);
    expect(r.verdict).toBe("fail");
    expect(r.statusFailures).toBe(r.cases);
  });

  it("rejects a wrong signature, naming the export, what it has and what the ABI needs", () => {
    const wrong = encodeModule([...CORE, { name: "kepler_elliptic", params: ["f64"], results: ["i32"], body: i32const(0) }]);
    const sigs = readSignatures(wrong, "wrong.wasm");
    expect(() => planModule(sigs, 8, SPECS, ROUTINES, "wrong.wasm")).toThrow(AbiError);
    expect(() => planModule(sigs, 8, SPECS, ROUTINES, "wrong.wasm")).toThrow(
      "wrong.wasm: export kepler_elliptic has signature (f64) -> i32; the ABI needs (f64, f64) -> i32, that is kepler_elliptic(e: f64, M: f64) -> status: i32",
    );
  });

  it("rejects f32 parameters in a module that declares 8-byte reals", () => {
    const mixed = encodeModule([...CORE, { name: "kepler_parabolic", params: ["f32"], results: ["i32"], body: i32const(0) }]);
    expect(() => planModule(readSignatures(mixed, "m.wasm"), 8, SPECS, ROUTINES, "m.wasm")).toThrow(/kepler_parabolic has signature \(f32\) -> i32; the ABI needs \(f64\) -> i32/);
  });

  it("rejects a module without areal_out", () => {
    const none = encodeModule([{ name: "areal_real_bytes", params: [], results: ["i32"], body: i32const(8) }]);
    expect(() => planModule(readSignatures(none, "n.wasm"), 8, SPECS, ROUTINES, "n.wasm")).toThrow(/n\.wasm: the module lacks areal_out: \(\) -> i32/);
  });
});

describe("the naive example module (examples/naive-kepler)", () => {
  let dir = "";
  let path = "";
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "areal-naive-"));
    path = join(dir, "naive-kepler.wasm");
    execFileSync(process.execPath, [join(ROOT, "examples", "naive-kepler", "build.mjs"), path], { stdio: "pipe" });
    return () => rmSync(dir, { recursive: true, force: true });
  });

  it("has exactly the ABI core and the three Kepler solvers, and imports nothing", () => {
    const { kernels, signatures } = loadModule(path);
    expect([...signatures.keys()].sort()).toEqual(["areal_abi_version", "areal_out", "areal_real_bytes", "kepler_elliptic", "kepler_hyperbolic", "kepler_parabolic", "memory"]);
    expect(WebAssembly.Module.imports(new WebAssembly.Module(readFileSync(path)))).toEqual([]);
    expect(kernels.realBytes).toBe(8);
  });

  it("fails every Kepler suite it can run (each of those suites can fail), and skips the rest", () => {
    const { kernels, signatures } = loadModule(path);
    const plan = planModule(signatures, 8, SPECS, ROUTINES, path);
    const kepler = SPECS.filter((s) => ["kepler-elliptic", "kepler-hyperbolic", "kepler-parabolic"].includes(s.routine));
    expect(plan.run.map((s) => s.suite).sort()).toEqual(kepler.map((s) => s.suite).sort());
    expect(plan.skipped.length).toBe(SPECS.length - kepler.length);
    for (const spec of plan.run) {
      const r = runSuite(spec, kernels);
      expect(r.verdict, spec.suite).toBe("fail");
      expect(r.reasons.length, spec.suite).toBeGreaterThan(0);
    }
  });

  it("`areal check --module` prints the skipped suites and the failures, and exits 1", () => {
    let out = "";
    let err = "";
    let code = 0;
    // The default call limit: it counts the module thread's CPU time, so a loaded machine cannot make a call of
    // microseconds time out (tests/hostile-modules.test.ts pauses a run to show it).
    try {
      out = execFileSync(process.execPath, [join(ROOT, "bin", "areal.mjs"), "check", "--module", path], { encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
    } catch (caught) {
      const e = caught as { status: number; stdout: string; stderr: string };
      code = e.status;
      out = e.stdout;
      err = e.stderr;
    }
    expect(code, err).toBe(1);
    expect(out).toMatch(/^skipped true-to-anomaly: the module has no true_to_anomaly/m);
    expect(out).toMatch(/FAIL kepler-elliptic: .*not-converged/);
    expect(out).toMatch(/^ {2}kepler-elliptic: e=[^]*? got [^]*?want /m);
  });
});
