/** `areal compare`: builds against each other on the vector suites, or two result CSVs of the same cases. */
import { existsSync, readFileSync } from "node:fs";
import { writeAtomic } from "../../core/atomic.js";
import { SPECS } from "../../verify/specs/index.js";
import { compareBuilds, formatBuildsReport, isCompareBuild, type CompareBuild } from "../../verify/compare-builds.js";
import { compareCsv, formatCsvComparison, parseTolerance, type CompareOptions, type Tolerance } from "../../verify/compare-files.js";
import { UsageError, type Command } from "../options.js";

/** --tol, --map, --ignore, --only as CompareOptions; a bad value names the flag. */
function fileOptions(values: Record<string, unknown>): CompareOptions {
  const tol: Record<string, Tolerance> = {};
  for (const t of (values.tol as string[] | undefined) ?? []) {
    const eq = t.lastIndexOf("=");
    const col = eq >= 0 ? t.slice(0, eq).trim() : "*";
    const spec = eq >= 0 ? t.slice(eq + 1) : t;
    const parsed = parseTolerance(spec);
    if (!parsed || col === "") throw new UsageError(`--tol: '${t}' is not [COLUMN=]X with X a number >= 0 followed by ulp, rel or abs (4ulp, 1e-12rel, 1e-9abs; a bare number is absolute)`);
    tol[col] = parsed;
  }
  const map: Record<string, string> = {};
  for (const m of (values.map as string[] | undefined) ?? []) {
    const parts = m.split("=");
    if (parts.length !== 2 || !parts[0]!.trim() || !parts[1]!.trim()) throw new UsageError(`--map: '${m}' is not THEIRS=OURS (b's column name = a's column name)`);
    map[parts[0]!.trim()] = parts[1]!.trim();
  }
  return { tol, map, ignore: values.ignore as string[] | undefined, only: values.only as string[] | undefined };
}

/** Both forms of the command. */
function compareRun(pos: readonly string[], values: Record<string, unknown>): number {
  const usage = (m: string): UsageError => new UsageError(m);
  if (pos.length > 0) {
    if (pos.length !== 2) throw usage(`compare takes two CSV files (got ${pos.length} names), or --builds`);
    if (values.builds !== undefined) throw usage("compare: give either two CSV files or --builds, not both");
    const [fa, fb] = pos as [string, string];
    for (const f of [fa, fb]) if (!existsSync(f)) throw usage(`compare: no such file: ${f}`);
    const c = compareCsv(readFileSync(fa, "utf8"), fa, readFileSync(fb, "utf8"), fb, fileOptions(values));
    process.stdout.write(formatCsvComparison(c, fa, fb));
    if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(c, null, 2) + "\n");
    return c.firstBeyond ? 1 : 0;
  }
  for (const o of ["tol", "map", "ignore", "only"]) if (values[o] !== undefined) throw usage(`--${o} applies to comparing two CSV files`);
  const list = ((values.builds as string | undefined) ?? "f64,native,js,f32").split(",").map((s) => s.trim()).filter(Boolean);
  for (const b of list) if (!isCompareBuild(b)) throw usage(`--builds: '${b}' is not one of f64, f32, js, native, debug, baseline, optimizing, or a FILE.so library or FILE.wasm module`);
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
  // So must your own source in its two builds (a .wasm and a .so, compared with each other).
  const mustAgree = (b: string): boolean => exact.has(b) || /\.(so|wasm)$/.test(b);
  const broken = mustAgree(rep.builds[0]!) ? rep.comparisons.filter((c) => mustAgree(c.build) && c.identical !== c.cases) : [];
  for (const c of broken) process.stderr.write(`areal: ${c.build} is not bit-identical to ${c.baseline} on ${c.suite} (${c.cases - c.identical} case(s))\n`);
  return broken.length ? 1 : 0;
}


export const compareCommand: Command = {
  summary: "compare builds on the vector suites (bits, ULP; exit 1 when builds that must agree bit for bit differ), or two result CSVs of the same cases, such as a trace of yours against areal's eval output: columns mapped, ignored or selected, status as a number or a word, tolerances per column in ulp, relative or absolute; the first and the worst rows beyond the tolerance per column (exit 1 beyond it)",
  options: ["builds", "suite", "json", "verbose"],
  alternative: { args: "a.csv b.csv", options: ["map", "ignore", "only", "tol", "json"] },
  run: (pos, values) => compareRun(pos, values),
};
