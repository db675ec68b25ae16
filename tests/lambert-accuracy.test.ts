/**
 * Lambert's problem against the independent references of vectors/lambert.csv (harness/reference/lambert.ts:
 * p-iteration and shooting at 50 digits), and closure: every solution, propagated with the universal-variable
 * kernel `propagate` over the time of flight, lands on r2.
 */
import { describe, it, expect } from "vitest";
import { release, mutant } from "./helpers.js";
import { runSuite } from "../harness/verify/check.js";
import { lambertSpec } from "../harness/verify/specs/lambert.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { limitsFor } from "../harness/verify/limits.js";
import type { Kernels } from "../harness/module/load.js";

const v = readVectors(vectorPath("lambert"));
const c = (name: string): number => col(v, name);
const INPUTS = lambertSpec.inputs.map(c);
const V1 = ["v1x_ref", "v1y_ref", "v1z_ref"].map(c);
const V2 = ["v2x_ref", "v2y_ref", "v2z_ref"].map(c);
const COND1 = c("cond_v1");
/** Cases next to the 180-degree transfer, where the limit follows the conditioning (the plane is barely defined). */
const nearPi = (tag: string): boolean => tag.startsWith("near-180") || tag.startsWith("edge180");
/** The accuracy target away from the 180-degree transfer, and its closure target. */
const TARGET = 1e-11;
const CLOSURE = 1e-10;

const norm = (a: readonly number[]): number => Math.hypot(a[0]!, a[1]!, a[2]!);
const diff = (a: readonly number[], b: readonly number[]): number[] => [a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!];

function solve(k: Kernels, row: readonly number[]): { status: number; v1: number[]; v2: number[]; iterations: number } {
  const status = k.call("lambert", INPUTS.map((j) => row[j]!));
  return { status, v1: Array.from(k.out.slice(0, 3)), v2: Array.from(k.out.slice(3, 6)), iterations: k.out[6]! };
}

describe("lambert: accuracy against the references", () => {
  it("the release build passes the suite (limits in vectors/limits.json)", () => {
    const r = runSuite(lambertSpec, release());
    expect(r.reasons).toEqual([]);
    expect(r.pass).toBe(true);
    expect(r.cases).toBe(v.values.length);
    expect(r.maxIterations).toBeLessThanOrEqual(limitsFor("lambert", "f64").max_iterations!);
  });

  it(`away from the 180-degree transfer: |v1 - v1_ref| / |v1_ref| <= ${TARGET} and |v2 - v2_ref| / |v2_ref| <= ${TARGET} on every case, with no widening`, () => {
    const k = release();
    let worst = 0;
    let counted = 0;
    v.values.forEach((row, r) => {
      if (nearPi(v.tags[r]!)) return;
      const s = solve(k, row);
      expect(s.status).toBe(0);
      const e1 = norm(diff(s.v1, V1.map((j) => row[j]!))) / norm(V1.map((j) => row[j]!));
      const e2 = norm(diff(s.v2, V2.map((j) => row[j]!))) / norm(V2.map((j) => row[j]!));
      worst = Math.max(worst, e1, e2);
      counted++;
    });
    expect(counted).toBeGreaterThan(800);
    expect(worst).toBeLessThanOrEqual(TARGET);
  });

  it("every revolution count 0..5, both ways, both branches, both senses, hyperbolas and the near-parabolic band are present", () => {
    const tags = new Set(v.tags);
    for (const t of ["ellipse", "hyperbola", "near-parabola", "rev1", "rev2", "rev3", "rev4", "rev5"]) {
      expect(tags.has(`${t}-short`)).toBe(true);
      expect(tags.has(`${t}-long`)).toBe(true);
    }
    const revs = new Set(v.values.map((row) => row[c("revs")]));
    expect([...revs].sort()).toEqual([0, 1, 2, 3, 4, 5]);
    const multi = v.values.filter((row) => row[c("revs")]! >= 1);
    expect(new Set(multi.map((row) => row[c("branch")])).size).toBe(2);
    expect(new Set(v.values.map((row) => row[c("retrograde")])).size).toBe(2);
    // The edges of the transfer angle: next to 0, 180 and 360 degrees.
    for (const t of ["edge0-short", "edge360-long", "edge180-short", "edge180-long"]) expect(tags.has(t)).toBe(true);
  });

  it("a mutant 1e-10 off in v1 on the multi-revolution cases only fails the suite", () => {
    const k = release();
    const m = mutant(k, (name, args, out, st) => {
      if (name === "lambert" && args[8]! >= 1) out[0] = out[0]! + 1e-10 * norm(Array.from(out.slice(0, 3)));
      return st;
    });
    const r = runSuite(lambertSpec, m);
    expect(r.pass).toBe(false);
    expect(r.metrics[0]!.worst!.inputs.revs).toBeGreaterThanOrEqual(1);
  });
});

describe("lambert: closure with the universal-variable propagator", () => {
  it(`on every vector case, propagate(r1, v1, tof) lands on r2 within ${CLOSURE} relative and arrives with v2`, () => {
    const k = release();
    let worstR = 0;
    let worstV = 0;
    let worstCond = 0;
    v.values.forEach((row, r) => {
      const s = solve(k, row);
      expect(s.status).toBe(0);
      const [mu, r1x, r1y, r1z, r2x, r2y, r2z, tof] = INPUTS.map((j) => row[j]!);
      const st = k.call("propagate", [mu!, r1x!, r1y!, r1z!, s.v1[0]!, s.v1[1]!, s.v1[2]!, tof!]);
      expect(st).toBe(0);
      const r2 = [r2x!, r2y!, r2z!];
      const eR = norm(diff(Array.from(k.out.slice(0, 3)), r2)) / norm(r2);
      const eV = norm(diff(Array.from(k.out.slice(3, 6)), s.v2)) / norm(s.v2);
      worstR = Math.max(worstR, eR);
      if (!nearPi(v.tags[r]!)) worstV = Math.max(worstV, eV);
      worstCond = Math.max(worstCond, row[COND1]!);
    });
    expect(worstR).toBeLessThanOrEqual(CLOSURE);
    expect(worstV).toBeLessThanOrEqual(CLOSURE);
    expect(worstCond).toBeGreaterThan(0);
  });
});
