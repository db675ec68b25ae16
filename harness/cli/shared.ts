/** What several commands share: choosing the module, naming a routine, dates, the lazily loaded report writer. */
import { ROUTINES, findRoutine, type Routine } from "../module/routines.js";
import { loadFile, type Kernels } from "../module/load.js";
import { loadNamedBuild, type BuildName } from "../module/builds.js";
import type { KernelSource } from "../core/pool.js";
import { runSuite, type SuiteResult } from "../verify/check.js";
import { SPECS } from "../verify/specs/index.js";
import { selectSpecs } from "../verify/generate.js";
import { UsageError, unknownName } from "./options.js";

/** The kernels a command runs: `--module FILE` or `--build NAME` (default f64), not both. */
export function loadKernels(values: Record<string, unknown>): Kernels {
  const mod = values.module as string | undefined;
  if (mod !== undefined) {
    if (values.build !== undefined) throw new UsageError("--module and --build exclude each other");
    return loadFile(mod);
  }
  return loadNamedBuild(((values.build as string | undefined) ?? "f64") as BuildName);
}

/** Which module worker threads load: the same as loadKernels. */
export function kernelSource(values: Record<string, unknown>): KernelSource {
  const mod = values.module as string | undefined;
  return mod !== undefined ? { module: mod } : { build: (values.build as string | undefined) ?? "f64" };
}

/** The routine named by a command's first positional, with "did you mean" for a typo. */
export function routineArg(command: string, name: string | undefined): Routine {
  const names = ROUTINES.map((r) => r.name);
  if (name === undefined) throw new UsageError(`${command} needs a routine: ${names.join(", ")}`);
  const r = findRoutine(name);
  if (!r) throw unknownName("routine", name, names);
  return r;
}

/** `--date YYYY-MM-DD`, default today (UTC). */
export function dateOption(values: Record<string, unknown>): string {
  const date = (values.date as string | undefined) ?? new Date().toISOString().slice(0, 10);
  if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) throw new UsageError(`--date: '${date}' is not YYYY-MM-DD`);
  return date;
}

/** Run the selected suites (all when none are named) in this thread. */
export function runChecks(k: Kernels, suites: readonly string[]): SuiteResult[] {
  const specs = suites.length === 0 ? SPECS : selectSpecs(suites);
  return specs.map((s) => runSuite(s, k));
}

/**
 * The HTML report writer (report/html.ts), loaded on first use: vega and vega-lite take about 0.3 s to load,
 * which every other command would pay at start.
 */
export async function writeReport(...args: Parameters<typeof import("../report/html.js").writeReport>): ReturnType<typeof import("../report/html.js").writeReport> {
  const m = await import("../report/html.js");
  return m.writeReport(...args);
}
