/**
 * Operation counts per kernel call, and the target profile that turns them into a predicted cost.
 *
 * The counts come from the bench-only counting module (build/bench/areal-counting.wasm, scripts/build-bench.mjs):
 * the kernels compiled without optimisation with RMath = CountingMath (assembly/counting_math.ts counts every call
 * of a library function: sin, cos, tan, asin/acos/atan, atan2, sqrt, cbrt, log, exp, pow, hyperbolic, hypot) and
 * every f64 div, mul, add/sub and sqrt instruction of the kernels' own code counted by an inserted call. A
 * library function counts as one operation of its kind; the arithmetic inside it is not counted again. `fma` is
 * the number of additions whose operand is a product formed just before (a lower bound on fusable multiply-adds;
 * they are also counted in `mul` and `add`). Not counted: comparisons, branches, loads and stores, abs, neg,
 * copysign, floor/nearest and integer work (on most targets a cycle or two each).
 *
 * Target profile (JSON, format "areal-op-profile/1"; example in bench/profiles/example-target.json):
 *   format      "areal-op-profile/1"
 *   name        text
 *   unit        "cycles" or "ns"
 *   clock_hz    optional: cycles per second, to also give a time (unit cycles only)
 *   call        cost of one kernel call (entry, argument passing, return, the status)
 *   ops         cost of one operation of each kind in OP_NAMES; every kind a kernel uses must be priced
 *   fused_multiply_add   optional boolean: when true, each fusable pair costs ops.fma instead of mul + add
 *   notes       optional text
 * predicted cost of a call = call + sum over kinds of count * ops[kind] (with the fused pairs as above).
 */
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { BUILD_DIR } from "../core/paths.js";
import { instantiate, type Kernels } from "../module/load.js";
import { isOk } from "../module/status.js";
import { INSN_CLASSES, type InsnClass } from "./count.js";

/** The operation kinds, in report order. */
export const OP_NAMES = ["add", "mul", "fma", "div", "sqrt", "cbrt", "sin", "cos", "tan", "invtrig", "atan2", "log", "exp", "pow", "hyperbolic", "hypot"] as const;
export type OpName = (typeof OP_NAMES)[number];
export type OpCounts = Record<OpName, number>;

/** count_get(i) of the counting module, in order (assembly/counting_math.ts). */
const MATH_COUNTERS: readonly OpName[] = ["sin", "cos", "tan", "invtrig", "atan2", "sqrt", "cbrt", "log", "exp", "pow", "hyperbolic", "hypot"];
/** count_arith(i), in order (scripts/build-bench.mjs). */
const ARITH_COUNTERS: readonly OpName[] = ["div", "mul", "add", "fma", "sqrt"];

export const COUNTING_FILE = join(BUILD_DIR, "bench", "areal-counting.wasm");

export function zeroCounts(): OpCounts {
  return Object.fromEntries(OP_NAMES.map((n) => [n, 0])) as OpCounts;
}

/** The counting module, loaded as Kernels, with a `count` function that calls an export and returns its counts. */
export interface CountingModule {
  readonly kernels: Kernels;
  count(exportName: string, args: readonly number[]): { status: number; counts: OpCounts };
}

export function loadCounting(path = COUNTING_FILE): CountingModule {
  if (!existsSync(path)) throw new Error(`the counting module is missing (${path}): run 'npm run build:bench'`);
  const k = instantiate(readFileSync(path), "counting");
  const ex = k.exports as Record<string, unknown>;
  const reset = ex.count_reset as () => void;
  const resetA = ex.count_arith_reset as () => void;
  const get = ex.count_get as (i: number) => number;
  const getA = ex.count_arith as (i: number) => number;
  if (typeof reset !== "function" || typeof getA !== "function") throw new Error(`${path} is not a counting module (no count_reset/count_arith)`);
  return {
    kernels: k,
    count(name, args) {
      reset();
      resetA();
      const status = k.call(name, args);
      const c = zeroCounts();
      MATH_COUNTERS.forEach((n, i) => (c[n] += get(i)));
      ARITH_COUNTERS.forEach((n, i) => (c[n] += getA(i)));
      return { status, counts: c };
    },
  };
}

export interface OpStats {
  readonly routine: string;
  readonly cases: number;
  readonly mean: OpCounts;
  /** Largest count of each kind over the cases (not necessarily the same case for every kind). */
  readonly max: OpCounts;
  /** The case with the most operations of all kinds together, and its counts. */
  readonly heaviest: { readonly inputs: readonly number[]; readonly counts: OpCounts };
  /** Every case's counts (for the worst predicted cost under a profile); not written to JSON. */
  readonly perCase: readonly { readonly inputs: readonly number[]; readonly counts: OpCounts }[];
}

/** Count the operations of an export over input rows (rows whose call fails are left out). */
export function countOps(cm: CountingModule, routine: string, exportName: string, rows: readonly (readonly number[])[]): OpStats {
  const sum = zeroCounts();
  const max = zeroCounts();
  const perCase: { inputs: readonly number[]; counts: OpCounts }[] = [];
  let heaviest = { inputs: [] as readonly number[], counts: zeroCounts() };
  let heavyTotal = -1;
  for (const args of rows) {
    const { status, counts } = cm.count(exportName, args);
    if (!isOk(status)) continue;
    perCase.push({ inputs: args, counts });
    let total = 0;
    for (const n of OP_NAMES) {
      sum[n] += counts[n];
      if (counts[n] > max[n]) max[n] = counts[n];
      if (n !== "fma") total += counts[n];
    }
    if (total > heavyTotal) {
      heavyTotal = total;
      heaviest = { inputs: args, counts };
    }
  }
  const mean = zeroCounts();
  for (const n of OP_NAMES) mean[n] = perCase.length ? sum[n] / perCase.length : 0;
  return { routine, cases: perCase.length, mean, max, heaviest, perCase };
}

// ---------------------------------------------------------------------------------------------------------
// profiles

export const PROFILE_FORMAT = "areal-op-profile/1";

export interface Profile {
  readonly format: typeof PROFILE_FORMAT;
  readonly name: string;
  readonly unit: "cycles" | "ns";
  readonly clock_hz?: number;
  readonly call: number;
  readonly ops: Partial<Record<OpName, number>>;
  readonly fused_multiply_add?: boolean;
  /** Cycles per instruction of each class of `areal count` (fdiv, fp, mem, branch, int): prices exact counts. */
  readonly classes?: Partial<Record<InsnClass, number>>;
  readonly notes?: string;
}

export class ProfileError extends Error {}

/** Check a parsed profile; throws ProfileError naming the field. */
export function validateProfile(p: unknown, source: string): Profile {
  const fail = (m: string): never => {
    throw new ProfileError(`${source}: ${m}`);
  };
  if (typeof p !== "object" || p === null || Array.isArray(p)) fail("a profile is a JSON object");
  const o = p as Record<string, unknown>;
  if (o.format !== PROFILE_FORMAT) fail(`"format" must be "${PROFILE_FORMAT}"`);
  if (typeof o.name !== "string" || o.name === "") fail(`"name" must be a non-empty text`);
  if (o.unit !== "cycles" && o.unit !== "ns") fail(`"unit" must be "cycles" or "ns"`);
  const nonneg = (v: unknown, field: string): number => (typeof v === "number" && Number.isFinite(v) && v >= 0 ? v : fail(`"${field}" must be a finite number >= 0`));
  nonneg(o.call, "call");
  if (o.clock_hz !== undefined && !(typeof o.clock_hz === "number" && o.clock_hz > 0)) fail(`"clock_hz" must be a number > 0`);
  if (typeof o.ops !== "object" || o.ops === null || Array.isArray(o.ops)) fail(`"ops" must be an object of operation -> cost`);
  for (const [k, v] of Object.entries(o.ops as object)) {
    if (!(OP_NAMES as readonly string[]).includes(k)) fail(`"ops.${k}": unknown operation (known: ${OP_NAMES.join(", ")})`);
    nonneg(v, `ops.${k}`);
  }
  if (o.fused_multiply_add !== undefined && typeof o.fused_multiply_add !== "boolean") fail(`"fused_multiply_add" must be true or false`);
  if (o.fused_multiply_add === true && (o.ops as Record<string, unknown>).fma === undefined) fail(`"fused_multiply_add" is true but "ops.fma" is not given`);
  if (o.classes !== undefined) {
    if (typeof o.classes !== "object" || o.classes === null || Array.isArray(o.classes)) fail(`"classes" must be an object of instruction class -> cycles`);
    for (const [k, v] of Object.entries(o.classes as object)) {
      if (!(INSN_CLASSES as readonly string[]).includes(k)) fail(`"classes.${k}": unknown instruction class (known: ${INSN_CLASSES.join(", ")})`);
      nonneg(v, `classes.${k}`);
    }
  }
  return o as unknown as Profile;
}

export function readProfile(path: string): Profile {
  if (!existsSync(path)) throw new ProfileError(`--profile: no such file: ${path}`);
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(path, "utf8"));
  } catch (err) {
    throw new ProfileError(`${path}: not JSON (${(err as Error).message})`);
  }
  return validateProfile(parsed, path);
}

/** Cost of one call with these counts under the profile. Throws ProfileError for a used kind the profile lacks. */
export function predictCost(p: Profile, c: OpCounts): number {
  let cost = p.call;
  for (const n of OP_NAMES) {
    if (n === "fma" || c[n] === 0) continue;
    const unit = p.ops[n];
    if (unit === undefined) throw new ProfileError(`profile '${p.name}' gives no cost for '${n}', which the kernels use`);
    cost += c[n] * unit;
  }
  if (p.fused_multiply_add && c.fma > 0) cost += c.fma * (p.ops.fma! - (p.ops.mul ?? 0) - (p.ops.add ?? 0));
  return cost;
}

export interface Prediction {
  readonly routine: string;
  readonly mean: number;
  readonly worst: number;
  readonly worstInputs: readonly number[];
  /** worst in seconds when the profile gives clock_hz (cycles) or is in ns. */
  readonly worstSeconds?: number;
}

/** Mean and worst predicted cost of each routine's cases under a profile. */
export function predict(p: Profile, stats: readonly OpStats[]): Prediction[] {
  return stats.filter((s) => s.cases > 0).map((s) => {
    let sum = 0;
    let worst = -1;
    let worstInputs: readonly number[] = [];
    for (const c of s.perCase) {
      const v = predictCost(p, c.counts);
      sum += v;
      if (v > worst) {
        worst = v;
        worstInputs = c.inputs;
      }
    }
    const secs = p.unit === "ns" ? worst * 1e-9 : p.clock_hz ? worst / p.clock_hz : undefined;
    return { routine: s.routine, mean: sum / s.cases, worst, worstInputs, ...(secs !== undefined ? { worstSeconds: secs } : {}) };
  });
}
