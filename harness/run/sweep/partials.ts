/** Summaries of ranges of sweep cases, and merging them (any split of the range gives the same summary). */
import type { Kernels } from "../../module/load.js";
import type { Routine } from "../../module/routines.js";
import { isOk, statusWord, statusCode } from "../../module/status.js";
import { ExactSum, addExact, canonicalSum } from "../../core/exact-sum.js";
import { SweepError, totalCases, gridCases, gridValue, axisValue, unitHash, type Grid } from "./grid.js";
import { ERROR_MODELS } from "./error-models.js";

/** First failures (non-ok statuses) kept, in case order. */
const FAILURES_KEPT = 8;

// running a range of cases

/** One case as it appears in a summary. */
export interface CaseRecord {
  readonly index: number;
  readonly inputs: Readonly<Record<string, number>>;
  readonly status: string;
  /** The first output (null on a failure status). */
  readonly got: number | null;
  readonly iterations?: number;
  /** The error estimate in ULPs (error-model routines, ok status). */
  readonly error?: number;
  /** The correctly rounded value from decimal.js and the ULP distance to it (checked cases only). */
  readonly want?: number;
  readonly ulp?: number;
}

/** What a range of cases adds up to; partials of disjoint ranges merge exactly (mergePartials). */
export interface Partial {
  cases: number;
  status: Record<string, number>;
  iterations: Record<string, number>;
  /** Error-model routines only. */
  error: { checked: number; unverifiable: number; max: number; sum: number[]; worst: CaseRecord[] } | null;
  failures: CaseRecord[];
  /** Cases whose number is a multiple of the sampling step, for the decimal.js checks. */
  samples: CaseRecord[];
}

/** Status codes and iteration counts below this are counted in arrays. */
const SMALL_COUNTS = 256;

/** Order of the worst list: larger error first, then lower case number. */
function worse(a: CaseRecord, b: CaseRecord): number {
  return b.error! - a.error! || a.index - b.index;
}

/** Distance between decimal.js checks, in cases. */
export function sampleStep(g: Grid): number {
  return g.checks === 0 ? 0 : Math.max(1, Math.ceil(totalCases(g) / g.checks));
}

/** Call the routine's export with fixed arity, without spreading an array on every call. */
export function caller(routine: Routine, k: Kernels): (a: readonly number[]) => number {
  const fn = (k.exports as Record<string, unknown>)[routine.exportName];
  if (typeof fn !== "function") {
    if (!k.has(routine.exportName)) throw new SweepError(`${k.label}: the module has no export ${routine.exportName} for routine ${routine.name}`);
    return (a) => k.call(routine.exportName, a);
  }
  const f = fn as (...x: number[]) => number;
  switch (routine.inputs.length) {
    case 1:
      return (a) => f(a[0]!);
    case 2:
      return (a) => f(a[0]!, a[1]!);
    case 3:
      return (a) => f(a[0]!, a[1]!, a[2]!);
    default:
      return (a) => f(...a);
  }
}

/** Run cases [first, end) and summarise them. Runs in a worker thread or in this one. */
export function sweepRange(routine: Routine, g: Grid, k: Kernels, first: number, end: number): Partial {
  const call = caller(routine, k);
  const model = ERROR_MODELS[routine.name];
  const iterSlot = routine.outputs.indexOf("iterations");
  const out = k.out;
  const G = gridCases(g);
  const step = sampleStep(g);
  const names = routine.inputs.map((i) => i.name);
  const args = routine.inputs.map((i) => i.default ?? 0);
  const argOf = g.axes.map((a) => names.indexOf(a.name));
  // Counts by status code and by iteration count: small whole numbers index arrays, anything else a map.
  const statusSmall = new Float64Array(SMALL_COUNTS);
  const iterSmall = new Float64Array(SMALL_COUNTS);
  const statusCounts = new Map<number, number>();
  const iterCounts = new Map<number, number>();
  const sum = new ExactSum();
  let checked = 0;
  let unverifiable = 0;
  let max = 0;
  const worst: CaseRecord[] = [];
  const failures: CaseRecord[] = [];
  const samples: CaseRecord[] = [];
  const record = (i: number, st: number, err?: number): CaseRecord => ({
    index: i,
    inputs: Object.fromEntries(names.map((n, j) => [n, args[j]!])),
    status: statusWord(st),
    got: isOk(st) ? out[0]! : null,
    ...(iterSlot >= 0 && isOk(st) ? { iterations: out[iterSlot]! } : {}),
    ...(err !== undefined && Number.isFinite(err) ? { error: err } : {}),
  });
  // Grid odometer: the per-axis index of case `first`, advanced one case at a time.
  const idx = g.axes.map(() => 0);
  if (first < G) {
    let rest = first;
    for (let d = g.axes.length - 1; d >= 0; d--) {
      idx[d] = rest % g.axes[d]!.count;
      rest = Math.floor(rest / g.axes[d]!.count);
    }
    g.axes.forEach((a, d) => (args[argOf[d]!] = gridValue(a, idx[d]!)));
  }
  for (let i = first; i < end; i++) {
    if (i < G) {
      if (i > first) {
        let d = g.axes.length - 1;
        for (; d >= 0; d--) {
          const a = g.axes[d]!;
          idx[d]!++;
          if (idx[d]! < a.count) {
            args[argOf[d]!] = gridValue(a, idx[d]!);
            break;
          }
          idx[d] = 0;
          args[argOf[d]!] = a.from;
        }
      }
    } else {
      const p = i - G;
      for (let d = 0; d < g.axes.length; d++) args[argOf[d]!] = axisValue(g.axes[d]!, unitHash(g.random!.seed, p, d));
    }
    const st = call(args);
    if (st >= 0 && st < SMALL_COUNTS) statusSmall[st]!++;
    else statusCounts.set(st, (statusCounts.get(st) ?? 0) + 1);
    let err: number | undefined;
    if (isOk(st)) {
      if (iterSlot >= 0) {
        const it = out[iterSlot]!;
        if (it >= 0 && it < SMALL_COUNTS && Number.isInteger(it)) iterSmall[it]!++;
        else iterCounts.set(it, (iterCounts.get(it) ?? 0) + 1);
      }
      if (model) {
        err = model.estimate(args, out[0]!);
        if (Number.isFinite(err)) {
          checked++;
          sum.add(err);
          if (err > max) max = err;
          if (g.worst > 0 && (worst.length < g.worst || err > worst[worst.length - 1]!.error!)) {
            worst.push(record(i, st, err));
            worst.sort(worse);
            if (worst.length > g.worst) worst.pop();
          }
        } else unverifiable++;
      }
    } else if (failures.length < FAILURES_KEPT) failures.push(record(i, st));
    if (step > 0 && i % step === 0) samples.push(record(i, st, err));
  }
  for (let c = 0; c < SMALL_COUNTS; c++) {
    if (statusSmall[c]! > 0) statusCounts.set(c, statusSmall[c]!);
    if (iterSmall[c]! > 0) iterCounts.set(c, iterSmall[c]!);
  }
  const status: Record<string, number> = {};
  for (const [c, n] of statusCounts) status[statusWord(c)] = n;
  const iterations: Record<string, number> = {};
  for (const [it, n] of iterCounts) iterations[String(it)] = n;
  return {
    cases: end - first,
    status: sortStatus(status),
    iterations: sortNumericKeys(iterations),
    error: model ? { checked, unverifiable, max, sum: canonicalSum(sum.partials()), worst } : null,
    failures,
    samples,
  };
}

function sortStatus(s: Record<string, number>): Record<string, number> {
  const code = (w: string): number => statusCode(w) ?? Number(w.replace(/^status-/, ""));
  return Object.fromEntries(Object.entries(s).sort(([a], [b]) => code(a) - code(b)));
}

function sortNumericKeys(s: Record<string, number>): Record<string, number> {
  return Object.fromEntries(Object.entries(s).sort(([a], [b]) => Number(a) - Number(b)));
}

function addCounts(a: Record<string, number>, b: Readonly<Record<string, number>>): Record<string, number> {
  const r = { ...a };
  for (const [k, v] of Object.entries(b)) r[k] = (r[k] ?? 0) + v;
  return r;
}

/** The summary of two disjoint ranges from theirs; the result does not depend on how the cases were split. */
export function mergePartials(a: Partial, b: Partial, g: Grid): Partial {
  let error: Partial["error"] = null;
  if (a.error && b.error) {
    const sum = [...a.error.sum];
    for (const x of b.error.sum) addExact(sum, x);
    error = {
      checked: a.error.checked + b.error.checked,
      unverifiable: a.error.unverifiable + b.error.unverifiable,
      max: Math.max(a.error.max, b.error.max),
      sum: canonicalSum(sum),
      worst: [...a.error.worst, ...b.error.worst].sort(worse).slice(0, g.worst),
    };
  } else if (a.error || b.error) throw new SweepError("cannot merge a summary with error estimates and one without");
  const byIndex = (x: CaseRecord, y: CaseRecord): number => x.index - y.index;
  return {
    cases: a.cases + b.cases,
    status: sortStatus(addCounts(a.status, b.status)),
    iterations: sortNumericKeys(addCounts(a.iterations, b.iterations)),
    error,
    failures: [...a.failures, ...b.failures].sort(byIndex).slice(0, FAILURES_KEPT),
    samples: [...a.samples, ...b.samples].sort(byIndex),
  };
}

/** A summary of no cases. */
export function emptyPartial(routine: Routine): Partial {
  return { cases: 0, status: {}, iterations: {}, error: ERROR_MODELS[routine.name] ? { checked: 0, unverifiable: 0, max: 0, sum: [], worst: [] } : null, failures: [], samples: [] };
}

