/**
 * `areal bench [--json FILE] [--long] [--profile FILE]`: timings of every kernel in the WebAssembly release build
 * and in the host-JS build, the two baselines in the same run, iteration counts over the elliptic (e, M) domain,
 * operation counts per call and the cost model.
 *
 * What is timed (tinybench, median of the samples; one task call runs a block of cases):
 *  - every routine of harness/routines.ts that has a vector suite (harness/specs/index.ts): its export called from
 *    the host over up to CASES_PER_KERNEL rows of the suite's vector file (rows the release build solves), once
 *    through the release module and once through the host-JS build (the same sources on the host's Math);
 *  - in ONE bench-only module (bench/baseline.ts, loops inside the module, no host call per case): the elliptic
 *    solver, the classic Newton baseline (from E = M, to a step of 4 ulp of E) and one sin + one cos, over the same
 *    DOMAIN_CASES seeded (e, M) pairs, e uniform in [0, 1), M uniform in [-pi, pi];
 *    with the floors beside them: one sincos fed by the previous one (latency), and the reduction plus ONE
 *    correction step from a perfect starter (the solver's own root); the hyperbolic solver against Newton from a
 *    logarithmic starter, and propagate against textbook universal variables (each its own naive baseline). These
 *    module loops are timed interleaved, round by round, each reported as its fastest round (timeInterleaved);
 *  - single operations in dependent chains (same module) and an empty export call: the host's per-operation costs;
 *  - the release module's size per export (size.ts): the code each export reaches, and the static data.
 * Ratios: elliptic_vs_newton = t(Newton) / t(solver) (above 1: the solver is faster); elliptic_vs_sincos =
 * t(solver) / t(sin + cos), floor_vs_sincos and sincos_dep_vs_sincos likewise; hyperbolic_vs_newton and
 * propagate_vs_naive = t(baseline) / t(solver); wasm_vs_js[kernel] = t(js) / t(wasm) (above 1: WebAssembly
 * faster). Speed is reported, never asserted by tests.
 */
import { existsSync, readdirSync, statSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { cpus, arch } from "node:os";
import { ROUTINES, slotsOf, type Routine } from "../module/routines.js";
import { isOk } from "../module/status.js";
import { SPECS } from "../verify/specs/index.js";
import { readVectors, vectorPath, col } from "../verify/vectors.js";
import { BUILD_DIR, ROOT } from "../core/paths.js";
import { loadBuild, loadFile, type Kernels } from "../module/load.js";
import { Rng } from "../core/rng.js";
import { ulpDistance } from "../core/float.js";
import { moduleSizes, type ModuleSizes } from "./size.js";
import { measureEvalShare, type EvalShare } from "./evalshare.js";
import { loadCounting, countOps, predict, OP_NAMES, type OpStats, type Profile, type Prediction, type OpName, readProfile, ProfileError } from "./opcount.js";

/** Output slots of kepler_elliptic (ABI table). */
const KE = slotsOf("kepler_elliptic", "E", "iterations");

export const BASELINE_FILE = join(BUILD_DIR, "bench", "baseline.wasm");
export const EXAMPLE_PROFILE = join(ROOT, "bench", "profiles", "example-target.json");
/** Cases per kernel for the per-call timings and the operation counts. */
export const CASES_PER_KERNEL = 512;
/** Operation counts over up to settings.countRows suite rows run for kernels faster than this per call (ns); slower ones are counted on the timed rows only. */
export const WIDE_COUNT_NS = 5000;
/** (e, M) pairs of the solver / baseline comparison (the bench module holds at most 2048). */
export const DOMAIN_CASES = 2048;

export interface BenchSettings {
  /** Time budget per tinybench task, ms. */
  readonly taskMs: number;
  /** Grid of the iteration counts: e values x M values. */
  readonly gridE: number;
  readonly gridM: number;
  readonly long: boolean;
  /** Rows per kernel for the per-call timings. */
  readonly casesPerKernel: number;
  /** Rows per cheap kernel for the operation counts and the profile's worst case (0: the timed rows only). */
  readonly countRows: number;
  /** Generated kepler-elliptic rows of the eval timing (evalshare.ts); 0 or absent: DEFAULT_EVAL_ROWS. */
  readonly evalRows?: number;
}

/** Rows of the eval timing when the settings do not say. */
export const DEFAULT_EVAL_ROWS = 200_000;

export const DEFAULT_SETTINGS: BenchSettings = { taskMs: 150, gridE: 160, gridM: 160, long: false, casesPerKernel: CASES_PER_KERNEL, countRows: 5000 };
export const LONG_SETTINGS: BenchSettings = { taskMs: 1000, gridE: 500, gridM: 500, long: true, casesPerKernel: CASES_PER_KERNEL, countRows: 1_000_000, evalRows: 1_000_000 };
/** For tests of the plumbing: tiny budgets, the numbers mean nothing. */
export const SMOKE_SETTINGS: BenchSettings = { taskMs: 5, gridE: 12, gridM: 12, long: false, casesPerKernel: 48, countRows: 0, evalRows: 3000 };

export interface KernelTiming {
  readonly routine: string;
  readonly exportName: string;
  /** The suite the inputs come from, or undefined when the routine has none (then it is not timed). */
  readonly suite?: string;
  readonly cases: number;
  readonly wasmNs?: number;
  readonly jsNs?: number;
  /** t(js) / t(wasm). */
  readonly speedup?: number;
  readonly note?: string;
}

export interface IterationStats {
  readonly method: string;
  readonly cases: number;
  readonly histogram: Readonly<Record<string, number>>;
  readonly mean: number;
  readonly worst: number;
  /** Where the worst count first occurs on the grid. */
  readonly worstAt: { readonly e: number; readonly M: number };
  readonly failures: number;
}

export interface IterationGrid {
  /** e values, M values, and for each (i, j) the solver's and Newton's iteration counts (row-major by e). */
  readonly e: readonly number[];
  readonly M: readonly number[];
  readonly solver: readonly number[];
  readonly newton: readonly number[];
}

export interface Target {
  readonly name: string;
  readonly wanted: string;
  readonly value: number | null;
  readonly met: boolean | null;
  readonly note: string;
}

export interface OtherBaseline {
  readonly routine: string;
  readonly baseline: string;
  readonly domain: string;
  readonly cases: number;
  readonly solverNs: number;
  readonly baselineNs: number;
  /** t(baseline) / t(solver). */
  readonly speedup: number;
  readonly baselineNotConverged: number;
  /** Largest difference from the solver where the baseline converged: ulp (Kepler) or relative in |r| (propagate). */
  readonly maxDifference: number;
  readonly differenceUnit: string;
}

export interface ModelCheck {
  readonly routine: string;
  readonly measuredNs: number;
  readonly predictedNs: number;
  /** predicted / measured. */
  readonly ratio: number;
}

export interface BenchResult {
  readonly tool: "areal bench";
  readonly date: string;
  readonly host: { readonly node: string; readonly arch: string; readonly cpu: string; readonly cores: number };
  readonly settings: BenchSettings;
  readonly kernels: readonly KernelTiming[];
  readonly baselines: {
    readonly domain: string;
    readonly cases: number;
    /** ns per case, loops inside the bench module. */
    readonly solverNs: number;
    readonly newtonNs: number;
    readonly sincosNs: number;
    readonly loopNs: number;
    /** ns of one empty export call from the host. */
    readonly callNs: number;
    /** Mean iterations of each method over these cases, and Newton's cases that hit its cap. */
    readonly solverMeanIterations: number;
    readonly newtonMeanIterations: number;
    readonly newtonNotConverged: number;
    /** Largest difference in ulp between Newton's converged E and the solver's E over these cases. */
    readonly newtonMaxUlpFromSolver: number;
    /** The floors, same cases: one library sincos fed by the previous one (latency), the reduction plus ONE
     * correction step from a perfect starter (the solver's own root), and the solver fed by its previous result. */
    readonly sincosDepNs: number;
    readonly floorNs: number;
    readonly solverDepNs: number;
  };
  /** Hyperbolic solver and propagate, each against its own naive baseline (loops in the bench module). */
  readonly others: readonly OtherBaseline[];
  /** Release module size, per kernel (harness/perf/size.ts). */
  readonly sizes: ModuleSizes;
  readonly ratios: {
    readonly elliptic_vs_newton: number;
    readonly elliptic_vs_sincos: number;
    /** The floors as multiples of one sin + one cos (same run): floor / sincos and one dependent sincos / sincos. */
    readonly floor_vs_sincos: number;
    readonly sincos_dep_vs_sincos: number;
    readonly hyperbolic_vs_newton: number;
    readonly propagate_vs_naive: number;
    readonly wasm_vs_js: Readonly<Record<string, number>>;
  };
  readonly targets: readonly Target[];
  readonly iterations: { readonly solver: IterationStats; readonly newton: IterationStats; readonly grid: IterationGrid };
  readonly opcounts: readonly Omit<OpStats, "perCase">[];
  readonly hostCosts: Readonly<Partial<Record<OpName, number>>> & { readonly call: number };
  readonly model: readonly ModelCheck[];
  /** `areal eval` against the kernel alone over the same rows (evalshare.ts): the kernel's share of eval's time. */
  readonly eval: EvalShare;
  readonly profile?: { readonly name: string; readonly unit: string; readonly file: string; readonly predictions: readonly Prediction[] };
  readonly notes: readonly string[];
}

// ---------------------------------------------------------------------------------------------------------
// modules

function newestSource(): number {
  let t = 0;
  for (const dir of ["assembly", "bench"]) {
    const d = join(ROOT, dir);
    if (!existsSync(d)) continue;
    for (const f of readdirSync(d)) if (f.endsWith(".ts")) t = Math.max(t, statSync(join(d, f)).mtimeMs);
  }
  for (const f of ["asconfig.json", join("scripts", "build-bench.mjs"), join("scripts", "instrument-wat.mjs")]) t = Math.max(t, statSync(join(ROOT, f)).mtimeMs);
  return t;
}

/** Build the bench-only modules when they are missing or older than the sources. Returns true if it built. */
export function ensureBenchModules(log: (s: string) => void = () => {}): boolean {
  const files = [BASELINE_FILE, join(BUILD_DIR, "bench", "areal-counting.wasm")];
  const src = newestSource();
  if (files.every((f) => existsSync(f) && statSync(f).mtimeMs >= src)) return false;
  log("building the bench modules (scripts/build-bench.mjs) ...");
  execFileSync(process.execPath, [join(ROOT, "scripts", "build-bench.mjs")], { cwd: ROOT, stdio: ["ignore", "ignore", "inherit"] });
  return true;
}

// ---------------------------------------------------------------------------------------------------------
// inputs

/** Input rows for a routine from the first vector suite of it: up to `max` rows, evenly spread, solved by `k`. */
export function routineInputs(r: Routine, k: Kernels, max = CASES_PER_KERNEL): { suite?: string; rows: number[][] } {
  const spec = SPECS.find((s) => s.routine === r.name && existsSync(vectorPath(s.suite)));
  if (!spec || !k.has(r.exportName)) return { rows: [] };
  const v = readVectors(vectorPath(spec.suite));
  const cols = r.inputs.map((i) => {
    try {
      return col(v, i.name);
    } catch {
      return -1;
    }
  });
  if (cols.some((c) => c < 0)) return { suite: spec.suite, rows: [] };
  const all = v.values.map((row) => cols.map((c) => row[c]!)).filter((args) => isOk(k.call(r.exportName, args)));
  const stride = Math.max(1, all.length / max);
  const rows: number[][] = [];
  for (let x = 0; rows.length < max && Math.floor(x) < all.length; x += stride) rows.push(all[Math.floor(x)]!);
  return { suite: spec.suite, rows };
}

/** A task that calls fn over every row once (no allocation in the loop). */
function blockTask(fn: (...a: number[]) => number, rows: readonly (readonly number[])[]): () => void {
  const n = rows.length;
  const arity = rows[0]?.length ?? 0;
  const c = Array.from({ length: arity }, (_, j) => Float64Array.from(rows, (r) => r[j]!));
  const [a, b, d, e, f] = c;
  switch (arity) {
    case 1: return () => { for (let i = 0; i < n; i++) fn(a![i]!); };
    case 2: return () => { for (let i = 0; i < n; i++) fn(a![i]!, b![i]!); };
    case 3: return () => { for (let i = 0; i < n; i++) fn(a![i]!, b![i]!, d![i]!); };
    case 5: return () => { for (let i = 0; i < n; i++) fn(a![i]!, b![i]!, d![i]!, e![i]!, f![i]!); };
    default: return () => { for (let i = 0; i < n; i++) fn(...rows[i]!); };
  }
}

/** The (e, M) pairs of the solver / baseline comparison. */
export function domainCases(n = DOMAIN_CASES): number[][] {
  const rng = new Rng(20261206);
  const out: number[][] = [];
  for (let i = 0; i < n; i++) out.push([rng.uniform(), rng.between(-Math.PI, Math.PI)]);
  return out;
}

/** The iteration-count grid: e linear on [0, 0.99) then 1 - e down to 1e-15; M linear on (0, pi] then down to 1e-12. */
export function iterationGridAxes(ne: number, nm: number): { e: number[]; M: number[] } {
  const e: number[] = [];
  const nLin = Math.ceil(ne * 0.6);
  for (let i = 0; i < nLin; i++) e.push((0.99 * i) / nLin);
  for (let i = 0; i < ne - nLin; i++) e.push(1 - 10 ** (-2 - (13 * i) / Math.max(1, ne - nLin - 1)));
  const M: number[] = [];
  const mLog = Math.floor(nm * 0.25);
  for (let j = 0; j < mLog; j++) M.push(10 ** (-12 + (10 * j) / mLog));
  for (let j = 0; j < nm - mLog; j++) M.push((Math.PI * (j + 1)) / (nm - mLog));
  return { e, M };
}

function iterStats(method: string, e: readonly number[], M: readonly number[], its: readonly number[]): IterationStats {
  const hist: Record<string, number> = {};
  let sum = 0;
  let n = 0;
  let worst = -1;
  let worstAt = { e: NaN, M: NaN };
  let failures = 0;
  its.forEach((it, idx) => {
    if (it < 0) {
      failures++;
      hist.failed = (hist.failed ?? 0) + 1;
      return;
    }
    hist[String(it)] = (hist[String(it)] ?? 0) + 1;
    sum += it;
    n++;
    if (it > worst) {
      worst = it;
      worstAt = { e: e[Math.floor(idx / M.length)]!, M: M[idx % M.length]! };
    }
  });
  return { method, cases: its.length, histogram: hist, mean: n ? sum / n : NaN, worst, worstAt, failures };
}

/** Iteration counts of the release solver and of the Newton baseline over the grid. */
export function iterationCounts(k: Kernels, base: WebAssembly.Exports, ne: number, nm: number): { solver: IterationStats; newton: IterationStats; grid: IterationGrid } {
  const { e, M } = iterationGridAxes(ne, nm);
  const solver: number[] = [];
  const newton: number[] = [];
  const nwt = base.newton_elliptic as (e: number, M: number) => number;
  const nIt = base.newton_iterations as () => number;
  for (const ei of e) {
    for (const mj of M) {
      const st = k.call("kepler_elliptic", [ei, mj]);
      solver.push(isOk(st) ? k.out[KE.iterations]! : -1);
      nwt(ei, mj);
      newton.push(nIt());
    }
  }
  return { solver: iterStats("kepler_elliptic", e, M, solver), newton: iterStats("newton from E = M", e, M, newton), grid: { e, M, solver, newton } };
}

// ---------------------------------------------------------------------------------------------------------
// timing

/** Median ns per case of each task (a task call runs `per` cases). */
async function timeTasks(tasks: readonly { name: string; fn: () => unknown; per: number }[], ms: number): Promise<Map<string, number>> {
  const { Bench } = await import("tinybench");
  const bench = new Bench({ time: ms, warmupTime: Math.max(5, ms / 5), iterations: 5 });
  for (const t of tasks) bench.add(t.name, t.fn);
  await bench.run();
  const out = new Map<string, number>();
  bench.tasks.forEach((task, i) => {
    const r = task.result as { state: string; latency?: { p50?: number; mean: number }; error?: unknown };
    if (r.state !== "completed" || !r.latency) throw new Error(`bench task ${task.name} did not complete (${String(r.error ?? r.state)})`);
    out.set(task.name, ((r.latency.p50 ?? r.latency.mean) * 1e6) / tasks[i]!.per);
  });
  return out;
}

/**
 * Module loops timed interleaved: `rounds` rounds (at least 20, about budgetMs in all), each running every loop
 * once; the fastest round of each loop, in ns per case.
 */
function timeInterleaved(loops: readonly { name: string; fn: () => unknown; per: number }[], budgetMs: number): Map<string, number> {
  const best = new Map<string, number>(loops.map((l) => [l.name, Infinity]));
  for (const l of loops) l.fn(); // warm-up: compile every loop to the optimizing tier's code first
  const t0 = performance.now();
  for (let round = 0; round < 20 || (performance.now() - t0 < budgetMs && round < 5000); round++) {
    for (const l of loops) {
      const a = performance.now();
      l.fn();
      const ns = ((performance.now() - a) * 1e6) / l.per;
      if (ns < best.get(l.name)!) best.set(l.name, ns);
    }
  }
  return best;
}

/** Pairs (e, M) of the hyperbolic comparison: e = 1 + 10^U(-2, 1), |M| = 10^U(-2, 2), either sign. */
export function hyperbolicCases(n = DOMAIN_CASES): number[][] {
  const rng = new Rng(20261207);
  const out: number[][] = [];
  for (let i = 0; i < n; i++) out.push([1 + 10 ** rng.between(-2, 1), (rng.uniform() < 0.5 ? -1 : 1) * 10 ** rng.between(-2, 2)]);
  return out;
}

/** Fill the bench module's hyperbolic and propagate inputs; the baselines' convergence and agreement with the release build. */
function fillOthers(wasm: Kernels, baseMod: { memory: WebAssembly.Memory; exports: WebAssembly.Exports }): {
  hypCases: number;
  propCases: number;
  hyp: Omit<OtherBaseline, "solverNs" | "baselineNs" | "speedup">;
  prop: Omit<OtherBaseline, "solverNs" | "baselineNs" | "speedup">;
} {
  const base = baseMod.exports;
  const hyp = hyperbolicCases();
  const hm = new Float64Array(baseMod.memory.buffer, (base.bench_hyp_inputs as () => number)(), 2 * hyp.length);
  const H = slotsOf("kepler_hyperbolic", "H");
  let hFail = 0;
  let hUlp = 0;
  hyp.forEach(([e, M], i) => {
    hm[2 * i] = e!;
    hm[2 * i + 1] = M!;
    wasm.call("kepler_hyperbolic", [e!, M!]);
    const x = (base.newton_hyperbolic as (e: number, M: number) => number)(e!, M!);
    if ((base.newton_iterations as () => number)() < 0) hFail++;
    else hUlp = Math.max(hUlp, ulpDistance(x, wasm.out[H.H]!));
  });
  const pr = ROUTINES.find((r) => r.name === "propagate")!;
  const cap = (base.PROP_CAPACITY as WebAssembly.Global).value as number;
  const rows = routineInputs(pr, wasm, cap).rows;
  const pm = new Float64Array(baseMod.memory.buffer, (base.bench_prop_inputs as () => number)(), 8 * rows.length);
  const out = new Float64Array(baseMod.memory.buffer, (base.bench_out as () => number)(), 6);
  const P = slotsOf("propagate", "rx", "ry", "rz");
  let pFail = 0;
  let pRel = 0;
  rows.forEach((row, i) => {
    pm.set(row, 8 * i);
    wasm.call("propagate", row);
    (base.naive_propagate as (...a: number[]) => number)(...row);
    if ((base.naive_iterations as () => number)() < 0) {
      pFail++;
      return;
    }
    const r = Math.hypot(wasm.out[P.rx]!, wasm.out[P.ry]!, wasm.out[P.rz]!);
    const d = Math.hypot(out[0]! - wasm.out[P.rx]!, out[1]! - wasm.out[P.ry]!, out[2]! - wasm.out[P.rz]!) / r;
    pRel = Math.max(pRel, Number.isFinite(d) ? d : Infinity);
  });
  return {
    hypCases: hyp.length,
    propCases: rows.length,
    hyp: { routine: "kepler-hyperbolic", baseline: "Newton from H0 = sgn(M) ln(2|M|/e + 1.8), to 4 ulp", domain: "e = 1 + 10^U(-2, 1), |M| = 10^U(-2, 2) either sign (seed 20261207)", cases: hyp.length, baselineNotConverged: hFail, maxDifference: hUlp, differenceUnit: "ulp" },
    prop: { routine: "propagate", baseline: "textbook universal variables: Newton on chi from sqrt(mu)|alpha|dt, closed-form Stumpff", domain: `rows of the propagate vector suite solved by the release build`, cases: rows.length, baselineNotConverged: pFail, maxDifference: pRel, differenceUnit: "relative in r" },
  };
}

/** op_chain kinds of bench/baseline.ts and the operation each one prices. */
const CHAIN_KINDS: readonly [number, OpName][] = [[1, "add"], [2, "mul"], [3, "div"], [4, "sqrt"], [5, "sin"], [6, "cos"], [7, "cbrt"], [8, "log"], [9, "exp"], [10, "atan2"], [11, "invtrig"], [12, "pow"], [13, "hyperbolic"], [14, "tan"], [15, "hypot"]];
const CHAIN_LEN = 4000;

export interface BenchHooks {
  readonly log?: (line: string) => void;
  /** Load the host-JS build; undefined or a throw means it is not available (the reason goes to the notes). */
  readonly loadJs?: () => Kernels;
  readonly profilePath?: string;
}

/** The host-JS build, or undefined with the reason added to notes (the bench then runs without wasm_vs_js). */
export function tryLoadJs(loader: (() => Kernels) | undefined, notes: string[]): Kernels | undefined {
  if (!loader) {
    notes.push("host-JS build: no loader given; wasm_vs_js is empty");
    return undefined;
  }
  try {
    return loader();
  } catch (err) {
    notes.push(`host-JS build not available (${(err as Error).message}); wasm_vs_js is empty`);
    return undefined;
  }
}

/** Run the whole bench. */
export async function runBench(settings: BenchSettings = DEFAULT_SETTINGS, hooks: BenchHooks = {}): Promise<BenchResult> {
  const log = hooks.log ?? (() => {});
  const notes: string[] = [];
  const userProfile = hooks.profilePath !== undefined ? readProfile(hooks.profilePath) : undefined; // fail before the long part
  ensureBenchModules(log);
  const wasm = loadBuild("f64");
  const baseMod = loadFile(BASELINE_FILE, "bench-baseline");
  const base = baseMod.exports;
  const js = tryLoadJs(hooks.loadJs, notes);

  // Per-kernel timings through the exports.
  log("timing the kernels (release WebAssembly and host JS) ...");
  const kernels: KernelTiming[] = [];
  const tasks: { name: string; fn: () => unknown; per: number }[] = [];
  const inputs = new Map<string, number[][]>();
  for (const r of ROUTINES) {
    if (!wasm.has(r.exportName)) {
      kernels.push({ routine: r.name, exportName: r.exportName, cases: 0, note: "not exported by the release module" });
      continue;
    }
    const picked = routineInputs(r, wasm, settings.casesPerKernel);
    const suite = picked.suite;
    let rows = picked.rows;
    if (rows.length > 0) {
      // Heavy kernels (long integrations) get fewer rows, so that one pass stays within a fraction of the budget.
      const fn = wasm.exports[r.exportName] as (...a: number[]) => number;
      const t0 = performance.now();
      blockTask(fn, rows)();
      const pass = performance.now() - t0;
      const budget = settings.taskMs / 10;
      if (pass > budget) {
        const keep = Math.max(4, Math.floor((rows.length * budget) / pass));
        rows = rows.filter((_, i) => i % Math.ceil(rows.length / keep) === 0);
      }
    }
    if (rows.length === 0) {
      kernels.push({ routine: r.name, exportName: r.exportName, suite, cases: 0, note: suite ? `no row of ${suite} is solved by the release build` : "no vector suite to draw inputs from: not timed" });
      continue;
    }
    inputs.set(r.name, rows);
    tasks.push({ name: `wasm:${r.name}`, fn: blockTask(wasm.exports[r.exportName] as (...a: number[]) => number, rows), per: rows.length });
    if (js?.has(r.exportName)) tasks.push({ name: `js:${r.name}`, fn: blockTask(js.exports[r.exportName] as unknown as (...a: number[]) => number, rows), per: rows.length });
    kernels.push({ routine: r.name, exportName: r.exportName, suite, cases: rows.length });
  }
  // The baselines, in the bench module.
  const dom = domainCases();
  const mem = new Float64Array(baseMod.memory.buffer, (base.bench_inputs as () => number)(), 2 * DOMAIN_CASES);
  dom.forEach(([e, M], i) => {
    mem[2 * i] = e!;
    mem[2 * i + 1] = M!;
  });
  const roots = new Float64Array(baseMod.memory.buffer, (base.bench_roots as () => number)(), DOMAIN_CASES);
  dom.forEach(([e, M], i) => {
    wasm.call("kepler_elliptic", [e!, M!]);
    roots[i] = Math.abs(wasm.out[KE.E]!); // |M| <= pi: no whole turn, the reduced root is |E|
  });
  const others = fillOthers(wasm, baseMod);
  let solverIt = 0;
  let newtonIt = 0;
  let newtonFail = 0;
  let newtonUlp = 0;
  for (const [e, M] of dom) {
    wasm.call("kepler_elliptic", [e!, M!]);
    solverIt += wasm.out[KE.iterations]!;
    const En = (base.newton_elliptic as (e: number, M: number) => number)(e!, M!);
    const it = (base.newton_iterations as () => number)();
    if (it < 0) newtonFail++;
    else newtonUlp = Math.max(newtonUlp, ulpDistance(En, wasm.out[KE.E]!));
    newtonIt += it < 0 ? 100 : it;
  }
  const loop = (name: string, n = DOMAIN_CASES) => (base[name] as (n: number) => number).bind(null, n);
  // The module's loops are timed interleaved, round by round, and each reported as its fastest round: on a shared
  // machine the minimum is the cost without interference, and every ratio then compares rounds of one run.
  const loops: { name: string; fn: () => unknown; per: number }[] = [
    { name: "loop:solver", fn: loop("loop_elliptic"), per: DOMAIN_CASES },
    { name: "loop:newton", fn: loop("loop_newton"), per: DOMAIN_CASES },
    { name: "loop:sincos", fn: loop("loop_sincos"), per: DOMAIN_CASES },
    { name: "loop:sincos-dep", fn: loop("loop_sincos_dep"), per: DOMAIN_CASES },
    { name: "loop:floor", fn: loop("loop_floor"), per: DOMAIN_CASES },
    { name: "loop:solver-dep", fn: loop("loop_elliptic_dep"), per: DOMAIN_CASES },
    { name: "loop:empty", fn: loop("loop_empty"), per: DOMAIN_CASES },
    { name: "loop:hyperbolic", fn: loop("loop_hyperbolic", others.hypCases), per: others.hypCases },
    { name: "loop:newton-hyperbolic", fn: loop("loop_newton_hyperbolic", others.hypCases), per: others.hypCases },
    { name: "loop:propagate", fn: loop("loop_propagate", others.propCases), per: others.propCases },
    { name: "loop:naive-propagate", fn: loop("loop_naive_propagate", others.propCases), per: others.propCases },
  ];
  const nop = base.nop2 as (a: number, b: number) => number;
  tasks.push({ name: "call:nop", fn: () => { for (let i = 0; i < 1000; i++) nop(i, 1); }, per: 1000 });
  const chain = base.op_chain as (k: number, n: number, x: number) => number;
  tasks.push({ name: "op:none", fn: () => chain(0, CHAIN_LEN, 1.25), per: CHAIN_LEN });
  for (const [kind, op] of CHAIN_KINDS) tasks.push({ name: `op:${op}`, fn: () => chain(kind, CHAIN_LEN, 1.25), per: CHAIN_LEN });
  const t = await timeTasks(tasks, settings.taskMs);
  for (const [k, v] of timeInterleaved(loops, settings.taskMs * loops.length)) t.set(k, v);

  const wasmVsJs: Record<string, number> = {};
  const timed = kernels.map((kt) => {
    const w = t.get(`wasm:${kt.routine}`);
    const j = t.get(`js:${kt.routine}`);
    if (w === undefined) return kt;
    if (j === undefined) return { ...kt, wasmNs: w, note: js ? "not in the host-JS build" : "host-JS build not available" };
    wasmVsJs[kt.routine] = j / w;
    return { ...kt, wasmNs: w, jsNs: j, speedup: j / w };
  });
  const solverNs = t.get("loop:solver")!;
  const newtonNs = t.get("loop:newton")!;
  const sincosNs = t.get("loop:sincos")!;
  const loopNs = t.get("loop:empty")!;
  const callNs = t.get("call:nop")!;
  const sincosDepNs = t.get("loop:sincos-dep")!;
  const floorNs = t.get("loop:floor")!;
  const solverDepNs = t.get("loop:solver-dep")!;
  const otherResults: OtherBaseline[] = [
    { ...others.hyp, solverNs: t.get("loop:hyperbolic")!, baselineNs: t.get("loop:newton-hyperbolic")!, speedup: t.get("loop:newton-hyperbolic")! / t.get("loop:hyperbolic")! },
    { ...others.prop, solverNs: t.get("loop:propagate")!, baselineNs: t.get("loop:naive-propagate")!, speedup: t.get("loop:naive-propagate")! / t.get("loop:propagate")! },
  ];
  const ratios = {
    elliptic_vs_newton: newtonNs / solverNs, elliptic_vs_sincos: solverNs / sincosNs,
    floor_vs_sincos: floorNs / sincosNs, sincos_dep_vs_sincos: sincosDepNs / sincosNs,
    hyperbolic_vs_newton: otherResults[0]!.speedup, propagate_vs_naive: otherResults[1]!.speedup,
    wasm_vs_js: wasmVsJs,
  };

  // Host per-operation costs: (chain - empty chain) / length.
  const none = t.get("op:none")!;
  const hostCosts: Partial<Record<OpName, number>> & { call: number } = { call: callNs };
  for (const [, op] of CHAIN_KINDS) hostCosts[op] = Math.max(0, t.get(`op:${op}`)! - none);
  hostCosts.fma = (hostCosts.mul ?? 0) + (hostCosts.add ?? 0);

  // Iteration counts over the grid.
  log("iteration counts over the (e, M) grid ...");
  const iterations = iterationCounts(wasm, base, settings.gridE, settings.gridM);

  // Operation counts over the same inputs as the timings.
  log("operation counts (counting module) ...");
  const cm = loadCounting();
  const stats: OpStats[] = []; // over the timed rows: for the model check
  const wide: OpStats[] = []; // over every solved row of the suite (cheap kernels): for the table and the worst case
  for (const kt of timed) {
    const rows = inputs.get(kt.routine);
    if (!rows) continue;
    const st = countOps(cm, kt.routine, kt.exportName, rows);
    stats.push(st);
    const r = ROUTINES.find((x) => x.name === kt.routine)!;
    const all = kt.wasmNs !== undefined && kt.wasmNs < WIDE_COUNT_NS ? routineInputs(r, wasm, settings.countRows).rows : [];
    wide.push(all.length > rows.length ? countOps(cm, kt.routine, kt.exportName, all) : st);
  }
  // The model on this host: the measured per-call time predicted from host per-operation costs.
  const hostProfile: Profile = { format: "areal-op-profile/1", name: "this host (measured)", unit: "ns", call: callNs, ops: hostCosts, fused_multiply_add: false };
  const meanPred = predict(hostProfile, stats);
  const model: ModelCheck[] = [];
  for (const p of meanPred) {
    const m = timed.find((x) => x.routine === p.routine)?.wasmNs;
    if (m !== undefined) model.push({ routine: p.routine, measuredNs: m, predictedNs: p.mean, ratio: p.mean / m });
  }
  log("eval against the kernel alone ...");
  const evalShare = measureEvalShare(wasm, settings.evalRows || DEFAULT_EVAL_ROWS);

  let profile: BenchResult["profile"];
  const ppath = hooks.profilePath ?? EXAMPLE_PROFILE;
  if (userProfile || existsSync(ppath)) {
    const p = userProfile ?? readProfile(ppath);
    const predictions: Prediction[] = [];
    for (const st of wide) {
      try {
        predictions.push(...predict(p, [st]));
      } catch (err) {
        if (!(err instanceof ProfileError)) throw err;
        notes.push(`${st.routine}: no prediction, ${err.message}`);
      }
    }
    profile = { name: p.name, unit: p.unit, file: ppath, predictions };
  }

  const targets: Target[] = [
    { name: "elliptic_vs_newton", wanted: ">= 2 (solver at least 2x faster than Newton from E = M)", value: ratios.elliptic_vs_newton, met: ratios.elliptic_vs_newton >= 2, note: "loops in one module, uniform e in [0,1), M in [-pi,pi]" },
    { name: "elliptic_vs_sincos", wanted: "<= 3 (solver at most 3x one sin + one cos)", value: ratios.elliptic_vs_sincos, met: ratios.elliptic_vs_sincos <= 3, note: `same loops; the floor (reduction + one correction from a perfect starter) is ${ratios.floor_vs_sincos.toFixed(2)}x, one dependent sincos ${ratios.sincos_dep_vs_sincos.toFixed(2)}x` },
    { name: "hyperbolic_vs_newton", wanted: ">= 2 (hyperbolic solver at least 2x faster than its Newton baseline)", value: ratios.hyperbolic_vs_newton, met: ratios.hyperbolic_vs_newton >= 2, note: "loops in one module, e = 1 + 10^U(-2, 1), |M| = 10^U(-2, 2)" },
    { name: "propagate_vs_naive", wanted: ">= 2 (propagate at least 2x faster than textbook universal variables)", value: ratios.propagate_vs_naive, met: ratios.propagate_vs_naive >= 2, note: `loops in one module, the propagate suite's rows; the naive baseline failed on ${otherResults[1]!.baselineNotConverged} of ${otherResults[1]!.cases}` },
  ];
  const jsKeys = Object.keys(wasmVsJs);
  if (jsKeys.length === 0) targets.push({ name: "wasm_vs_js", wanted: ">= 1 on every kernel", value: null, met: null, note: "host-JS build not available" });
  else {
    const worst = jsKeys.reduce((a, b) => (wasmVsJs[a]! <= wasmVsJs[b]! ? a : b));
    targets.push({ name: "wasm_vs_js", wanted: ">= 1 on every kernel", value: wasmVsJs[worst]!, met: jsKeys.every((k) => wasmVsJs[k]! >= 1), note: `slowest relative to JS: ${worst}` });
  }
  notes.push("timings are medians of tinybench samples on a shared machine: compare ratios from one run, not absolute figures between runs");
  return {
    tool: "areal bench",
    date: new Date().toISOString(),
    host: { node: process.version, arch: arch(), cpu: cpus()[0]?.model ?? "unknown", cores: cpus().length },
    settings,
    kernels: timed,
    baselines: { domain: "e uniform in [0, 1), M uniform in [-pi, pi] (seed 20261206)", cases: DOMAIN_CASES, solverNs, newtonNs, sincosNs, loopNs, callNs,
      solverMeanIterations: solverIt / dom.length, newtonMeanIterations: newtonIt / dom.length, newtonNotConverged: newtonFail,
      newtonMaxUlpFromSolver: newtonUlp, sincosDepNs, floorNs, solverDepNs },
    others: otherResults,
    sizes: moduleSizes(),
    ratios,
    targets,
    iterations,
    opcounts: wide.map(({ perCase: _p, ...rest }) => rest),
    hostCosts,
    model,
    eval: evalShare,
    ...(profile ? { profile } : {}),
    notes,
  };
}

// ---------------------------------------------------------------------------------------------------------
// text

const f = (x: number | undefined, d = 1): string => (x === undefined || !Number.isFinite(x) ? "-" : x >= 100 ? x.toFixed(0) : x.toFixed(d));

function table(head: string[], rows: string[][]): string[] {
  const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (c: string[]): string => c.map((x, i) => x.padEnd(w[i]!)).join("  ").trimEnd();
  return [line(head), line(w.map((n) => "-".repeat(n))), ...rows.map(line)];
}

/** Histogram text: single counts up to 10, then ranges. */
export function compactHistogram(hist: Readonly<Record<string, number>>): string {
  const ranges: [string, number, number][] = [["11-20", 11, 20], ["21-50", 21, 50], ["51-100", 51, 100], [">100", 101, Infinity]];
  const parts: string[] = [];
  const keys = Object.keys(hist).filter((k) => k !== "failed").map(Number).sort((a, b) => a - b);
  for (const k of keys) if (k <= 10) parts.push(`${k}:${hist[String(k)]}`);
  for (const [name, lo, hi] of ranges) {
    const n = keys.filter((k) => k >= lo && k <= hi).reduce((a, k) => a + hist[String(k)]!, 0);
    if (n > 0) parts.push(`${name}:${n}`);
  }
  if (hist.failed) parts.push(`not converged:${hist.failed}`);
  return parts.join(" ");
}

/** The text report of a bench run. */
export function formatBench(r: BenchResult): string {
  const o: string[] = [`areal bench: ${r.host.cpu}, ${r.host.cores} cores, node ${r.host.node}${r.settings.long ? " (long run)" : ""}`, ""];
  o.push(...table(["kernel", "cases", "wasm ns/call", "wasm Mcalls/s", "js ns/call", "wasm vs js", "note"],
    r.kernels.map((k) => [k.routine, String(k.cases), f(k.wasmNs), k.wasmNs ? f(1e3 / k.wasmNs, 2) : "-", f(k.jsNs), k.speedup ? `${k.speedup.toFixed(2)}x` : "-", k.note ?? ""])));
  const b = r.baselines;
  o.push("", `elliptic solver and baselines, loops inside one module, ${b.cases} cases (${b.domain}):`);
  o.push(...table(["what", "ns/case", "mean iterations"], [["elliptic solver (kepler_elliptic)", f(b.solverNs, 2), b.solverMeanIterations.toFixed(2)],
    ["Newton from E = M, to 4 ulp", f(b.newtonNs, 2), `${b.newtonMeanIterations.toFixed(2)}${b.newtonNotConverged ? ` (${b.newtonNotConverged} at the cap of 100)` : ""}`], ["one sin + one cos", f(b.sincosNs, 2), "-"], ["loop alone", f(b.loopNs, 2), "-"], ["empty export call from the host", f(b.callNs, 2), "-"]]));
  o.push(`Newton's converged E is within ${b.newtonMaxUlpFromSolver} ulp of the solver's on these cases (same accuracy class).`);
  o.push("", "floors (same cases, same run):");
  o.push(...table(["what", "ns/case", "x one sin + one cos"], [
    ["one sin + one cos (independent cases)", f(b.sincosNs, 2), "1.00"],
    ["one sincos fed by the previous one (latency)", f(b.sincosDepNs, 2), r.ratios.sincos_dep_vs_sincos.toFixed(2)],
    ["reduction + one correction from a perfect starter", f(b.floorNs, 2), r.ratios.floor_vs_sincos.toFixed(2)],
    ["elliptic solver (independent cases)", f(b.solverNs, 2), r.ratios.elliptic_vs_sincos.toFixed(2)],
    ["elliptic solver fed by the previous result (latency)", f(b.solverDepNs, 2), (b.solverDepNs / b.sincosNs).toFixed(2)]]));
  o.push("", "other solvers against their naive baselines (loops in the bench module):");
  o.push(...table(["routine", "cases", "ns/case", "baseline ns/case", "speed-up", "baseline", "baseline not converged", "max difference"], r.others.map((x) => [x.routine, String(x.cases), f(x.solverNs, 2), f(x.baselineNs, 2), `${x.speedup.toFixed(2)}x`, x.baseline, String(x.baselineNotConverged), `${x.maxDifference.toPrecision(2)} ${x.differenceUnit}`])));
  o.push("", `release module ${r.sizes.file}: ${r.sizes.totalBytes} bytes (code ${r.sizes.codeBytes}, static data ${r.sizes.dataBytes}); per export, the code it reaches (shared helpers counted in each) and the code only it reaches:`);
  o.push(...table(["export", "reached code bytes", "own code bytes", "functions"], r.sizes.exports.map((x) => [x.name, String(x.reachedBytes), String(x.ownBytes), String(x.functions)])));
  o.push("", "ratios:", `  elliptic_vs_newton ${r.ratios.elliptic_vs_newton.toFixed(2)} (speed-up over Newton)`, `  elliptic_vs_sincos ${r.ratios.elliptic_vs_sincos.toFixed(2)} (solver time / sin+cos time; floor ${r.ratios.floor_vs_sincos.toFixed(2)}, one dependent sincos ${r.ratios.sincos_dep_vs_sincos.toFixed(2)})`,
    `  hyperbolic_vs_newton ${r.ratios.hyperbolic_vs_newton.toFixed(2)}, propagate_vs_naive ${r.ratios.propagate_vs_naive.toFixed(2)} (speed-ups over the naive baselines)`);
  o.push(`  wasm_vs_js ${Object.entries(r.ratios.wasm_vs_js).map(([k, v]) => `${k} ${v.toFixed(2)}`).join(", ") || "(host-JS build not available)"}`);
  o.push("", "targets:");
  for (const t of r.targets) o.push(`  ${t.met === null ? "n/a " : t.met ? "met " : "MISS"} ${t.name} = ${t.value === null ? "-" : t.value.toFixed(2)}, wanted ${t.wanted}; ${t.note}`);
  const it = r.iterations;
  o.push("", `iterations over the (e, M) grid (${r.settings.gridE} e x ${r.settings.gridM} M, e up to 1 - 1e-15, M from 1e-12 to pi):`);
  for (const s of [it.solver, it.newton]) {
    const h = compactHistogram(s.histogram);
    o.push(`  ${s.method}: mean ${s.mean.toFixed(2)}, worst ${s.worst} at e=${s.worstAt.e} M=${s.worstAt.M}${s.failures ? `, ${s.failures} not converged` : ""}; histogram (iterations:cases) ${h}`);
  }
  o.push("", `operations per call (counting build; mean / worst over up to ${r.settings.countRows >= 1_000_000 ? "every" : Math.max(r.settings.countRows, r.settings.casesPerKernel)} solved rows of each suite):`);
  const used = OP_NAMES.filter((n) => r.opcounts.some((s) => s.max[n] > 0));
  o.push(...table(["kernel", ...used], r.opcounts.map((s) => [s.routine, ...used.map((n) => (s.max[n] === 0 ? "-" : `${f(s.mean[n])}/${s.max[n]}`))])));
  o.push("  fma = additions fed by a product (also in mul and add). Not counted: comparisons, branches, loads/stores, abs, integer work.");
  o.push("", "cost model on this host (per-operation costs from dependent chains + one empty call, times the mean counts):");
  o.push(...table(["kernel", "measured ns", "predicted ns", "predicted/measured"], r.model.map((m) => [m.routine, f(m.measuredNs), f(m.predictedNs), m.ratio.toFixed(2)])));
  const ev = r.eval;
  o.push("", `eval ${ev.routine} in this thread, ${ev.rows} generated rows in ${ev.chunkBytes / 1024} KB chunks, fastest of ${ev.reps} passes (no file reading or writing):`);
  o.push(...table(["what", "rows/s", "share"], [["eval (bytes: parse, kernel, format)", f(ev.bytesRowsPerS), "1"], ["the kernel alone over the same rows", f(ev.kernelCallsPerS), ev.kernelShare.toFixed(3)],
    ["eval through strings (the earlier path)", f(ev.stringRowsPerS), (1 / ev.bytesVsString).toFixed(2)]]));
  o.push(`  the kernel is ${(100 * ev.kernelShare).toFixed(1)}% of eval's time; eval is ${ev.bytesVsString.toFixed(2)}x the string path's rows/s`);
  if (r.profile) {
    o.push("", `target profile '${r.profile.name}' (${r.profile.file}), ${r.profile.unit} per call, worst over the counted rows:`);
    o.push(...table(["kernel", "mean", "worst", "worst time", "worst case inputs"], r.profile.predictions.map((p) => [p.routine, f(p.mean), f(p.worst), p.worstSeconds !== undefined ? `${(p.worstSeconds * 1e6).toFixed(2)} us` : "-", p.worstInputs.join(", ")])));
  }
  for (const n of r.notes) o.push(`note: ${n}`);
  return o.join("\n") + "\n";
}

/** The JSON form (what `--json` writes). */
export function benchJson(r: BenchResult): object {
  return r;
}
