/** Sweep files (format, shards, reference checks) and running a sweep on one thread or the worker pool. */
import { existsSync, readFileSync } from "node:fs";
import { createHash } from "node:crypto";
import { BUILD_FILES } from "../../core/paths.js";
import { findRoutine, type Routine } from "../../module/routines.js";
import type { Kernels } from "../../module/load.js";
import { ulpDistance } from "../../core/float.js";
import { REFERENCE_DIGITS } from "../../verify/reference/decimal.js";
import { WorkerPool, type KernelSource } from "../../core/pool.js";
import { SweepError, gridHash, totalCases, type Grid } from "./grid.js";
import { ERROR_MODELS, type ErrorModel } from "./error-models.js";
import { sweepRange, mergePartials, emptyPartial, sampleStep, caller, type CaseRecord, type Partial } from "./partials.js";
import { roundedSum } from "../../core/exact-sum.js";

/** Identifies a sweep file and its layout. */
export const SWEEP_FORMAT = "areal-sweep 1";
/** Cases per job handed to a worker (any value gives the same summary). */
export const SWEEP_CHUNK = 1 << 18;

// the sweep file

/** The module a sweep ran on: its label and, for a module file, the SHA-256 of its bytes. */
export interface ModuleId {
  readonly label: string;
  readonly sha256: string | null;
}

/** A sweep file (`--out part.json`): one shard, or a whole sweep (n = 1), or a merge of shards. */
export interface SweepDoc {
  readonly format: string;
  readonly routine: string;
  readonly module: ModuleId;
  readonly grid: Grid;
  readonly grid_sha256: string;
  readonly cases_total: number;
  readonly shard: { readonly k: number; readonly n: number; readonly first: number; readonly end: number };
  readonly cases: number;
  readonly status: Record<string, number>;
  readonly iterations: Record<string, number>;
  readonly error: {
    readonly measure: string;
    readonly unit: "ulp";
    /** Cases with an estimate (ok status, estimate finite). */
    readonly checked: number;
    readonly unverifiable: number;
    readonly max: number | null;
    readonly mean: number | null;
    /** The exact sum of the estimates, in canonical partials (so shards merge exactly). */
    readonly sum: number[];
    readonly worst: CaseRecord[];
  } | null;
  readonly reference: {
    readonly digits: number;
    /** Every case whose number is a multiple of this is checked, and every case of the worst list. */
    readonly every: number;
    readonly checked: number;
    readonly max_ulp: number | null;
    readonly samples: CaseRecord[];
  } | null;
  readonly failures: CaseRecord[];
}

/** Cases [first, end) of shard k of n (1-based k): contiguous, in order, the same on every machine. */
export function shardRange(total: number, k: number, n: number): { first: number; end: number } {
  const at = (j: number): number => Number((BigInt(j) * BigInt(total)) / BigInt(n));
  return { first: at(k - 1), end: at(k) };
}

/** Parse `k/n`. */
export function parseShard(s: string): { k: number; n: number } {
  const m = /^(\d+)\/(\d+)$/.exec(s);
  if (!m) throw new SweepError(`--shard: '${s}' is not k/n (for example 3/8)`);
  const k = Number(m[1]);
  const n = Number(m[2]);
  if (!(n >= 1 && k >= 1 && k <= n && n <= 1_000_000)) throw new SweepError(`--shard: '${s}' needs 1 <= k <= n <= 1000000`);
  return { k, n };
}

/** Check a case against decimal.js (adds want and ulp); a failure status stays as it is. */
function withReference(c: CaseRecord, routine: Routine, model: ErrorModel): CaseRecord {
  if (c.got === null || c.want !== undefined) return c;
  const args = routine.inputs.map((i) => c.inputs[i.name]!);
  const want = model.reference(args);
  return { ...c, want, ulp: ulpDistance(c.got, want) };
}

/** Turn the summary of a shard's cases into the sweep file, running the decimal.js checks. */
export function finishSweep(routine: Routine, g: Grid, module: ModuleId, shard: SweepDoc["shard"], p: Partial): SweepDoc {
  const model = ERROR_MODELS[routine.name];
  let error: SweepDoc["error"] = null;
  let reference: SweepDoc["reference"] = null;
  if (model && p.error) {
    const worst = p.error.worst.map((c) => withReference(c, routine, model));
    const samples = p.samples.map((c) => withReference(c, routine, model));
    error = {
      measure: model.measure,
      unit: "ulp",
      checked: p.error.checked,
      unverifiable: p.error.unverifiable,
      max: p.error.checked > 0 ? p.error.max : null,
      mean: p.error.checked > 0 ? roundedSum(p.error.sum) / p.error.checked : null,
      sum: p.error.sum,
      worst,
    };
    reference = referenceBlock(g, worst, samples);
  }
  return {
    format: SWEEP_FORMAT,
    routine: routine.name,
    module,
    grid: g,
    grid_sha256: gridHash(g),
    cases_total: totalCases(g),
    shard,
    cases: p.cases,
    status: p.status,
    iterations: p.iterations,
    error,
    reference,
    failures: p.failures,
  };
}

function referenceBlock(g: Grid, worst: readonly CaseRecord[], samples: CaseRecord[]): NonNullable<SweepDoc["reference"]> {
  const all = [...worst, ...samples].filter((c) => c.ulp !== undefined);
  const seen = new Set<number>();
  let max: number | null = null;
  for (const c of all) {
    if (seen.has(c.index)) continue;
    seen.add(c.index);
    if (max === null || c.ulp! > max) max = c.ulp!;
  }
  return { digits: REFERENCE_DIGITS, every: sampleStep(g), checked: seen.size, max_ulp: max, samples };
}

/** The shard summary back as a Partial (for merging sweep files). */
export function docPartial(d: SweepDoc): Partial {
  return {
    cases: d.cases,
    status: d.status,
    iterations: d.iterations,
    error: d.error ? { checked: d.error.checked, unverifiable: d.error.unverifiable, max: d.error.max ?? 0, sum: d.error.sum, worst: d.error.worst } : null,
    failures: d.failures,
    samples: d.reference?.samples ?? [],
  };
}

/** The routine of a sweep, or a SweepError naming the known ones. */
export function sweepRoutine(name: string): Routine {
  const r = findRoutine(name);
  if (!r) throw new SweepError(`unknown routine '${name}'`);
  return r;
}

/** Whether the routine has an error model (a cheap residual and a decimal.js reference). */
export function hasErrorModel(routine: Routine): boolean {
  return ERROR_MODELS[routine.name] !== undefined;
}

/** The sweep file as text: fixed key order, two-space indent, final newline. */
export function formatSweep(d: SweepDoc): string {
  return JSON.stringify(d, null, 2) + "\n";
}

/** Jobs of at most SWEEP_CHUNK cases covering [first, end). */
export function* sweepJobs(first: number, end: number): Generator<{ first: number; end: number }> {
  for (let a = first; a < end; a += SWEEP_CHUNK) yield { first: a, end: Math.min(end, a + SWEEP_CHUNK) };
}

/** How `runSweep` runs. */
export interface SweepOptions {
  readonly shard: { readonly k: number; readonly n: number };
  /** Worker threads (1: everything in this thread). */
  readonly workers: number;
  /** What each worker loads: the same module as `kernels`. */
  readonly load: KernelSource;
  readonly kernels: Kernels;
  readonly module: ModuleId;
  /** Called after each chunk of cases with the cases done and the shard's total. */
  readonly progress?: (done: number, total: number) => void;
}

/** Run one shard of a sweep (all of it with n = 1) and return its file. */
export async function runSweep(routine: Routine, g: Grid, opts: SweepOptions): Promise<SweepDoc> {
  const total = totalCases(g);
  const { first, end } = shardRange(total, opts.shard.k, opts.shard.n);
  let acc = emptyPartial(routine);
  let done = 0;
  const take = (p: Partial): void => {
    acc = mergePartials(acc, p, g);
    done += p.cases;
    opts.progress?.(done, end - first);
  };
  if (opts.workers <= 1 || end - first <= SWEEP_CHUNK) {
    caller(routine, opts.kernels); // fails early, with a plain message, when the export is missing
    for (const j of sweepJobs(first, end)) take(sweepRange(routine, g, opts.kernels, j.first, j.end));
  } else {
    const pool = await WorkerPool.start(opts.workers, { kind: "sweep", load: opts.load, routine: routine.name, grid: g });
    try {
      await pool.runOrdered<{ first: number; end: number }, Partial>(sweepJobs(first, end), (r) => {
        if (!r.ok) throw new SweepError(`a worker failed: ${r.message}`);
        take(r.value);
      });
    } finally {
      await pool.close();
    }
  }
  return finishSweep(routine, g, opts.module, { k: opts.shard.k, n: opts.shard.n, first, end }, acc);
}

/** The identity recorded in a sweep file: the label, and the SHA-256 of the module file behind it if any. */
export function moduleIdentity(load: KernelSource, label: string): ModuleId {
  const file = load.module ?? (load.build === "native" ? BUILD_FILES.f64 : (BUILD_FILES as Record<string, string>)[load.build ?? "f64"]);
  const sha256 = file !== undefined && existsSync(file) ? createHash("sha256").update(readFileSync(file)).digest("hex") : null;
  return { label, sha256 };
}

