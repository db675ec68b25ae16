/**
 * The report's per-family data: every case of a family's vector suite with its error against the high-precision
 * reference and its own limit (runSuite's onCase), placed along the input that matters for that family —
 * hyperbolic Kepler over (e - 1, |M|), propagation against the problem's conditioning, Lambert against the
 * transfer angle with the revolution count, the transition matrix per orbit class. Each returns a string saying
 * why when its data cannot be had. Drawing is plots.ts, the page html.ts.
 */
import type { Kernels } from "../module/load.js";
import { findSpec } from "../verify/specs/index.js";
import { findRoutine } from "../module/routines.js";
import { runSuite, type CaseError, type SuiteResult } from "../verify/check.js";
import { readVectors, vectorPath, col, type VectorSet } from "../verify/vectors.js";
import { existsSync } from "node:fs";
import type { Cell } from "./plots.js";

/** One case of a family plot: where it sits (x), its error over its limit, its class and output. */
export interface CasePoint {
  readonly x: number;
  /** error / limit (a case passes at <= 1). */
  readonly ratio: number;
  readonly err: number;
  readonly group: string;
  readonly output: string;
  readonly tag: string;
}

/** The suite a build is checked on: the `-f32in` companion for a single-precision build when there is one. */
function suiteFor(base: string, k: Kernels): string {
  return k.realBytes === 4 && findSpec(`${base}-f32in`) ? `${base}-f32in` : base;
}

/** Run a family's suite with a callback per compared case; the suite's result and its vectors. */
function perCase(base: string, k: Kernels, take: (v: VectorSet, c: CaseError) => void): { result: SuiteResult; v: VectorSet } | string {
  const suite = suiteFor(base, k);
  const spec = findSpec(suite);
  if (!spec || !existsSync(vectorPath(suite))) return `the ${suite} vector suite is missing`;
  const routineExport = findRoutine(spec.routine)?.exportName ?? spec.routine;
  if (!k.has(routineExport)) return `${k.label} has no ${routineExport} export`;
  const v = readVectors(vectorPath(suite));
  const result = runSuite(spec, k, { vectors: v, onCase: (c) => take(v, c) });
  if (!result.applicable) return `no case of ${suite} has inputs exact in the precision of ${k.label}`;
  return { result, v };
}

/** Bin edges from a to b in n cells. */
const linspace = (a: number, b: number, n: number): number[] => Array.from({ length: n + 1 }, (_, i) => a + ((b - a) * i) / n);

/** Largest error (ulp, whole numbers) of the hyperbolic solver per cell of (log10(e - 1), log10 |M|). */
export function hyperbolicMap(k: Kernels): { cells: Cell[]; result: SuiteResult } | string {
  const pts: { x: number; y: number; v: number }[] = [];
  const got = perCase("kepler-hyperbolic", k, (v, c) => {
    const row = v.values[c.row]!;
    const e = row[col(v, "e")]!;
    const M = Math.abs(row[col(v, "M")]!);
    pts.push({ x: Math.max(-17, Math.log10(e - 1)), y: M === 0 ? -20 : Math.max(-20, Math.log10(M)), v: c.err });
  });
  if (typeof got === "string") return got;
  const xs = linspace(-17, 311, 41);
  const ys = linspace(-20, 310, 33);
  const idx = (edges: readonly number[], x: number): number => Math.min(edges.length - 2, Math.max(0, edges.findIndex((_, i) => i + 1 < edges.length && x < edges[i + 1]!)));
  const cells = new Map<string, Cell & { value: number; cases: number }>();
  for (const p of pts) {
    const i = idx(xs, p.x);
    const j = idx(ys, p.y);
    const key = `${i},${j}`;
    const old = cells.get(key);
    cells.set(key, { x0: xs[i]!, x1: xs[i + 1]!, y0: ys[j]!, y1: ys[j + 1]!, value: Math.max(old?.value ?? 0, p.v), cases: (old?.cases ?? 0) + 1 });
  }
  return { cells: [...cells.values()], result: got.result };
}

/** The orbit class of a case from its tag, for a legend: "e0999" -> "e = 0.999"; every edge case "edge cases". */
function classOf(tag: string): string {
  if (tag.startsWith("edge")) return "edge cases";
  const e = /^e0(\d+)$/.exec(tag);
  return e ? `e = 0.${e[1]}` : tag || "untagged";
}

/** The legend's name of a compared output: the vector it heads, or the block of the transition matrix. */
const BLOCKS: Readonly<Record<string, string>> = { rx: "r", vx: "v", v1x: "v1", v2x: "v2", phi_11: "Phi~ block dr/dr0", phi_14: "Phi~ block dr/dv0", phi_41: "Phi~ block dv/dr0", phi_44: "Phi~ block dv/dv0" };
const outputLabel = (o: string): string => BLOCKS[o] ?? o;

/** Run a family's suite and place each compared case: x and class from `place`, its error over its own limit. */
function casePoints(base: string, k: Kernels, place: (v: VectorSet, c: CaseError) => { x: number; group: string }): { points: CasePoint[]; result: SuiteResult } | string {
  const points: CasePoint[] = [];
  const got = perCase(base, k, (v, c) => {
    const { x, group } = place(v, c);
    points.push({ x, ratio: c.limit > 0 ? c.err / c.limit : 0, err: c.err, group, output: outputLabel(c.output), tag: v.tags[c.row]! });
  });
  return typeof got === "string" ? got : { points, result: got.result };
}

/** Propagation: each case's error over its limit against the conditioning of r (both r and v compared). */
export function propagationCases(k: Kernels): { points: CasePoint[]; result: SuiteResult } | string {
  return casePoints("propagate", k, (v, c) => ({ x: Math.max(c.cond ?? 0, 1e-17), group: classOf(v.tags[c.row]!) }));
}

/** Lambert: each case's error over its limit against the transfer angle (deg, 0 to 360), grouped by revolutions. */
export function lambertCases(k: Kernels): { points: CasePoint[]; result: SuiteResult } | string {
  return casePoints("lambert", k, (v, c) => {
    const row = v.values[c.row]!;
    const g = (n: string): number => row[col(v, n)]!;
    const r1 = [g("r1x"), g("r1y"), g("r1z")];
    const r2 = [g("r2x"), g("r2y"), g("r2z")];
    const dot = r1[0]! * r2[0]! + r1[1]! * r2[1]! + r1[2]! * r2[2]!;
    const cz = r1[0]! * r2[1]! - r1[1]! * r2[0]!;
    const cross = Math.hypot(r1[1]! * r2[2]! - r1[2]! * r2[1]!, r1[2]! * r2[0]! - r1[0]! * r2[2]!, cz);
    let angle = (Math.atan2(cross, dot) * 180) / Math.PI;
    // The transfer goes the long way when the motion's sense and the z of r1 x r2 disagree.
    if ((cz < 0) !== (g("retrograde") !== 0)) angle = 360 - angle;
    return { x: angle, group: String(g("revs")) };
  });
}

/** Transition matrix: each case's error over its limit, per orbit class (the x is the class's place). */
export function transitionCases(k: Kernels): { points: CasePoint[]; result: SuiteResult } | string {
  return casePoints("transition", k, (v, c) => ({ x: 0, group: classOf(v.tags[c.row]!) }));
}
