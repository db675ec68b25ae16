/** `areal check`: the vector suites against a build or an external module. */
import { writeAtomic } from "../../core/atomic.js";
import { parseWorkers } from "../../core/pool.js";
import { loadModule } from "../../module/builds.js";
import { loadLibrary } from "../../module/library.js";
import { planModule, skippedLines } from "../../module/signatures.js";
import { ROUTINES } from "../../module/routines.js";
import type { Kernels } from "../../module/load.js";
import { runSuitesOn, type SuiteResult } from "../../verify/check.js";
import { SPECS } from "../../verify/specs/index.js";
import { selectSpecs } from "../../verify/generate.js";
import { formatCheckTable, checkJson } from "../../verify/summary.js";
import { UsageError, type Command } from "../options.js";
import { arealPolicy, externalPolicy, readUserLimits, userPolicy, LimitsFileError, type LimitsPolicy } from "../../verify/limits.js";
import { callLimit, kernelSource, loadKernels, reportFiles, writeReport } from "../shared.js";

/** The user's limits file over a default policy (the default alone without one); a bad file is a usage error. */
function limitsPolicy(file: string | undefined, base: LimitsPolicy): LimitsPolicy {
  if (file === undefined) return base;
  const shapes = new Map(SPECS.map((s) => [s.suite, { metrics: s.compare.map((c) => c.metric), iterations: s.iterations !== undefined }]));
  try {
    return userPolicy(file, readUserLimits(file, shapes), base);
  } catch (err) {
    if (err instanceof LimitsFileError) throw new UsageError(`--limits: ${err.message}`);
    throw err;
  }
}

export const checkCommand: Command = {
  summary: "run the vector suites against a build or a module and compare with the references (exit 1 if one fails)",
  options: ["build", "module", "library", "call-limit", "suite", "limits", "json", "verbose", "workers", "report", "bench-json", "counts-json"],
  async run(_pos, values) {
    const workers = parseWorkers(values.workers as string | undefined);
    const lib = values.library as string | undefined;
    const mod = (values.module ?? lib) as string | undefined;
    const suites = (values.suite as string[] | undefined) ?? [];
    let k: Kernels;
    let results: SuiteResult[];
    if (mod !== undefined) {
      // An external module: run the suites whose exports it has (with the ABI's signatures), name the rest.
      if (values.build !== undefined) throw new UsageError(`--${lib !== undefined ? "library" : "module"} and --build exclude each other`);
      if (lib !== undefined && values.module !== undefined) throw new UsageError("--library and --module exclude each other");
      const policy = limitsPolicy(values.limits as string | undefined, externalPolicy());
      const m = lib !== undefined ? loadLibrary(lib) : loadModule(mod, callLimit(values));
      k = m.kernels;
      const plan = planModule(m.signatures, k.realBytes, suites.length === 0 ? SPECS : selectSpecs(suites), ROUTINES, mod);
      for (const line of skippedLines(plan)) process.stdout.write(`${line}\n`);
      if (plan.run.length === 0) {
        process.stderr.write(`areal: ${mod} has none of the exports the selected suites need (docs/abi.md)\n`);
        return 1;
      }
      process.stdout.write(`${policy.description}\n`);
      results = await runSuitesOn(plan.run, k, lib !== undefined ? { module: mod } : kernelSource(values), lib !== undefined ? 1 : workers, undefined, policy.limitsOf);
    } else {
      k = loadKernels(values);
      const own = values.limits === undefined ? undefined : limitsPolicy(values.limits as string, arealPolicy(k.label === "f32" ? "f32" : "f64"));
      if (own) process.stdout.write(`${own.description}\n`);
      results = await runSuitesOn(suites.length === 0 ? SPECS : selectSpecs(suites), k, kernelSource(values), workers, undefined, own?.limitsOf);
    }
    process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)));
    if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(checkJson(results, k), null, 2) + "\n");
    if (values.report !== undefined) process.stderr.write(`report: ${(await writeReport(values.report as string, results, k, reportFiles(values))).html}\n`);
    return results.every((r) => r.verdict !== "fail") ? 0 : 1;
  },
};
