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
