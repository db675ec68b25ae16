/** Accuracy and iteration limits, kept as data in vectors/limits.json (one entry per suite and build). */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { VECTORS_DIR } from "../core/paths.js";

export interface Limits {
  readonly max_ulp?: number;
  readonly max_rel?: number;
  readonly max_abs?: number;
  /** Relative limit widened to cond_factor * cond where a suite stores conditioning. */
  readonly cond_factor?: number;
  /**
   * The most the conditioning may widen a limit, in the metric's units (ulps, relative or absolute): where the
   * conditioning says the problem is so ill-conditioned that the widened limit would accept anything (100%
   * relative or more) while the build is measured far more accurate there.
   */
  readonly cond_cap?: number;
  /**
   * Rows (0-based, of the vector file) whose limit on an output is 100% relative or more on purpose, per output,
   * with the reason (README.md, "Tests", names them too). tests/limits-meaning.test.ts fails on any other such row.
   */
  readonly beyond_full_scale?: Readonly<Record<string, { readonly rows: readonly number[]; readonly why: string }>>;
  readonly max_iterations?: number;
  /** Why the limit is what it is (shown by `areal check --verbose`). */
  readonly why?: string;
}

type LimitsFile = Record<string, Record<string, Limits>>;

let cache: LimitsFile | undefined;

/** The limits of a suite for a build label (`f64`, `f32`, ...); external modules use the f64 limits. */
export function limitsFor(suite: string, build: string): Limits {
  cache ??= JSON.parse(readFileSync(join(VECTORS_DIR, "limits.json"), "utf8")) as LimitsFile;
  const entry = cache[suite];
  if (!entry) throw new Error(`vectors/limits.json has no entry for suite '${suite}'`);
  const lim = entry[build] ?? entry.f64;
  if (!lim) throw new Error(`vectors/limits.json: suite '${suite}' has no f64 limits`);
  return lim;
}

// ---------------------------------------------------------------------------------------------------------
// the user's own limits (`areal check --limits FILE`), and the default for code that is not areal's

/** Which limits a check applied, for the check output. */
export interface LimitsPolicy {
  /** One line saying where the limits come from. */
  readonly description: string;
  /** The limits of a suite. */
  limitsOf(suite: string): Limits;
}

/** areal's own kernels: vectors/limits.json, iteration caps included. */
export function arealPolicy(build: string): LimitsPolicy {
  return { description: "limits: areal's (vectors/limits.json), accuracy and iteration caps", limitsOf: (suite) => limitsFor(suite, build) };
}

/** areal's accuracy limits without its iteration caps: the caps describe areal's kernels, not someone else's. */
function accuracyOnly(suite: string): Limits {
  const { max_iterations: _cap, ...rest } = limitsFor(suite, "f64");
  return rest;
}

/** An external module or library: areal's accuracy limits, no iteration cap. */
export function externalPolicy(): LimitsPolicy {
  return { description: "limits: accuracy only (areal's accuracy limits from vectors/limits.json; its iteration caps apply to areal's kernels only)", limitsOf: accuracyOnly };
}

/** The fields a user's limits entry may have, and which comparison metric each serves. */
const USER_FIELDS = { max_ulp: "ulp", max_rel: "rel", max_abs: "abs", cond_factor: "", max_iterations: "", why: "" } as const;

/** What validation needs to know of each suite: the metrics it compares and whether it counts iterations. */
export interface SuiteShape {
  readonly metrics: readonly ("ulp" | "rel" | "abs")[];
  readonly iterations: boolean;
}

/**
 * Read and validate a user's limits file: `{ "<suite>" | "*": { max_ulp | max_rel | max_abs: number >= 0,
 * cond_factor?: number >= 0, max_iterations?: integer >= 0 | null, why?: string } }`. "*" applies to every suite
 * the file does not name. An entry's fields replace those of the default (areal's accuracy limits, no cap);
 * `max_iterations: null` says no cap. Throws Error naming the file and the field.
 */
export function readUserLimits(path: string, suites: ReadonlyMap<string, SuiteShape>): ReadonlyMap<string, Limits> {
  let text: string;
  try {
    text = readFileSync(path, "utf8");
  } catch (err) {
    throw new LimitsFileError(`${path}: cannot read the limits file (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`);
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (err) {
    throw new LimitsFileError(`${path}: not JSON (${(err as Error).message})`);
  }
  if (typeof data !== "object" || data === null || Array.isArray(data)) throw new LimitsFileError(`${path}: must be an object of suites ({"kepler-elliptic": {"max_ulp": 8}, ...})`);
  const out = new Map<string, Limits>();
  for (const [suite, entry] of Object.entries(data)) {
    const where = `${path}: ${suite}`;
    const shape = suites.get(suite);
    if (suite !== "*" && !shape) throw new LimitsFileError(`${where}: no such suite (known: ${[...suites.keys()].join(", ")}, or "*" for every suite)`);
    if (typeof entry !== "object" || entry === null || Array.isArray(entry)) throw new LimitsFileError(`${where}: must be an object of limits (max_ulp, max_rel, max_abs, cond_factor, max_iterations, why)`);
    const lim: Record<string, unknown> = {};
    for (const [field, value] of Object.entries(entry as Record<string, unknown>)) {
      const at = `${where}.${field}`;
      if (!(field in USER_FIELDS)) throw new LimitsFileError(`${at}: unknown field (known: ${Object.keys(USER_FIELDS).join(", ")})`);
      if (field === "why") {
        if (typeof value !== "string") throw new LimitsFileError(`${at}: must be a string`);
      } else if (field === "max_iterations") {
        if (value !== null && !(Number.isInteger(value) && (value as number) >= 0)) throw new LimitsFileError(`${at}: must be a whole number >= 0, or null for no cap (got ${JSON.stringify(value)})`);
        if (shape && !shape.iterations && value !== null) throw new LimitsFileError(`${at}: suite ${suite} counts no iterations`);
      } else {
        if (typeof value !== "number" || !Number.isFinite(value) || value < 0) throw new LimitsFileError(`${at}: must be a number >= 0 (got ${JSON.stringify(value)})`);
        const metric = USER_FIELDS[field as keyof typeof USER_FIELDS];
        if (shape && metric && !shape.metrics.includes(metric)) throw new LimitsFileError(`${at}: suite ${suite} compares in ${shape.metrics.join(" and ")}, not ${metric}`);
      }
      lim[field] = value;
    }
    out.set(suite, lim as Limits);
  }
  return out;
}

export class LimitsFileError extends Error {}

/** A user's limits over a default policy: an entry's fields replace the default's; null caps mean none. */
export function userPolicy(path: string, user: ReadonlyMap<string, Limits>, base: LimitsPolicy): LimitsPolicy {
  return {
    description: `limits: ${path} where it names a suite (or "*"), else ${base.description.replace(/^limits: /, "")}`,
    limitsOf(suite) {
      const own = user.get(suite) ?? user.get("*");
      if (!own) return base.limitsOf(suite);
      const merged: Record<string, unknown> = { ...base.limitsOf(suite), ...own };
      if (merged.max_iterations === null) delete merged.max_iterations;
      if (own.why === undefined) merged.why = `${path}`;
      return merged as Limits;
    },
  };
}
