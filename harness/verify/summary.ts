/** Text and JSON forms of check results. */
import type { SuiteResult } from "./check.js";
import { formatFigure } from "./check.js";
import type { Kernels } from "../module/load.js";

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

/** The check table, one row per suite, then the worst cases and the verdict. */
export function formatCheckTable(results: readonly SuiteResult[], k: Kernels, verbose: boolean): string {
  const head = ["suite", "cases", "max error", "max abs", "iters max/mean", "limit", "result"];
  const rows = results.map((r) => [
    r.suite,
    String(r.cases - r.skipped) + (r.skipped ? ` (+${r.skipped} skipped)` : ""),
    metricText(r),
    r.metrics.map((m) => formatFigure(m.maxAbs)).join("; "),
    r.maxIterations !== undefined ? `${r.maxIterations} / ${r.meanIterations?.toFixed(2)}` : "-",
    limitText(r),
    !r.applicable ? "n/a" : r.pass ? "pass" : "FAIL",
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i]!.length)));
  const line = (cells: string[]): string => cells.map((c, i) => c.padEnd(widths[i]!)).join("  ").trimEnd();
  const out: string[] = [`areal check: build ${k.label} (${k.realBytes === 8 ? "f64" : "f32"} reals)`, line(head), line(widths.map((w) => "-".repeat(w)))];
  for (const row of rows) out.push(line(row));
  out.push("", "worst case per suite (inputs, tag, got, want):");
  for (const r of results) if (r.applicable) out.push(`  ${r.suite}: ${worstText(r)}`);
  for (const r of results) {
    if (!r.pass) out.push(`  FAIL ${r.suite}: ${r.reasons.join("; ")}`);
    if (verbose && r.iterationHistogram) {
      const h = Object.entries(r.iterationHistogram).map(([it, n]) => `${it}:${n}`).join(" ");
      out.push(`  ${r.suite} iterations histogram (iterations:cases): ${h}`);
    }
    if (verbose && r.limits.why) out.push(`  ${r.suite} limit: ${r.limits.why}`);
  }
  const failed = results.filter((r) => !r.pass).length;
  const na = results.filter((r) => !r.applicable).length;
  out.push("", `${results.length - failed - na} suite(s) passed, ${failed} failed${na ? `, ${na} not applicable to this build (inputs not exact in its precision)` : ""}.`, CAUTION);
  return out.join("\n") + "\n";
}

/** The machine-readable form of the same results. */
export function checkJson(results: readonly SuiteResult[], k: Kernels): object {
  return {
    tool: "areal check",
    build: k.label,
    real_bytes: k.realBytes,
    pass: results.every((r) => r.pass),
    caution: CAUTION,
    suites: results,
  };
}
