/**
 * `areal check --report DIR` (and `npm start`): one self-contained HTML file, areal-report.html, and the same
 * results as JSON beside it (areal-report.json). Sections: the suite table; the error map of the elliptic solver
 * over the (e, M) plane; its iteration-count map; invariant drift against time for the integrators; ULP histograms
 * of the other builds against the release build; the caution on flight use. Plots are Vega-Lite specifications
 * rendered to inline SVG in Node (plots.ts); the file loads nothing from anywhere.
 * A section whose data cannot be had (no integrator in the module, no other build) says why instead of a plot.
 */
import { join, resolve } from "node:path";
import { writeAtomic } from "../core/atomic.js";
import type { SuiteResult } from "../verify/check.js";
import { formatFigure } from "../verify/check.js";
import { CAUTION } from "../verify/summary.js";
import type { Kernels } from "../module/load.js";
import { renderSvg, heatmapSpec, driftSpec, ulpHistogramSpec } from "./plots.js";
import { errorMap, iterationMap, drift, buildHistograms } from "./data.js";

export interface ReportOptions {
  /** Builds compared with the release build in the ULP histograms (default js, and native when built). */
  readonly compareBuilds?: readonly string[];
  /** Rows per suite in the build comparison (evenly spread; default 1500). */
  readonly compareRows?: number;
  /** Orbits of the integrator drift runs (default 100, 100 steps an orbit). */
  readonly orbits?: number;
}

interface Section {
  readonly id: string;
  readonly title: string;
  readonly intro: string;
  readonly svg?: string;
  /** Why there is no plot. */
  readonly absent?: string;
}

const esc = (s: string): string => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

function suiteTable(results: readonly SuiteResult[]): string {
  const rows = results.map((r) => {
    const err = r.metrics.map((m) => `${esc(m.output)} ${formatFigure(m.max)} ${m.metric}`).join("; ");
    const it = r.maxIterations !== undefined ? `${r.maxIterations} / ${r.meanIterations?.toFixed(2)}` : "-";
    const verdict = !r.applicable ? "n/a" : r.pass ? "pass" : "FAIL";
    return `<tr class="${verdict === "FAIL" ? "fail" : ""}"><td>${esc(r.suite)}</td><td>${r.cases - r.skipped}</td><td>${err}</td><td>${it}</td><td>${esc(r.reasons.join("; ") || "")}</td><td>${verdict}</td></tr>`;
  });
  return `<table><thead><tr><th>suite</th><th>cases</th><th>max error</th><th>iterations max / mean</th><th>reasons</th><th>result</th></tr></thead><tbody>${rows.join("")}</tbody></table>`;
}

const STYLE = `body{font-family:Helvetica,Arial,sans-serif;max-width:1100px;margin:2em auto;padding:0 1em;color:#222}
h1{font-size:1.5em}h2{font-size:1.2em;margin-top:2em;border-bottom:1px solid #ccc}
table{border-collapse:collapse;font-size:.9em}td,th{border:1px solid #ccc;padding:.25em .5em;text-align:left}
tr.fail td{background:#fdd}.caution{background:#fff4d6;border:1px solid #e0b000;padding:.6em 1em}
.absent{color:#666;font-style:italic}figure{margin:1em 0}`;

/** Checks in the browser that every plot has a rendered SVG with marks; the result goes to data attributes. */
export const CHECK_SCRIPT = `(function(){var f=document.querySelectorAll('figure.plot'),ok=0;f.forEach(function(x){var s=x.querySelector('svg');
var m=s?s.querySelectorAll('g.role-mark > *').length:0;var b=s?s.getBoundingClientRect():{width:0,height:0};
var good=m>0&&b.width>0&&b.height>0;x.setAttribute('data-marks',String(m));if(good)ok++;});
document.documentElement.setAttribute('data-plots',String(f.length));document.documentElement.setAttribute('data-plots-rendered',String(ok));})();`;

/** Write areal-report.html and areal-report.json into dir. Returns their paths. */
export async function writeReport(dir: string, results: readonly SuiteResult[], k: Kernels, opts: ReportOptions = {}): Promise<{ html: string; json: string }> {
  const sections: Section[] = [];
  const data: Record<string, unknown> = {};

  const em = errorMap(k);
  if (typeof em === "string") sections.push({ id: "error-map", title: "Error map of the elliptic solver", intro: "", absent: em });
  else {
    data.error_map = { x: "M folded to [0, pi] (rad)", y: "-log10(1 - e)", value: "largest error in the cell (ulp)", cases: em.cases, cells: em.cells };
    sections.push({ id: "error-map", title: "Error map of the elliptic solver over the (e, M) plane",
      intro: `Largest error in ulp per cell against the 60-digit references of the kepler-elliptic vector suite (${em.cases} cases, build ${esc(k.label)}). M is folded into [0, pi] by symmetry and whole turns; e is shown as -log10(1 - e), so the top of the map is the near-parabolic corner.`,
      svg: await renderSvg(heatmapSpec("largest error (ulp) per cell", em.cells, "M folded to [0, pi] (rad)", "-log10(1 - e)", "ulp", "viridis", true)) });
  }
  const im = iterationMap(k);
  if (typeof im === "string") sections.push({ id: "iteration-map", title: "Iteration counts", intro: "", absent: im });
  else {
    data.iteration_map = { x: "log10 M", y: "-log10(1 - e)", value: "largest iteration count in the cell", mean: im.mean, worst: im.worst, cells: im.cells };
    sections.push({ id: "iteration-map", title: "Iteration counts of the elliptic solver",
      intro: `Correction steps after the starter, on a 64 x 64 grid (e up to 1 - 1e-15, M from 1e-12 to pi); mean ${im.mean.toFixed(2)}, worst ${im.worst}${im.failures ? `, ${im.failures} not converged (shown as -1)` : ""}. 'areal bench' gives the histogram on a finer grid and the Newton baseline's counts.`,
      svg: await renderSvg(heatmapSpec("iterations per grid point", im.cells, "log10 M", "-log10(1 - e)", "iterations", "oranges", false)) });
  }
  const orbits = opts.orbits ?? 100;
  const dr = drift(k, orbits);
  if (typeof dr === "string") sections.push({ id: "drift", title: "Invariant drift of the integrators", intro: "", absent: dr });
  else {
    data.drift = { scenario: "invented: mu = 1, a = 1, e = 0.1, from periapsis, 100 steps an orbit", orbits, summary: dr.summary, points: dr.points };
    sections.push({ id: "drift", title: "Invariant drift of the integrators",
      intro: `Relative deviation of the energy and of the angular momentum from step 0 (largest within each time block), for each fixed-step method on an invented unit orbit (mu = 1, a = 1, e = 0.1, 100 steps an orbit, ${orbits} orbits). A secular method grows; a symplectic one stays bounded.`,
      svg: await renderSvg(driftSpec("invariant deviation against time", dr.points)) });
  }
  const hb = await buildHistograms(k, opts.compareBuilds ?? ["js", "native"], opts.compareRows ?? 1500);
  if (typeof hb === "string") sections.push({ id: "builds", title: "Build comparison", intro: "", absent: hb });
  else {
    data.build_comparison = { baseline: "f64", rows_per_suite: opts.compareRows ?? 1500, histogram: hb.table, notes: hb.notes };
    sections.push({ id: "builds", title: "Build comparison: ULP differences from the release build",
      intro: `Every output value of (an evenly spread subset of up to ${opts.compareRows ?? 1500} rows of) every vector suite, difference from the release WebAssembly build in ulp. The host-JS build uses the host's sin, cos, ... (within an ulp or so of the library compiled into the module); the native build should be bit-identical.${hb.notes.length ? ` Not compared: ${esc(hb.notes.join("; "))}.` : ""}`,
      svg: await renderSvg(ulpHistogramSpec("output values per ULP difference", hb.bars)) });
  }

  const pass = results.every((r) => r.pass);
  const generated = new Date().toISOString();
  const body = sections.map((s) => `<section id="${s.id}"><h2>${esc(s.title)}</h2>${s.svg ? `<p>${s.intro}</p><figure class="plot" data-plot="${s.id}">${s.svg}</figure>` : `<p class="absent">Not shown: ${esc(s.absent ?? "")}.</p>`}</section>`).join("\n");
  const html = `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>areal verification report</title>
<style>${STYLE}</style></head><body>
<h1>areal verification report</h1>
<p class="caution"><strong>Caution.</strong> ${esc(CAUTION)}</p>
<p>Build <strong>${esc(k.label)}</strong> (${k.realBytes === 8 ? "f64" : "f32"} reals), generated ${esc(generated)}. Result: <strong>${pass ? "every suite passed" : "at least one suite FAILED"}</strong>. The same results are in areal-report.json beside this file.</p>
<section id="suites"><h2>Vector suites</h2>${suiteTable(results)}</section>
${body}
<p class="caution">${esc(CAUTION)}</p>
<script>${CHECK_SCRIPT}</script>
</body></html>
`;
  const htmlPath = resolve(join(dir, "areal-report.html"));
  const jsonPath = resolve(join(dir, "areal-report.json"));
  const json = { tool: "areal report", generated, build: k.label, real_bytes: k.realBytes, pass, caution: CAUTION, suites: results, sections: sections.map((s) => ({ id: s.id, title: s.title, shown: s.svg !== undefined, ...(s.absent ? { absent: s.absent } : {}) })), ...data };
  writeAtomic(htmlPath, html);
  writeAtomic(jsonPath, JSON.stringify(json, null, 2) + "\n");
  return { html: htmlPath, json: jsonPath };
}
