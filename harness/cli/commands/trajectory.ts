/** `areal trajectory --plan FILE`: fixed-step integration of a plan, trajectory CSV and CCSDS OEM. */
import { existsSync, readFileSync } from "node:fs";
import { basename } from "node:path";
import { writeAtomic } from "../../core/atomic.js";
import { barText, progressLine, progressWanted } from "../../core/progress.js";
import { statusWord } from "../../module/status.js";
import { parsePlan, runTrajectory } from "../../run/trajectory.js";
import { UsageError, type Command } from "../options.js";
import { dateOption, loadKernels } from "../shared.js";

export const trajectoryCommand: Command = {
  summary: "fixed-step integration of a trajectory plan: a CSV with every step's state and invariants, a CCSDS OEM; exit 1 when a budget is broken",
  options: ["plan", "csv", "oem", "date", "build", "module"],
  required: ["plan"],
  run(_pos, values) {
    const file = values.plan as string | undefined;
    if (file === undefined) throw new UsageError("trajectory needs --plan FILE");
    if (!existsSync(file)) throw new UsageError(`--plan: no such file: ${file}`);
    const date = dateOption(values);
    const plan = parsePlan(readFileSync(file, "utf8"), file);
    const k = loadKernels(values);
    const base = basename(file).replace(/\.json$/i, "");
    const csvPath = (values.csv as string | undefined) ?? `${base}.csv`;
    const oemPath = (values.oem as string | undefined) ?? `${base}.oem`;
    const bar = progressLine(progressWanted());
    let res;
    try {
      res = runTrajectory(k, plan, { progress: (d, n) => bar.update(`${plan.spacecraft} ${plan.method} ${barText(d, n)}`), creationDate: `${date}T00:00:00`, source: k.label });
    } finally {
      bar.end();
    }
    writeAtomic(csvPath, res.csv);
    writeAtomic(oemPath, res.oem);
    const devs = Object.entries(res.maxDev).map(([n, d]) => `${n} ${d.toExponential(2)}`).join(", ");
    const broken = res.breaches.length ? `, ${res.breaches.length} budget(s) broken` : "";
    process.stderr.write(`trajectory: ${res.steps} steps of ${plan.step} s${broken}, max deviations ${devs} -> ${csvPath}, ${oemPath}\n`);
    let code = 0;
    if (res.status !== 0) {
      process.stderr.write(`areal: integration stopped at step ${res.steps + 1}: ${statusWord(res.status)}\n`);
      code = 1;
    }
    for (const b of res.breaches) {
      process.stderr.write(`areal: budget broken: ${b.invariant} deviation above ${b.budget} first at step ${b.step} (t = ${b.t} s); largest ${b.max.toExponential(3)}\n`);
      code = 1;
    }
    return code;
  },
};
