/**
 * Determinism: the release module gives the bits of the golden files (vectors/golden/, harness/golden.ts) on
 * every case of every vector suite: in this engine, under V8's baseline compiler only (--liftoff
 * --no-wasm-tier-up) and under its optimizing compiler only (--no-liftoff), both in child processes, and in the
 * native build (wasm2c + C compiler) when it is built. `npm run golden` regenerates the files deliberately.
 */
import { describe, it, expect } from "vitest";
import { existsSync } from "node:fs";
import { SPECS } from "../harness/verify/specs/index.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { traceSuite, tracesInChild, type Trace } from "../harness/verify/compare-builds.js";
import { goldenDifferences, goldenPath } from "../harness/verify/golden.js";
import { loadNative } from "../harness/module/builds.js";
import { prepareNative, REQUIRE_NATIVE } from "./builds-helpers.js";
import { release } from "./helpers.js";
import { toBits, fromBits } from "../harness/core/float.js";
import { noteSkip } from "./support/skips.js";

const specs = SPECS.filter((s) => existsSync(vectorPath(s.suite)));
const vectors = new Map(specs.map((s) => [s.suite, readVectors(vectorPath(s.suite))]));

function check(traces: readonly Trace[]): void {
  const diffs = specs.flatMap((s, i) => goldenDifferences(s, traces[i]!));
  expect(diffs, diffs.join("\n")).toEqual([]);
}

describe("determinism golden files", () => {
  it("every suite with a vector file has a golden file", () => {
    const missing = specs.filter((s) => !existsSync(goldenPath(s.suite))).map((s) => s.suite);
    expect(missing, `run 'npm run golden' for: ${missing.join(", ")}`).toEqual([]);
  });

  it("release module, this engine (default tiering): the golden bits", () => {
    const k = release();
    check(specs.map((s) => traceSuite(s, k, vectors.get(s.suite)!)));
  });

  it("release module under the baseline compiler only (--liftoff --no-wasm-tier-up): the golden bits", () => {
    check(tracesInChild("baseline", specs, vectors));
  });

  it("release module under the optimizing compiler only (--no-liftoff): the golden bits", () => {
    check(tracesInChild("optimizing", specs, vectors));
  });

  it("native build (wasm2c): the golden bits, whenever the toolchain is here (built first if needed)", (ctx) => {
    const why = prepareNative();
    if (why) {
      if (REQUIRE_NATIVE) throw new Error(`AREAL_REQUIRE_NATIVE=1 but the native build cannot run: ${why}`);
      noteSkip("native golden bits (tests/fuzz-determinism-golden)", why, "apt-get install wabt gcc, then npm run build:native");
      ctx.skip();
      return;
    }
    const k = loadNative();
    check(specs.map((s) => traceSuite(s, k, vectors.get(s.suite)!)));
  });

  it("a changed bit is caught and named (mutant)", () => {
    const s = specs.find((x) => x.suite === "kepler-parabolic") ?? specs[0]!;
    const t = traceSuite(s, release(), vectors.get(s.suite)!);
    const r = t.statuses.findIndex((st) => st === 0);
    t.values[r * t.outputs] = fromBits(toBits(t.values[r * t.outputs]!) ^ 1n); // the last bit flipped
    expect(goldenDifferences(s, t).join("\n")).toMatch(new RegExp(`${s.suite} row ${r + 1} \\(f64\\)`));
  });
});
