/**
 * Iteration caps: every solver loop has a named cap, and running out returns `not-converged` with the cap in the
 * iterations slot. No vector case comes near the real caps (elliptic 6, hyperbolic 8, universal 40; measured at most
 * 1, 4 and 3), so this test builds a scratch copy of the project (never the working tree) with the caps lowered
 * (elliptic 1, hyperbolic 2, universal 2) and, for the elliptic solver, the starter replaced by E = M so that a
 * case needs more than one step. A case that needs exactly the cap must still succeed, with the release build's
 * answer; a case that needs one step more must return `not-converged` and report the cap. An off-by-one in a
 * loop bound (`<` for `<=`) fails the first half; a cap that is not reported fails the second.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { join } from "node:path";
import { scratchCopy, removeScratch, applyPattern, buildTargets } from "../scripts/mutants.mjs";
import { ROOT } from "../harness/core/paths.js";
import { loadFile, type Kernels } from "../harness/module/load.js";
import { slotsOf, findRoutine } from "../harness/module/routines.js";
import { statusCode } from "../harness/module/status.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { release } from "./helpers.js";

/** The lowered caps, as textual changes of the kernel files in the scratch copy. */
const CHANGES: readonly [string, RegExp, string][] = [
  ["assembly/kepler_elliptic.ts", /ELLIPTIC_MAX_ITER: i32 = \d+;/, "ELLIPTIC_MAX_ITER: i32 = 1;"],
  ["assembly/kepler_elliptic.ts", /return E0;/, "return mh;"], // the starter (both paths) returns E = M
  ["assembly/kepler_hyperbolic.ts", /HYPERBOLIC_MAX_ITER: i32 = \d+;/, "HYPERBOLIC_MAX_ITER: i32 = 2;"],
  ["assembly/universal.ts", /UNIVERSAL_MAX_ITER: i32 = \d+;/, "UNIVERSAL_MAX_ITER: i32 = 2;"],
];

let dir = "";
let capped: Kernels;
const NOT_CONVERGED = statusCode("not-converged")!;

beforeAll(async () => {
  dir = scratchCopy(ROOT);
  const { readFileSync } = await import("node:fs");
  for (const [file, re, to] of CHANGES) {
    const text = readFileSync(join(dir, file), "utf8");
    const m = text.match(re);
    if (!m) throw new Error(`${file}: ${re} not found (the kernel changed: update this test)`);
    expect(applyPattern(dir, file, m[0], to)).toBe("applied");
  }
  const b = await buildTargets(dir, ["release"]);
  if (b.code !== 0) throw new Error(`scratch build failed:\n${b.out}`);
  capped = loadFile(join(dir, "build", "areal.wasm"), "capped");
}, 600_000);

afterAll(() => {
  if (dir) removeScratch(dir);
});

/** Inputs of row `i` of a suite's vector file, in the routine's argument order. */
function rowInputs(suite: string, routine: string, i: number): number[] {
  const v = readVectors(vectorPath(suite));
  return findRoutine(routine)!.inputs.map((inp) => v.values[i]![col(v, inp.name)]!);
}

describe("iteration caps (scratch build with the caps lowered)", () => {
  it("elliptic, cap 1, starter E = M: a one-step case succeeds with the release answer; a harder one is not-converged and reports 1", () => {
    const S = slotsOf("kepler_elliptic", "E", "iterations");
    const easy = [0.0002882925347429399, -0.4085408916096655]; // one step from E = M (|E - M| ~ 1e-4)
    expect(capped.call("kepler_elliptic", easy)).toBe(0);
    expect(capped.out[S.iterations]).toBe(1);
    const E = capped.out[S.E]!;
    expect(release().call("kepler_elliptic", easy)).toBe(0);
    expect(Math.abs(E - release().out[S.E]!)).toBeLessThanOrEqual(4 * 2 ** -52);
    expect(capped.call("kepler_elliptic", [0.9, 0.5])).toBe(NOT_CONVERGED);
    expect(capped.out[S.iterations]).toBe(1);
  });

  it("hyperbolic, cap 2: a 2-step vector case succeeds bit for bit; a 3-step one is not-converged and reports 2", () => {
    const S = slotsOf("kepler_hyperbolic", "H", "iterations");
    const two = rowInputs("kepler-hyperbolic", "kepler-hyperbolic", 78);
    const three = rowInputs("kepler-hyperbolic", "kepler-hyperbolic", 0);
    expect(release().call("kepler_hyperbolic", two)).toBe(0);
    expect(release().out[S.iterations]).toBe(2);
    const want = release().out[S.H];
    expect(capped.call("kepler_hyperbolic", two)).toBe(0);
    expect([capped.out[S.iterations], capped.out[S.H]]).toEqual([2, want]);
    expect(release().call("kepler_hyperbolic", three)).toBe(0);
    expect(release().out[S.iterations]).toBe(3);
    expect(capped.call("kepler_hyperbolic", three)).toBe(NOT_CONVERGED);
    expect(capped.out[S.iterations]).toBe(2);
  });

  it("universal (propagate), cap 2: a 2-step vector case succeeds bit for bit; a 3-step one is not-converged and reports 2", () => {
    const S = slotsOf("propagate", "rx", "iterations");
    const two = rowInputs("propagate", "propagate", 6);
    const three = rowInputs("propagate", "propagate", 76);
    expect(release().call("propagate", two)).toBe(0);
    expect(release().out[S.iterations]).toBe(2);
    const want = release().out[S.rx];
    expect(capped.call("propagate", two)).toBe(0);
    expect([capped.out[S.iterations], capped.out[S.rx]]).toEqual([2, want]);
    expect(release().call("propagate", three)).toBe(0);
    expect(release().out[S.iterations]).toBe(3);
    expect(capped.call("propagate", three)).toBe(NOT_CONVERGED);
    expect(capped.out[S.iterations]).toBe(2);
  });
});
