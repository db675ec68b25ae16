/**
 * `areal check`: run vector suites through a build and compare with the references, against the limits in
 * vectors/limits.json. One row per suite; the worst case is kept with its inputs so it can be replayed.
 */
import { readVectors, vectorPath, col, type VectorSet } from "./vectors.js";
import { findRoutine, type Routine } from "../module/routines.js";
import type { Kernels } from "../module/load.js";
import { limitsFor, type Limits } from "./limits.js";
import { ulpDistance, ulpDistance32, singlePrecisionLoss } from "../core/float.js";
import { isOk, statusWord, abiViolation, abiViolationMessage } from "../module/status.js";
import type { VectorSpec, Comparison } from "./specs/types.js";
import { statSync } from "node:fs";
import { WorkerPool, type KernelSource } from "../core/pool.js";

export interface Worst {
  readonly row: number;
  readonly tag: string;
  readonly inputs: Readonly<Record<string, number>>;
  readonly got: number;
  readonly want: number;
}

export interface MetricResult {
  readonly output: string;
  readonly metric: Comparison["metric"];
  /** The largest error over the cases (ULP, relative or absolute, per metric). */
  readonly max: number;
  /** The largest error divided by the case's limit (<= 1 passes). */
  readonly maxRatio: number;
  /** The largest absolute difference. */
  readonly maxAbs: number;
  readonly worst?: Worst;
}

export type Verdict = "pass" | "fail" | "not-applicable";

export interface SuiteResult {
  readonly suite: string;
  readonly routine: string;
  readonly build: string;
  readonly cases: number;
  /** Cases whose inputs the build cannot represent exactly (single precision), so not compared. */
  readonly skipped: number;
  /** Cases that returned a failure status. */
  readonly statusFailures: number;
  readonly firstStatusFailure?: { row: number; status: string; inputs: Record<string, number> };
  readonly metrics: readonly MetricResult[];
  readonly maxIterations?: number;
  readonly meanIterations?: number;
  /** iterations -> number of cases. */
  readonly iterationHistogram?: Readonly<Record<number, number>>;
  readonly limits: Limits;
  /** False when no case could be given to this build exactly (every case skipped): not counted as pass or fail. */
  readonly applicable: boolean;
  /** `pass`, `fail`, or `not-applicable` (every case skipped): a suite that did not run is neither pass nor fail. */
  readonly verdict: Verdict;
  /** verdict === "pass" (a suite that did not run has not passed). */
  readonly pass: boolean;
  /** Plain reasons for a failure. */
  readonly reasons: readonly string[];
  /**
   * Single-precision build: of the rows skipped as not exact in f32, those whose inputs would also lose their
   * meaning (core/float.ts singlePrecisionLoss): rows in all under "rows", and rows per kind of loss.
   */
  readonly lostInSingle?: Readonly<Record<string, number>>;
}

/** Arguments for a routine from a row of a vector file (inputs matched by column name). */
function argIndices(routine: Routine, v: VectorSet): number[] {
  return routine.inputs.map((inp) => col(v, inp.name));
}

/** One compared output on one case, as runSuite's `onCase` sees it (the report's per-case plots). */
export interface CaseError {
  readonly row: number;
  readonly output: string;
  /** The error in the comparison's metric, and this case's limit in the same unit. */
  readonly err: number;
  readonly limit: number;
  /** The case's conditioning column, when the comparison names one. */
  readonly cond?: number;
}

/** Run one suite against a loaded build. `rows` limits the run to some row indices (all by default). */
export function runSuite(spec: VectorSpec, k: Kernels, opts: { rows?: readonly number[]; vectors?: VectorSet; limits?: Limits; onCase?: (c: CaseError) => void } = {}): SuiteResult {
  const routine = findRoutine(spec.routine);
  if (!routine) throw new Error(`suite ${spec.suite}: unknown routine ${spec.routine}`);
  const v = opts.vectors ?? readVectors(vectorPath(spec.suite));
  const limits = opts.limits ?? limitsFor(spec.suite, k.label === "f32" ? "f32" : "f64");
  const single = k.realBytes === 4;
  const argCols = argIndices(routine, v);
  const outIndex = new Map(routine.outputs.map((o, i) => [o, i]));
  const iterSlot = spec.iterations !== undefined ? outIndex.get(spec.iterations) : undefined;
  const cmp = spec.compare.map((c) => {
    const slot = outIndex.get(c.output);
    if (slot === undefined) throw new Error(`suite ${spec.suite}: routine ${routine.name} has no output ${c.output}`);
    // A vector comparison (group/refGroup): the error is |got - want| / |want| over the group's columns.
    const slots = c.group?.map((o) => outIndex.get(o) ?? -1);
    if (slots?.includes(-1)) throw new Error(`suite ${spec.suite}: routine ${routine.name} lacks an output of group ${c.group!.join(",")}`);
    const refs = c.refGroup?.map((o) => col(v, o));
    return { c, slot, ref: col(v, c.ref), cond: c.cond ? col(v, c.cond) : -1, revs: c.revs ? col(v, c.revs) : -1, scale: c.scale ? col(v, c.scale) : -1, slots, refs };
  });
  const acc = cmp.map(() => ({ max: 0, maxRatio: 0, maxAbs: 0, worst: undefined as Worst | undefined }));
  const rows = opts.rows ?? v.values.map((_, i) => i);
  const hist: Record<number, number> = {};
  let iterSum = 0;
  let iterMax = 0;
  let statusFailures = 0;
  let abiViolations = 0;
  let firstViolation: string | undefined;
  let skipped = 0;
  const lost: Record<string, number> = {};
  let firstFail: SuiteResult["firstStatusFailure"];
  const args: number[] = new Array(argCols.length).fill(0);
  const inputsOf = (r: number): Record<string, number> => Object.fromEntries(routine.inputs.map((inp, i) => [inp.name, v.values[r]![argCols[i]!]!]));
  for (const r of rows) {
    const row = v.values[r]!;
    let representable = true;
    for (let i = 0; i < argCols.length; i++) {
      const x = row[argCols[i]!]!;
      args[i] = x;
      // A single-precision build is compared only where its inputs are exact f32 values (normal ones): the
      // references are for the exact double inputs, and rounding an input first would change the problem.
      if (single && (Math.fround(x) !== x || (x !== 0 && Math.abs(x) < 1.1754943508222875e-38))) representable = false;
    }
    if (!representable) {
      skipped++;
      countLoss(routine, args, lost);
      continue;
    }
    const status = k.call(routine.exportName, args);
    // docs/abi.md's promises (a known status; finite outputs and a whole iteration count with a success).
    const broken = abiViolation(status, k.out, routine.outputs);
    if (broken !== undefined) {
      abiViolations++;
      firstViolation ??= abiViolationMessage(k.label, routine.exportName, args, broken);
      continue;
    }
    if (!isOk(status)) {
      statusFailures++;
      firstFail ??= { row: r, status: statusWord(status), inputs: inputsOf(r) };
      continue;
    }
    if (iterSlot !== undefined) {
      const it = k.out[iterSlot]!;
      hist[it] = (hist[it] ?? 0) + 1;
      iterSum += it;
      if (it > iterMax) iterMax = it;
    }
    cmp.forEach((m, j) => {
      let got = k.out[m.slot]!;
      let want = row[m.ref]!;
      if (Number.isNaN(want)) return; // no reference for this output on this case
      const a = acc[j]!;
      let absErr = Math.abs(got - want);
      if (m.slots && m.refs) {
        // Vector: want becomes |want| and got |want| + |got - want| (what the worst-case line shows).
        let d2 = 0;
        let w2 = 0;
        m.slots.forEach((sl, q) => {
          const w = row[m.refs![q]!]!;
          d2 += (k.out[sl]! - w) ** 2;
          w2 += w * w;
        });
        absErr = Math.sqrt(d2);
        want = Math.sqrt(w2);
        got = want + absErr;
      }
      // An abs comparison with a scale column is judged relative to that case's scale (transition: the largest
      // entry of the scale-free Phi~); every other metric as the suite says.
      const err = m.c.metric === "abs" && m.scale >= 0 ? caseError("abs", got, want, absErr / Math.abs(row[m.scale]!), single) : caseError(m.c.metric, got, want, absErr, single);
      const lim = caseLimit(m.c, limits, m.cond >= 0 ? row[m.cond]! : undefined, m.revs >= 0 ? row[m.revs]! : 0, want);
      const ratio = lim > 0 ? err / lim : err > 0 ? Infinity : 0;
      opts.onCase?.({ row: r, output: m.c.output, err, limit: lim, ...(m.cond >= 0 ? { cond: row[m.cond]! } : {}) });
      if (absErr > a.maxAbs) a.maxAbs = absErr;
      if (err > a.max) a.max = err;
      if (ratio > a.maxRatio || (a.worst === undefined && err > 0)) {
        a.maxRatio = Math.max(ratio, a.maxRatio);
        a.worst = { row: r, tag: v.tags[r]!, inputs: inputsOf(r), got, want };
      }
    });
  }
  const counted = rows.length - skipped - statusFailures - abiViolations;
  const reasons: string[] = [];
  if (abiViolations > 0) reasons.push(`${abiViolations} case(s) broke the ABI (first: ${firstViolation})`);
  if (statusFailures > 0) reasons.push(`${statusFailures} case(s) returned a failure status (first: row ${firstFail!.row}, ${firstFail!.status})`);
  const metrics: MetricResult[] = cmp.map((m, j) => ({ output: m.c.output, metric: m.c.metric, ...acc[j]! }));
  for (const m of metrics) if (m.maxRatio > 1) reasons.push(`${m.output}: error ${fmt(m.max)} ${m.metric} exceeds the limit`);
  if (limits.max_iterations !== undefined && iterMax > limits.max_iterations) reasons.push(`iterations ${iterMax} > ${limits.max_iterations}`);
  // A suite whose inputs this build cannot take exactly (f64 inputs on the f32 build) is not applicable.
  const applicable = !(rows.length > 0 && skipped === rows.length);
  if (applicable && rows.length > 0 && counted === 0) reasons.push("no case could be checked");
  return {
    suite: spec.suite,
    routine: routine.name,
    build: k.label,
    cases: rows.length,
    skipped,
    statusFailures,
    firstStatusFailure: firstFail,
    metrics,
    maxIterations: iterSlot !== undefined ? iterMax : undefined,
    meanIterations: iterSlot !== undefined && counted > 0 ? iterSum / counted : undefined,
    iterationHistogram: iterSlot !== undefined ? hist : undefined,
    limits,
    applicable,
    verdict: reasons.length > 0 ? "fail" : applicable ? "pass" : "not-applicable",
    pass: reasons.length === 0 && applicable,
    reasons,
    ...(single && Object.keys(lost).length > 0 ? { lostInSingle: lost } : {}),
  };
}

/** Count a row's single-precision losses of meaning: once under "rows", once per kind. */
function countLoss(routine: Routine, args: readonly number[], lost: Record<string, number>): void {
  const kinds = routine.inputs.flatMap((inp, i) => (inp.choices ? [] : [singlePrecisionLoss(inp.name, args[i]!)])).filter((w): w is string => w !== undefined);
  if (kinds.length === 0) return;
  lost.rows = (lost.rows ?? 0) + 1;
  for (const w of new Set(kinds)) lost[w] = (lost[w] ?? 0) + 1;
}

/**
 * The error of one output on one case in the comparison's metric. A NaN output counts as an infinite error
 * whatever the metric (a NaN would otherwise compare as no error at all: NaN > limit is false).
 */
export function caseError(metric: Comparison["metric"], got: number, want: number, absErr: number, single: boolean): number {
  if (Number.isNaN(got) || Number.isNaN(absErr)) return Infinity;
  if (metric === "ulp") return single ? ulpDistance32(got, Math.fround(want)) : ulpDistance(got, want);
  if (metric === "rel") return want === 0 ? absErr : absErr / Math.abs(want);
  return absErr;
}

/**
 * The limit of one output on one case: the suite's limit for the metric, widened to cond_factor * cond where the
 * comparison names a conditioning column (`cond`, the value of that column on this case), and for `rel` scaled by
 * (1 + revs). A `condRelative` column holds a relative figure: on an `abs` comparison it widens by
 * cond_factor * cond * |want| (an output near zero, such as e of a nearly circular orbit, is compared absolutely).
 * The widening stops at the limits' `cond_cap` (in the metric's units) where one is set.
 */
export function caseLimit(c: Comparison, limits: Limits, cond: number | undefined, revs: number, want: number): number {
  const scaled = cond === undefined ? 0 : (limits.cond_factor ?? 0) * cond * (c.condRelative && c.metric === "abs" ? Math.abs(want) : 1);
  const widen = Math.min(scaled, limits.cond_cap ?? Infinity);
  if (c.metric === "ulp") return Math.max(limits.max_ulp ?? 0, widen);
  if (c.metric === "rel") return Math.max((limits.max_rel ?? 0) * (1 + Math.abs(revs)), widen);
  return Math.max(limits.max_abs ?? 0, widen);
}

function fmt(x: number): string {
  if (x === 0) return "0";
  if (Number.isInteger(x) && x < 1e6) return String(x);
  return x.toPrecision(3);
}

/** Short text of a number for tables. */
export { fmt as formatFigure };

/**
 * Vector files smaller than this in all are checked in this thread whatever the number of workers: starting
 * workers costs more than it saves (the built-in suites, 8 MB, take 1.0 s in one thread and 1.2 s with two
 * workers on the 2-core reference machine).
 */
export const CHECK_WORKERS_MIN_BYTES = 32 << 20;

/** One suite for a worker thread, with the limits to hold it to (areal's own for the build when absent). */
export interface CheckJob {
  readonly suite: string;
  readonly limits?: Limits;
}

/**
 * Run suites on `k`, or spread over worker threads (each loading `load`) when their vector files add up to
 * `minBytes` or more: one suite per job, results in suite order, so the table and JSON are the same for any
 * number of workers. `limitsOf` gives limits other than areal's own (a user's limits file, an external module's
 * policy): they are resolved here and sent with each suite's job.
 */
export async function runSuitesOn(specs: readonly VectorSpec[], k: Kernels, load: KernelSource, workers: number, minBytes = CHECK_WORKERS_MIN_BYTES, limitsOf?: (suite: string) => Limits): Promise<SuiteResult[]> {
  const bytes = specs.reduce((sum, s) => sum + (statSync(vectorPath(s.suite), { throwIfNoEntry: false })?.size ?? 0), 0);
  const n = bytes < minBytes ? 1 : Math.min(workers, specs.length);
  if (n <= 1) return specs.map((s) => runSuite(s, k, { limits: limitsOf?.(s.suite) }));
  const pool = await WorkerPool.start(n, { kind: "check", load });
  const results: SuiteResult[] = [];
  const jobs: CheckJob[] = specs.map((s) => ({ suite: s.suite, limits: limitsOf?.(s.suite) }));
  try {
    await pool.runOrdered<CheckJob, SuiteResult>(jobs[Symbol.iterator](), (r, job) => {
      if (!r.ok) throw new Error(`suite ${job.suite}: ${r.message}`);
      results.push(r.value);
    });
  } finally {
    await pool.close();
  }
  return results;
}
