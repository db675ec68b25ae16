/** Sweep grids: parsing and checking the JSON description, and the inputs of case i (docs/sweeps.md). */
import { createHash } from "node:crypto";
import type { Routine } from "../../module/routines.js";

export class SweepError extends Error {}

const DEFAULT_CHECKS = 16;
const DEFAULT_WORST = 8;
const MAX_CHECKS = 10_000;
const MAX_WORST = 1000;

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
export function axisValue(a: Axis, t: number): number {
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
export function gridValue(a: Axis, j: number): number {
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

