/**
 * The release module must give the same bits everywhere it runs: under the engine's baseline compiler and its
 * optimizing compiler (child node processes with the tier forced), and as native code (wasm2c + the C compiler,
 * -ffp-contract=off, loaded in-process as a shared library). Checked on every vector case of every suite. Also:
 * the build is reproducible, and `eval` through the native build writes the same text as through the module.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFile, execFileSync, spawnSync } from "node:child_process";
import { promisify } from "node:util";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { ROOT } from "../harness/core/paths.js";
import { SPECS } from "../harness/verify/specs/index.js";
import { compareBuilds, type CompareBuild } from "../harness/verify/compare-builds.js";
import { nativeUnavailable, loadNative } from "../harness/module/builds.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { evaluateCsv, evaluateFile } from "../harness/run/evaluate.js";
import { findRoutine } from "../harness/module/routines.js";
import { loadBuild } from "../harness/module/load.js";
import { formatCsv } from "../harness/core/csv.js";
import { prepareNative, nativeToolchainMissing, REQUIRE_NATIVE } from "./builds-helpers.js";
import { noteSkip } from "./support/skips.js";

const run = promisify(execFile);

let nativeWhy: string | undefined;
beforeAll(() => {
  // The forced-tier runs load the compiled harness (dist/, made by `npm run build`) in child processes.
  // A failing type-check stops here with its messages (it used to be swallowed by an empty catch).
  if (!existsSync(join(ROOT, "dist", "harness", "verify", "compare-builds.js"))) {
    const tsc = spawnSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", "tsconfig.json"], { cwd: ROOT, encoding: "utf8" });
    if (tsc.status !== 0) throw new Error(`tsc -p tsconfig.json failed:\n${tsc.stdout}${tsc.stderr}`);
  }
  nativeWhy = prepareNative();
  if (nativeWhy) {
    if (REQUIRE_NATIVE) throw new Error(`AREAL_REQUIRE_NATIVE=1 but the native build cannot run: ${nativeWhy}`);
    process.stderr.write(`builds-native: native build skipped: ${nativeWhy}\n`);
    noteSkip("native build (tests/builds-native)", nativeWhy, "apt-get install wabt gcc, then npm run build:native");
  }
});

describe("bit-identity of the release module across engine tiers and the native build", () => {
  it("baseline, optimizing and native agree with the default engine bit for bit on every vector case", () => {
    const builds: CompareBuild[] = ["f64", "baseline", "optimizing", ...(nativeWhy ? [] : ["native" as const])];
    const specs = SPECS.filter((s) => existsSync(vectorPath(s.suite)));
    const rep = compareBuilds(builds, specs);
    expect(rep.comparisons.length).toBe(specs.length * (builds.length - 1));
    let total = 0;
    for (const c of rep.comparisons) {
      expect(c.cases, `${c.suite} ${c.build}`).toBe(readVectors(vectorPath(c.suite)).values.length);
      expect({ suite: c.suite, build: c.build, identical: c.identical, first: c.first }).toEqual({ suite: c.suite, build: c.build, identical: c.cases, first: undefined });
      total += c.cases;
    }
    expect(total).toBeGreaterThan(10000);
  });
});

describe("eval through the native build", () => {
  it.skipIf(nativeToolchainMissing() !== undefined && !REQUIRE_NATIVE)("writes the same text as the release module, in one thread and with worker threads", async () => {
    if (nativeWhy) return; // reported in beforeAll
    const v = readVectors(vectorPath("kepler-elliptic"));
    const rows = v.values.filter((_, i) => i % 7 === 0).map((r) => [r[0]!, r[1]!]);
    const csv = formatCsv(["e", "M"], rows);
    const dir = mkdtempSync(join(tmpdir(), "areal-native-csv-"));
    try {
      const file = join(dir, "cases.csv");
      writeFileSync(file, csv);
      const wasm = evaluateCsv(findRoutine("kepler-elliptic")!, readFileSync(file, "utf8"), file, loadBuild("f64")).csv;
      const native = evaluateCsv(findRoutine("kepler-elliptic")!, readFileSync(file, "utf8"), file, loadNative()).csv;
      expect(wasm.split("\n").length).toBe(rows.length + 2);
      expect(native).toBe(wasm);
      // Two worker threads, each with its own copy of the library (its output region is static storage).
      await evaluateFile(findRoutine("kepler-elliptic")!, file, file, { workers: 2, load: { build: "native" }, kernels: loadNative(), out: join(dir, "n.csv"), chunkBytes: 4096 });
      expect(readFileSync(join(dir, "n.csv"), "utf8")).toBe(wasm);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("reproducible build", () => {
  it("compiling the release target twice gives the same bytes", async () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-repro-"));
    try {
      const asc = join(ROOT, "node_modules", ".bin", "asc");
      // The two compilations run side by side (independent processes), so the test costs one compile.
      await Promise.all(["a", "b"].map((n) => run(asc, ["assembly/index.ts", "--target", "release", "--outFile", join(dir, `${n}.wasm`), "--textFile", join(dir, `${n}.wat`)], { cwd: ROOT })));
      const a = readFileSync(join(dir, "a.wasm"));
      const b = readFileSync(join(dir, "b.wasm"));
      expect(a.length).toBeGreaterThan(1000);
      expect(Buffer.compare(a, b)).toBe(0);
      expect(WebAssembly.Module.imports(new WebAssembly.Module(a))).toEqual([]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
