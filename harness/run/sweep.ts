/**
 * `areal sweep`: run a routine over a domain described by a small JSON grid and summarise what happened: case
 * count, status counts, iteration histogram and, for the Kepler solvers, an error estimate for every case with
 * the worst inputs, plus a few high-precision (decimal.js) checks.
 *
 * The grid (a JSON file):
 *
 *   {
 *     "inputs": {                                   one entry per numeric input of the routine
 *       "e": { "from": 0, "to": 0.999999, "count": 1000, "spacing": "log-near-1" },
 *       "M": { "from": 1e-9, "to": 3.14, "count": 1000, "spacing": "log" }
 *     },
 *     "random": { "count": 100000, "seed": 7 },   optional: seeded random points over the same ranges
 *     "checks": 16,                                  optional: evenly spaced cases checked with decimal.js
 *     "worst": 8                                     optional: how many worst cases to keep (each checked too)
 *   }
 *
 * Spacing: "linear" (default); "log" (from and to of one sign, neither zero: evenly spaced logarithms); or
 * "log-near-1" (from, to < 1: 1 - x evenly spaced in logarithm, so points crowd towards 1, as e does near the
 * parabolic limit). Random points are uniform in the same variable (log-uniform for "log").
 *
 * Cases are numbered: first the grid (row-major, the first input varying slowest), then the random points.
 * Case i depends on i alone (random point j takes its numbers from a counter-based hash of the seed, j and the
 * input), so shard k of n, a contiguous range of case numbers, is the same cases on any machine with the same
 * Node version, and any split of the range (shards, worker threads, chunks) gives the same summary: counts
 * add, maxima and the worst list are taken under a total order (error, then case number), and the error sum
 * is kept exactly (Shewchuk 1997 partials in a canonical form). `areal merge` (merge.ts) relies on that.
 *
 * Error estimate (Kepler): the residual f of the equation at the returned root, evaluated with error-free
 * transformations (Dekker 1971 products, Knuth's two-sum) in the cancellation-free forms of the numerics notes
 * ((1 - e) E + e (E - sin E) - M near periapsis, with E - sin E from its series), divided by f' at the root and
 * by the spacing of doubles at the root: |f / f'| / ulp(E) is the distance to the true root in ULPs, to first
 * order. The host's sin, cosh and sinh carry about one ULP, so the estimate has a floor of about one ULP; the
 * decimal.js checks give the exact error (ULP distance to the correctly rounded root) on the cases they cover.
 */
import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { BUILD_FILES } from "../core/paths.js";
import { findRoutine, type Routine } from "../module/routines.js";
import type { Kernels } from "../module/load.js";
import { isOk, statusWord, statusCode } from "../module/status.js";
import { ulpDistance } from "../core/float.js";
import { referenceElliptic, referenceHyperbolic, referenceParabolic } from "../verify/reference/kepler.js";
import { REFERENCE_DIGITS } from "../verify/reference/decimal.js";
import { WorkerPool, type KernelSource } from "../core/pool.js";

export class SweepError extends Error {}

/** Identifies a sweep file and its layout. */
export const SWEEP_FORMAT = "areal-sweep 1";
/** Cases per job handed to a worker (any value gives the same summary). */
export const SWEEP_CHUNK = 1 << 18;
const DEFAULT_CHECKS = 16;
const DEFAULT_WORST = 8;
/** First failures (non-ok statuses) kept, in case order. */
const FAILURES_KEPT = 8;
const MAX_CHECKS = 10_000;
const MAX_WORST = 1000;

// ---------------------------------------------------------------------------------------------------------
// the grid

export type Spacing = "linear" | "log" | "log-near-1";
const SPACINGS: readonly Spacing[] = ["linear", "log", "log-near-1"];

export interface Axis {
  readonly name: string;
  readonly from: number;
  readonly to: number;
  readonly count: number;
  readonly spacing: Spacing;
}

/** A validated grid in canonical form (axes in the routine's argument order). */
export interface Grid {
  readonly axes: readonly Axis[];
  readonly random: { readonly count: number; readonly seed: number } | null;
  readonly checks: number;
  readonly worst: number;
}

function isObj(x: unknown): x is Record<string, unknown> {
  return typeof x === "object" && x !== null && !Array.isArray(x);
}

function wholeNumber(v: unknown, where: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
  if (typeof v !== "number" || !Number.isInteger(v) || v < min || v > max) throw new SweepError(`${where} must be a whole number from ${min} to ${max}, got ${JSON.stringify(v)}`);
  return v;
}

/** Parse and check a grid description for a routine; messages name the file and the field. */
export function parseGrid(text: string, source: string, routine: Routine): Grid {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new SweepError(`${source}: not JSON (${(err as Error).message})`);
  }
  return checkGrid(raw, source, routine);
}

/** Check a parsed grid (a JSON value) for a routine. */
export function checkGrid(raw: unknown, source: string, routine: Routine): Grid {
  if (!isObj(raw)) throw new SweepError(`${source}: the grid must be a JSON object with "inputs"`);
  for (const k of Object.keys(raw)) {
    if (!["inputs", "random", "checks", "worst"].includes(k)) throw new SweepError(`${source}: unknown field '${k}' (fields: inputs, random, checks, worst)`);
  }
  const inputs = raw.inputs;
  if (!isObj(inputs)) throw new SweepError(`${source}: "inputs" must be an object of input name -> {from, to, count, spacing}`);
  const names = routine.inputs.map((i) => i.name);
  for (const k of Object.keys(inputs)) {
    if (!names.includes(k)) throw new SweepError(`${source}: inputs.${k}: routine ${routine.name} has no input '${k}' (inputs: ${names.join(", ")})`);
  }
  const axes: Axis[] = [];
  for (const inp of routine.inputs) {
    const a = inputs[inp.name];
    if (a === undefined) {
      if (inp.default === undefined) throw new SweepError(`${source}: inputs.${inp.name} is missing (routine ${routine.name} needs ${names.filter((n, i) => routine.inputs[i]!.default === undefined).join(", ")})`);
      continue;
    }
    const w = `${source}: inputs.${inp.name}`;
    if (inp.choices || inp.integer) throw new SweepError(`${w}: sweeps take real-valued inputs only; '${inp.name}' is ${inp.choices ? "a choice" : "an integer"}`);
    if (!isObj(a)) throw new SweepError(`${w} must be an object {from, to, count, spacing}`);
    for (const k of Object.keys(a)) if (!["from", "to", "count", "spacing"].includes(k)) throw new SweepError(`${w}: unknown field '${k}' (fields: from, to, count, spacing)`);
    const from = a.from;
    const to = a.to;
    if (typeof from !== "number" || !Number.isFinite(from)) throw new SweepError(`${w}.from must be a finite number`);
    if (typeof to !== "number" || !Number.isFinite(to)) throw new SweepError(`${w}.to must be a finite number`);
    const count = a.count === undefined ? 1 : wholeNumber(a.count, `${w}.count`, 0);
    const spacing = (a.spacing ?? "linear") as Spacing;
    if (!SPACINGS.includes(spacing)) throw new SweepError(`${w}.spacing: '${String(a.spacing)}' is not one of ${SPACINGS.join(", ")}`);
    if (spacing === "log" && (from === 0 || to === 0 || from > 0 !== to > 0)) throw new SweepError(`${w}: log spacing needs from and to of one sign, neither zero`);
    if (spacing === "log-near-1" && !(from < 1 && to < 1)) throw new SweepError(`${w}: log-near-1 spacing needs from and to below 1`);
    axes.push({ name: inp.name, from, to, count, spacing });
  }
  if (axes.length === 0) throw new SweepError(`${source}: "inputs" names no input to sweep`);
  let random: Grid["random"] = null;
  if (raw.random !== undefined) {
    const r = raw.random;
    if (!isObj(r)) throw new SweepError(`${source}: "random" must be an object {count, seed}`);
    for (const k of Object.keys(r)) if (!["count", "seed"].includes(k)) throw new SweepError(`${source}: random: unknown field '${k}' (fields: count, seed)`);
    random = { count: wholeNumber(r.count, `${source}: random.count`, 0), seed: wholeNumber(r.seed, `${source}: random.seed`, 0, 0xffffffff) };
  }
  const checks = raw.checks === undefined ? DEFAULT_CHECKS : wholeNumber(raw.checks, `${source}: checks`, 0, MAX_CHECKS);
  const worst = raw.worst === undefined ? DEFAULT_WORST : wholeNumber(raw.worst, `${source}: worst`, 0, MAX_WORST);
  const g: Grid = { axes, random, checks, worst };
  const total = gridCases(g) + (random?.count ?? 0);
  if (!Number.isSafeInteger(total)) throw new SweepError(`${source}: ${total} cases is more than 2^53`);
  return g;
}

/** A grid as a sweep file stores it (canonical form, `axes`), checked again as if it were a grid file. */
export function storedGrid(raw: unknown, source: string, routine: Routine): Grid {
  if (!isObj(raw) || !Array.isArray(raw.axes)) throw new SweepError(`${source}: the "grid" field is missing or malformed`);
  const inputs: Record<string, unknown> = {};
  for (const a of raw.axes as unknown[]) {
    if (!isObj(a) || typeof a.name !== "string") throw new SweepError(`${source}: a grid axis has no name`);
    inputs[a.name] = { from: a.from, to: a.to, count: a.count, spacing: a.spacing };
  }
  return checkGrid({ inputs, ...(raw.random === null ? {} : { random: raw.random }), checks: raw.checks, worst: raw.worst }, source, routine);
}

/** Number of grid (not random) cases: the product of the counts (0 when there is no axis). */
export function gridCases(g: Grid): number {
  return g.axes.length === 0 ? 0 : g.axes.reduce((p, a) => p * a.count, 1);
}

/** Total number of cases. */
export function totalCases(g: Grid): number {
  return gridCases(g) + (g.random?.count ?? 0);
}

/** SHA-256 of the canonical grid, to recognise shards of one sweep. */
export function gridHash(g: Grid): string {
  return createHash("sha256").update(JSON.stringify(g)).digest("hex");
}

/** Value of an axis at t in [0, 1] (t = 1 gives `to` exactly). */
function axisValue(a: Axis, t: number): number {
  if (t === 0) return a.from;
  if (t === 1) return a.to;
  switch (a.spacing) {
    case "linear":
      return a.from + (a.to - a.from) * t;
    case "log":
      return a.from * Math.pow(a.to / a.from, t);
    case "log-near-1": {
      const g0 = 1 - a.from;
      return 1 - g0 * Math.pow((1 - a.to) / g0, t);
    }
  }
}

/** Grid point j of an axis. Linear points are (from (n-1-j) + to j) / (n-1): one rounding when exact products. */
function gridValue(a: Axis, j: number): number {
  if (a.count <= 1 || j === 0) return a.from;
  if (j === a.count - 1) return a.to;
  if (a.spacing === "linear") return (a.from * (a.count - 1 - j) + a.to * j) / (a.count - 1);
  return axisValue(a, j / (a.count - 1));
}

/** murmur3's 32-bit finaliser (Appleby 2008): spreads every input bit over the output. */
function mix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** A uniform double in [0, 1) from (seed, point, input), counter-based: no state, any point on its own. */
export function unitHash(seed: number, point: number, input: number): number {
  const lo = point >>> 0;
  const hi = Math.floor(point / 4294967296) >>> 0;
  const a = mix32((seed ^ mix32(lo ^ mix32((hi + Math.imul(input + 1, 0x9e3779b9)) >>> 0))) >>> 0);
  const b = mix32((a ^ 0x68e31da4 ^ mix32(lo + 0x7f4a7c15)) >>> 0);
  return ((a >>> 5) * 67108864 + (b >>> 6)) / 9007199254740992;
}

/** The inputs of case i (routine argument order, defaults filled in). */
export function caseInputs(routine: Routine, g: Grid, i: number): number[] {
  const G = gridCases(g);
  const vals = new Map<string, number>();
  if (i < G) {
    let rest = i;
    for (let d = g.axes.length - 1; d >= 0; d--) {
      const a = g.axes[d]!;
      const j = rest % a.count;
      rest = Math.floor(rest / a.count);
      vals.set(a.name, gridValue(a, j));
    }
  } else {
    const p = i - G;
    g.axes.forEach((a, d) => vals.set(a.name, axisValue(a, unitHash(g.random!.seed, p, d))));
  }
  return routine.inputs.map((inp) => vals.get(inp.name) ?? inp.default!);
}

// ---------------------------------------------------------------------------------------------------------
// error estimates (error-free transformations: T. J. Dekker, "A floating-point technique for extending the
// available precision", Numer. Math. 18 (1971) 224-242; two-sum from D. E. Knuth, TAOCP vol. 2)

const SPLIT = 134217729; // 2^27 + 1
// The low parts of the last twoProd (LOW[0]), twoSum (LOW[1]) and oddRemainder (LOW[2]). A typed array, not
// module-level variables: V8 boxes every double stored in a module variable (a heap allocation per store, which
// made a 9,000,000-case sweep churn through 2 GB and kept two workers from running at full speed).
const LOW = new Float64Array(3);

function twoProd(a: number, b: number): number {
  const p = a * b;
  let t = SPLIT * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLIT * b;
  const bh = t - (t - b);
  const bl = b - bh;
  LOW[0] = al * bl - (((p - ah * bh) - al * bh) - ah * bl);
  return p;
}

function twoSum(a: number, b: number): number {
  const s = a + b;
  const bb = s - a;
  LOW[1] = (a - (s - bb)) + (b - bb);
  return s;
}

const F64 = new Float64Array(1);
const U32 = new Uint32Array(F64.buffer);
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0; // index of the high word

/** ULP by biased exponent: 2^(ex - 1075) for normal numbers, the smallest subnormal for ex = 0. */
const ULP_BY_EXPONENT = new Float64Array(2048);
for (let ex = 0; ex < 2047; ex++) ULP_BY_EXPONENT[ex] = Math.pow(2, Math.max(ex, 1) - 1075);
ULP_BY_EXPONENT[2047] = NaN;

/** Spacing of doubles at x (the ULP of x, at least the smallest subnormal). */
export function ulpAt(x: number): number {
  F64[0] = x;
  return ULP_BY_EXPONENT[(U32[HI]! >>> 20) & 0x7ff]!;
}

// x - sin x and sinh x - x for |x| <= 1: x^3 (1/3! -+ x^2/5! + x^4/7! -+ ...); 12 terms reach 2^-60. The
// leading x^3/6 is formed as a double-double (near periapsis it is as large as M itself); the rest, at most
// 5% of it, in plain doubles.
const ODD_TERMS = 12;
const INV_FACT: number[] = [];
{
  let f = 6;
  for (let n = 3; n < 3 + 2 * ODD_TERMS; n += 2) {
    INV_FACT.push(1 / f);
    f *= (n + 1) * (n + 2);
  }
}

/** x - sin x (sinh x - x when hyperbolic) for |x| <= 1, as the pair (result, LOW[2]). */
function oddRemainder(x: number, hyperbolic: boolean): number {
  const x2 = x * x;
  let s = 0;
  for (let k = ODD_TERMS - 1; k >= 1; k--) s = INV_FACT[k]! + (hyperbolic ? x2 * s : -x2 * s);
  const tail = hyperbolic ? x2 * s : -x2 * s; // the series after its first term, over x^3
  const a = twoProd(x, x);
  const al = LOW[0]!;
  const c = twoProd(x, a);
  const cl = LOW[0]! + x * al; // x^3 = c + cl
  const c6 = c / 6;
  const p = twoProd(c6, 6);
  const rem = ((c - p) - LOW[0]! + cl) / 6; // x^3 / 6 = c6 + rem
  const hi = twoSum(c6, c * tail);
  LOW[2] = LOW[1]! + rem + cl * tail;
  return hi;
}

/**
 * The Kepler residual (q + ql) x + e rem(x) - M for |x| <= 1, nearly error-free: q + ql is 1 - e (ellipse) or
 * e - 1 (hyperbola) exactly, rem(x) is x - sin x or sinh x - x (oddRemainder), so no term cancels near x = 0.
 */
function smallResidual(q: number, ql: number, e: number, x: number, M: number, hyperbolic: boolean): number {
  const a = twoProd(q, x);
  const al = LOW[0]! + ql * x;
  const r = oddRemainder(x, hyperbolic);
  const b = twoProd(e, r);
  const bl = LOW[0]! + e * LOW[2]!;
  const s = twoSum(a, -M);
  const s1 = LOW[1]!;
  const t = twoSum(s, b);
  return t + (s1 + LOW[1]! + al + bl);
}

/** |E - E*| / ulp(E) for E - e sin E = M, to first order, from the residual. NaN when it cannot be evaluated. */
export function ellipticErrorUlps(e: number, M: number, E: number): number {
  if (E === M && (e === 0 || M === 0)) return 0;
  let f: number;
  if (Math.abs(E) <= 1) {
    const q = twoSum(1, -e); // 1 - e = q + LOW[1] exactly (LOW[1] = 0 for e >= 1/2, Sterbenz)
    f = smallResidual(q, LOW[1]!, e, E, M, false);
  } else {
    const b = twoProd(e, Math.sin(E));
    const bl = LOW[0]!;
    const d = twoSum(E, -M);
    const d1 = LOW[1]!;
    const t = twoSum(d, -b);
    f = t + (d1 + LOW[1]! - bl);
  }
  const h = Math.sin(E / 2);
  const fp = (1 - e) + 2 * e * h * h; // 1 - e cos E without cancellation
  return Math.abs(f) / fp / ulpAt(E);
}

/** |H - H*| / ulp(H) for e sinh H - H = M. */
export function hyperbolicErrorUlps(e: number, M: number, H: number): number {
  if (H === 0 && M === 0) return 0;
  let f: number;
  if (Math.abs(H) <= 1) {
    const q = twoSum(e, -1); // e - 1 = q + LOW[1] exactly (LOW[1] = 0 for e <= 2, Sterbenz)
    f = smallResidual(q, LOW[1]!, e, H, M, true);
  } else {
    const b = twoProd(e, Math.sinh(H));
    const bl = LOW[0]!;
    const t = twoSum(b, -H);
    const t1 = LOW[1]!;
    const u = twoSum(t, -M);
    f = u + (t1 + LOW[1]! + bl);
  }
  const h = Math.sinh(H / 2);
  const fp = (e - 1) + 2 * e * h * h; // e cosh H - 1
  return Math.abs(f) / fp / ulpAt(H);
}

/** |D - D*| / ulp(D) for Barker's equation D + D^3/3 = M. */
export function parabolicErrorUlps(M: number, D: number): number {
  if (D === 0 && M === 0) return 0;
  const a = twoProd(D, D);
  const al = LOW[0]!;
  const c = twoProd(D, a);
  const cl = LOW[0]! + D * al;
  const c3 = c / 3;
  const p = twoProd(c3, 3);
  const rem = ((c - p) - LOW[0]! + cl) / 3; // D^3/3 = c3 + rem
  const s = twoSum(D, -M);
  const s1 = LOW[1]!;
  const t = twoSum(s, c3);
  const f = t + (s1 + LOW[1]! + rem);
  return Math.abs(f) / (1 + D * D) / ulpAt(D);
}

interface ErrorModel {
  readonly measure: string;
  /** The estimate for one case from its arguments and the first output. */
  estimate(args: readonly number[], got: number): number;
  /** The correctly rounded first output, from decimal.js. */
  reference(args: readonly number[]): number;
}

const ERROR_MODELS: Readonly<Record<string, ErrorModel>> = {
  "kepler-elliptic": {
    measure: "|f/f'|/ulp(E) with f = (1-e)E + e(E - sin E) - M evaluated error-free",
    estimate: (a, E) => ellipticErrorUlps(a[0]!, a[1]!, E),
    reference: (a) => referenceElliptic(a[0]!, a[1]!),
  },
  "kepler-hyperbolic": {
    measure: "|f/f'|/ulp(H) with f = (e-1)H + e(sinh H - H) - M evaluated error-free",
    estimate: (a, H) => hyperbolicErrorUlps(a[0]!, a[1]!, H),
    reference: (a) => referenceHyperbolic(a[0]!, a[1]!),
  },
  "kepler-parabolic": {
    measure: "|f/f'|/ulp(D) with f = D + D^3/3 - M evaluated error-free",
    estimate: (a, D) => parabolicErrorUlps(a[0]!, D),
    reference: (a) => referenceParabolic(a[0]!),
  },
};

// ---------------------------------------------------------------------------------------------------------
// exact sums

/**
 * Add x to the n non-overlapping partials p[0..n) (J. R. Shewchuk, "Adaptive precision floating-point
 * arithmetic and fast robust geometric predicates", Discrete Comput. Geom. 18 (1997) 305-363): the partials
 * hold the sum exactly. Writes p[0..m) and returns m (at most n + 1).
 */
function addPartial(p: { [i: number]: number }, n: number, x: number): number {
  let i = 0;
  for (let j = 0; j < n; j++) {
    let y = p[j]!;
    if (Math.abs(x) < Math.abs(y)) {
      const t = x;
      x = y;
      y = t;
    }
    const hi = x + y;
    const lo = y - (hi - x);
    if (lo !== 0) p[i++] = lo;
    x = hi;
  }
  p[i] = x;
  return i + 1;
}

/** addPartial on a list. */
function addExact(p: number[], x: number): void {
  p.length = addPartial(p, p.length, x);
}

/**
 * addExact on a fixed buffer, for the per-case loop of sweepRange: an array whose length goes down and up on
 * every case reallocates its store (that and boxed doubles made a 9,000,000-case sweep churn through 2 GB).
 * Non-overlapping doubles span at most 2098 bits, so there are at most 40 partials (53 bits each, at least).
 */
class ExactSum {
  private readonly p = new Float64Array(48);
  private n = 0;

  add(x: number): void {
    this.n = addPartial(this.p, this.n, x);
  }

  /** The partials, as addExact leaves them. */
  partials(): number[] {
    return Array.from(this.p.subarray(0, this.n));
  }
}

/** The exact sum of the partials rounded to nearest (ties to even), as Python's math.fsum rounds it. */
function roundedSum(p: readonly number[]): number {
  let n = p.length;
  if (n === 0) return 0;
  let hi = p[--n]!;
  let lo = 0;
  while (n > 0) {
    const x = hi;
    const y = p[--n]!;
    hi = x + y;
    lo = y - (hi - x);
    if (lo !== 0) break;
  }
  if (n > 0 && ((lo < 0 && p[n - 1]! < 0) || (lo > 0 && p[n - 1]! > 0))) {
    const y = lo * 2;
    const x = hi + y;
    if (y === x - hi) hi = x;
  }
  return hi;
}

/** A canonical form of an exact sum: its rounded value, then the rounded remainder, and so on (unique). */
function canonicalSum(p: readonly number[]): number[] {
  const work = [...p];
  const out: number[] = [];
  for (let i = 0; i < 40; i++) {
    const v = roundedSum(work);
    if (v === 0) break;
    out.push(v);
    addExact(work, -v);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------------------
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
function caller(routine: Routine, k: Kernels): (a: readonly number[]) => number {
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

// ---------------------------------------------------------------------------------------------------------
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
