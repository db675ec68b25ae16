/** What several commands share: choosing the module, naming a routine, dates, the lazily loaded report writer. */
import { ROUTINES, findRoutine, type Routine } from "../module/routines.js";
import type { Kernels } from "../module/load.js";
import { loadModule, loadNamedBuild, type BuildName } from "../module/builds.js";
import { parseCallLimit } from "../module/bounded.js";
import { loadLibrary } from "../module/library.js";
import type { KernelSource } from "../core/pool.js";
import type { SuiteResult } from "../verify/check.js";
import { UsageError, unknownName } from "./options.js";

/** `--call-limit SECONDS` (default 10): the time limit of each call into a `--module`. */
export function callLimit(values: Record<string, unknown>): number {
  return parseCallLimit(values["call-limit"] as string | undefined);
}

/**
 * The kernels a command runs: `--module FILE`, `--library FILE.so` or `--build NAME` (default f64), one of
 * them. A module is checked against the ABI's signatures and runs with every call bounded (module/bounded.ts);
 * a library runs in a child process (module/library.ts); builds run directly.
 */
export function loadKernels(values: Record<string, unknown>): Kernels {
  const mod = values.module as string | undefined;
  const lib = values.library as string | undefined;
  if (lib !== undefined) {
    if (mod !== undefined || values.build !== undefined) throw new UsageError("--library excludes --module and --build");
    return loadLibrary(lib).kernels;
  }
  if (mod !== undefined) {
    if (values.build !== undefined) throw new UsageError("--module and --build exclude each other");
    return loadModule(mod, callLimit(values)).kernels;
  }
  if (values["call-limit"] !== undefined) throw new UsageError("--call-limit applies to --module only");
  return loadNamedBuild(((values.build as string | undefined) ?? "f64") as BuildName);
}

/** Which module worker threads load: the same as loadKernels. */
export function kernelSource(values: Record<string, unknown>): KernelSource {
  const mod = values.module as string | undefined;
  return mod !== undefined ? { module: mod, callLimit: callLimit(values) } : { build: (values.build as string | undefined) ?? "f64" };
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

/**
 * Run the selected suites (all when none are named) in this thread. The suites and their references are loaded
 * here, not when this file is (every command that runs kernels imports it).
 */
export async function runChecks(k: Kernels, suites: readonly string[]): Promise<SuiteResult[]> {
  const [{ runSuite }, { SPECS }, { selectSpecs }] = await Promise.all([import("../verify/check.js"), import("../verify/specs/index.js"), import("../verify/generate.js")]);
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

/** The measurement files the report shows (--bench-json, --counts-json), as writeReport's options. */
export function reportFiles(values: Record<string, unknown>): { benchJson?: string; countsJson?: string } {
  const b = values["bench-json"] as string | undefined;
  const c = values["counts-json"] as string | undefined;
  return { ...(b !== undefined ? { benchJson: b } : {}), ...(c !== undefined ? { countsJson: c } : {}) };
}
