/** `areal start` (what `npm start` runs): every suite on the release build, the demo, the report. */
import { loadBuild } from "../../module/load.js";
import { demoLines } from "../../run/demo.js";
import { formatCheckTable } from "../../verify/summary.js";
import type { Command } from "../options.js";
import { reportFiles, runChecks, writeReport } from "../shared.js";
import { relative } from "node:path";

export const startCommand: Command = {
  summary: "check the release build against every suite, show the demo and write the report (what `npm start` runs)",
  options: ["verbose", "report", "bench-json", "counts-json"],
  async run(_pos, values) {
    const k = loadBuild("f64");
    const results = await runChecks(k, []);
    process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)) + "\n");
    process.stdout.write(demoLines(k).join("\n") + "\n");
    const rep = await writeReport((values.report as string | undefined) ?? "out/report", results, k, reportFiles(values));
    const shown = (p: string): string => (relative(process.cwd(), p).startsWith("..") ? p : relative(process.cwd(), p));
    process.stdout.write(`\nreport: ${shown(rep.html)} (open it in a browser)\nmachine-readable: ${shown(rep.json)}\n`);
    return results.every((r) => r.verdict !== "fail") ? 0 : 1;
  },
};
