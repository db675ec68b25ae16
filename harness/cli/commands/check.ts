/** `areal check`: the vector suites against a build or an external module. */
import { writeAtomic } from "../../core/atomic.js";
import { parseWorkers } from "../../core/pool.js";
import { loadModule } from "../../module/builds.js";
import { planModule, skippedLines } from "../../module/signatures.js";
import { ROUTINES } from "../../module/routines.js";
import type { Kernels } from "../../module/load.js";
import { runSuitesOn, type SuiteResult } from "../../verify/check.js";
import { SPECS } from "../../verify/specs/index.js";
import { selectSpecs } from "../../verify/generate.js";
import { formatCheckTable, checkJson } from "../../verify/summary.js";
import { UsageError, type Command } from "../options.js";
import { kernelSource, loadKernels, writeReport } from "../shared.js";

export const checkCommand: Command = {
  summary: "run the vector suites against a build or a module and compare with the references (exit 1 if one fails)",
  options: ["build", "module", "suite", "json", "verbose", "workers", "report"],
  async run(_pos, values) {
    const workers = parseWorkers(values.workers as string | undefined);
    const mod = values.module as string | undefined;
    const suites = (values.suite as string[] | undefined) ?? [];
    let k: Kernels;
    let results: SuiteResult[];
    if (mod !== undefined) {
      // An external module: run the suites whose exports it has (with the ABI's signatures), name the rest.
      if (values.build !== undefined) throw new UsageError("--module and --build exclude each other");
      const m = loadModule(mod);
      k = m.kernels;
      const plan = planModule(m.signatures, k.realBytes, suites.length === 0 ? SPECS : selectSpecs(suites), ROUTINES, mod);
      for (const line of skippedLines(plan)) process.stdout.write(`${line}\n`);
      if (plan.run.length === 0) {
        process.stderr.write(`areal: ${mod} has none of the exports the selected suites need (docs/abi.md)\n`);
        return 1;
      }
      results = await runSuitesOn(plan.run, k, { module: mod }, workers);
    } else {
      k = loadKernels(values);
      results = await runSuitesOn(suites.length === 0 ? SPECS : selectSpecs(suites), k, kernelSource(values), workers);
    }
    process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)));
    if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(checkJson(results, k), null, 2) + "\n");
    if (values.report !== undefined) process.stderr.write(`report: ${(await writeReport(values.report as string, results, k)).html}\n`);
    return results.every((r) => r.pass) ? 0 : 1;
  },
};
