/** `areal compare`: builds against each other on the vector suites, or two result CSVs of the same cases. */
import { existsSync, readFileSync } from "node:fs";
import { writeAtomic } from "../../core/atomic.js";
import { SPECS } from "../../verify/specs/index.js";
import { compareBuilds, formatBuildsReport, isCompareBuild, type CompareBuild } from "../../verify/compare-builds.js";
import { compareCsv, formatCsvComparison } from "../../verify/compare-files.js";
import { UsageError, type Command } from "../options.js";

/** Both forms of the command. */
function compareRun(pos: readonly string[], values: Record<string, unknown>): number {
  const usage = (m: string): UsageError => new UsageError(m);
  const tolText = values.tol as string | undefined;
  if (pos.length > 0) {
    if (pos.length !== 2) throw usage(`compare takes two CSV files (got ${pos.length} names), or --builds`);
    if (values.builds !== undefined) throw usage("compare: give either two CSV files or --builds, not both");
    const tol = tolText === undefined ? 0 : Number(tolText);
    if (tolText !== undefined && (!Number.isFinite(tol) || tol < 0 || tolText.trim() === "")) throw usage(`--tol: '${tolText}' is not a non-negative number`);
    const [fa, fb] = pos as [string, string];
    for (const f of [fa, fb]) if (!existsSync(f)) throw usage(`compare: no such file: ${f}`);
    const c = compareCsv(readFileSync(fa, "utf8"), fa, readFileSync(fb, "utf8"), fb, tol);
    process.stdout.write(formatCsvComparison(c, fa, fb));
    if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(c, null, 2) + "\n");
    return c.firstBeyond ? 1 : 0;
  }
  if (tolText !== undefined) throw usage("--tol applies to comparing two CSV files");
  const list = ((values.builds as string | undefined) ?? "f64,native,js,f32").split(",").map((s) => s.trim()).filter(Boolean);
  for (const b of list) if (!isCompareBuild(b)) throw usage(`--builds: '${b}' is not one of f64, f32, js, native, debug, baseline, optimizing`);
  if (list.length < 2) throw usage("--builds needs at least two builds (the first is the baseline)");
  const suites = (values.suite as string[] | undefined) ?? [];
  const specs = suites.length === 0 ? SPECS : suites.map((s) => {
    const spec = SPECS.find((x) => x.suite === s);
    if (!spec) throw usage(`--suite: unknown suite '${s}' (known: ${SPECS.map((x) => x.suite).join(", ")})`);
    return spec;
  });
  const rep = compareBuilds(list as CompareBuild[], specs);
  process.stdout.write(formatBuildsReport(rep));
  if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(rep, null, 2) + "\n");
  // The release module under any engine tier and its native translation must agree bit for bit: exit 1 if not.
  const exact = new Set(["f64", "native", "baseline", "optimizing"]);
  const broken = exact.has(rep.builds[0]!) ? rep.comparisons.filter((c) => exact.has(c.build) && c.identical !== c.cases) : [];
  for (const c of broken) process.stderr.write(`areal: ${c.build} is not bit-identical to ${c.baseline} on ${c.suite} (${c.cases - c.identical} case(s))\n`);
  return broken.length ? 1 : 0;
}


export const compareCommand: Command = {
  summary: "compare builds on the vector suites (bits, ULP; exit 1 when builds that must agree bit for bit differ), or two result CSVs of the same cases (exit 1 beyond the tolerance)",
  options: ["builds", "suite", "json", "verbose"],
  alternative: { args: "a.csv b.csv", options: ["tol", "json"] },
  run: (pos, values) => compareRun(pos, values),
};
