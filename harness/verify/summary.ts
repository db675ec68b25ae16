/** Text and JSON forms of check results. */
import type { SuiteResult } from "./check.js";
import { formatFigure } from "./check.js";
import type { Kernels } from "../module/load.js";
import { hang, wrap } from "../core/text.js";

export const CAUTION = "areal is an engineering tool, not flight software: flight use needs qualified verification and validation under your own process.";

function metricText(r: SuiteResult): string {
  return r.metrics.map((m) => `${m.output} ${formatFigure(m.max)}${m.metric === "ulp" ? " ulp" : m.metric === "rel" ? " rel" : " abs"}`).join("; ");
}

function worstText(r: SuiteResult): string {
  const worst = [...r.metrics].sort((a, b) => b.maxRatio - a.maxRatio)[0]?.worst;
  if (!worst) return "-";
  const ins = Object.entries(worst.inputs).map(([k, v]) => `${k}=${v}`).join(" ");
  return `${ins} (${worst.tag}) got ${worst.got} want ${worst.want}`;
}

function limitText(r: SuiteResult): string {
  const l = r.limits;
  const parts: string[] = [];
  if (l.max_ulp !== undefined) parts.push(`<=${l.max_ulp} ulp`);
  if (l.max_rel !== undefined) parts.push(`<=${l.max_rel} rel`);
  if (l.cond_factor !== undefined) parts.push(`or ${l.cond_factor}x cond`);
  if (l.max_abs !== undefined) parts.push(`<=${l.max_abs} abs`);
  if (l.max_iterations !== undefined) parts.push(`<=${l.max_iterations} it`);
  return parts.join(", ");
}

/** The metric of a suite nearest its limit (largest worst/limit). */
function worstMetric(r: SuiteResult): SuiteResult["metrics"][number] | undefined {
  return [...r.metrics].sort((a, b) => b.maxRatio - a.maxRatio)[0];
}

/**
 * The check table, one row per suite within 100 columns (the output nearest its limit, its worst error, and
 * worst/limit, the figure that decides), then the worst cases and the verdict. -v adds every output's figures,
 * the limits with their reasons and the iteration histograms.
 */
export function formatCheckTable(results: readonly SuiteResult[], k: Kernels, verbose: boolean): string {
  const head = ["suite", "cases", "output nearest its limit", "worst/limit", "iters max/mean", "result"];
  const rows = results.map((r) => {
    const m = worstMetric(r);
    return [
      r.suite,
      String(r.cases - r.skipped),
      m ? `${m.output} ${formatFigure(m.max)} ${m.metric}` : "-",
      m ? formatFigure(m.maxRatio) : "-",
      r.maxIterations !== undefined ? `${r.maxIterations} / ${r.meanIterations?.toFixed(2)}` : "-",
      !r.applicable ? "n/a" : r.pass ? "pass" : "FAIL",
    ];
  });
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i]!.length)));
  const line = (cells: string[]): string => cells.map((c, i) => c.padEnd(widths[i]!)).join("  ").trimEnd();
  const out: string[] = [`areal check: build ${k.label} (${k.realBytes === 8 ? "f64" : "f32"} reals)`, line(head), line(widths.map((w) => "-".repeat(w)))];
  for (const row of rows) out.push(line(row));
  out.push(...wrap("worst/limit: the largest error divided by its case's limit (a case passes at <= 1); n/a: no case has inputs exact in this build's precision. -v shows every output, the limits and their reasons.", 100, ""));
  out.push("", "worst case per suite (inputs, tag, got, want):");
  for (const r of results) if (r.applicable) out.push(...hang(`  ${r.suite}: `, worstText(r)));
  for (const r of results) {
    if (!r.pass && r.applicable) out.push(...hang(`  FAIL ${r.suite}: `, r.reasons.join("; ")));
    if (!verbose) continue;
    out.push(...hang(`  ${r.suite} errors: `, `${metricText(r)}; max abs ${r.metrics.map((m) => `${m.output} ${formatFigure(m.maxAbs)}`).join(", ")}`));
    out.push(...hang(`  ${r.suite} limit: `, `${limitText(r)}${r.limits.why ? ` (${r.limits.why})` : ""}`));
    if (r.iterationHistogram) out.push(...hang(`  ${r.suite} iterations (count:cases): `, Object.entries(r.iterationHistogram).map(([it, n]) => `${it}:${n}`).join(" ")));
  }
  const failed = results.filter((r) => !r.pass && r.applicable).length;
  const na = results.filter((r) => !r.applicable).length;
  out.push("", `${results.length - failed - na} suite(s) passed, ${failed} failed${na ? `, ${na} not applicable to this build (inputs not exact in its precision)` : ""}.`);
  const lost = singleLossLine(results);
  if (lost) out.push(...wrap(lost, 100, ""));
  out.push(...wrap(CAUTION, 100, ""));
  return out.join("\n") + "\n";
}

/**
 * The rows of every suite whose inputs lose their meaning in single precision (finite to infinite, non-zero to 0,
 * e rounded to 1), counted and named; undefined when there are none. On the f32 build those rows are among the
 * ones not exact in f32, which the check skips: the line says so, so that a summary cannot hide them.
 */
export function singleLossLine(results: readonly SuiteResult[]): string | undefined {
  const total: Record<string, number> = {};
  for (const r of results) for (const [w, n] of Object.entries(r.lostInSingle ?? {})) total[w] = (total[w] ?? 0) + n;
  const rows = total.rows ?? 0;
  if (rows === 0) return undefined;
  const kinds = Object.entries(total).filter(([w]) => w !== "rows").map(([w, n]) => `${w} (${n})`).join(", ");
  return `${rows} row${rows === 1 ? "" : "s"} lost meaning in single precision: ${kinds}; skipped with the other rows not exact in f32 (the f32 build is checked on the -f32in suites).`;
}

/** The machine-readable form of the same results. */
export function checkJson(results: readonly SuiteResult[], k: Kernels): object {
  return {
    tool: "areal check",
    build: k.label,
    real_bytes: k.realBytes,
    pass: results.every((r) => r.verdict !== "fail"),
    caution: CAUTION,
    suites: results,
  };
}
