/**
 * `areal check --report DIR` (and `npm start`): one self-contained HTML file, areal-report.html, and the same
 * results as JSON beside it (areal-report.json). Sections: a plain-language summary; the provenance; the suite
 * tables per family; the error map of the elliptic solver over the (e, M) plane; its iteration-count map;
 * invariant drift of the integrators; linear guidance against the two-body problem; ULP histograms of the other
 * builds; then per family (sections.ts): hyperbolic Kepler, propagation, transition matrices, Lambert, the
 * single-precision build in physical units, speed (--bench-json) and instruction counts (--counts-json); the
 * caution on flight use. Plots are Vega-Lite specifications rendered to inline SVG in Node (plots.ts); the file
 * loads nothing from anywhere and prints to PDF (print styles below).
 * A section whose data cannot be had (no integrator in the module, no other build) says why instead of a plot;
 * speed and counts without their files say "not measured".
 */
import { join, resolve } from "node:path";
import { writeAtomic } from "../core/atomic.js";
import type { SuiteResult, MetricResult } from "../verify/check.js";
import { formatFigure } from "../verify/check.js";
import { CAUTION, singleLossLine } from "../verify/summary.js";
import type { Kernels } from "../module/load.js";
import { renderSvg, heatmapSpec, driftSpec, ulpHistogramSpec, linearisationSpec } from "./plots.js";
import { errorMap, iterationMap, drift, buildHistograms, linearisation } from "./data.js";
import { provenanceOf, type Provenance } from "./provenance.js";
import { ABI_TABLE } from "../module/abi-table.js";
import { familySections, esc, type Section } from "./sections.js";

export interface ReportOptions {
  /** Builds compared with the release build in the ULP histograms (default js, and native when built). */
  readonly compareBuilds?: readonly string[];
  /** Rows per suite in the build comparison (evenly spread; default 1500). */
  readonly compareRows?: number;
  /** Orbits of the integrator drift runs (default 100, 100 steps an orbit). */
  readonly orbits?: number;
  /** `areal bench --json` output for the speed section ("not measured" without it). */
  readonly benchJson?: string;
  /** `areal count --json` output for the instruction-count section ("not measured" without it). */
  readonly countsJson?: string;
}

/** The provenance as a two-column table. */
function provenanceTable(p: Provenance, k: Kernels): string {
  const rows: [string, string][] = [
    ["module", `${p.module} (${k.realBytes === 8 ? "f64" : "f32"} reals)${p.module_file ? `, file ${p.module_file}` : ""}`],
    ["module SHA-256", p.module_sha256 ?? "not a file (no digest)"],
    ["commit", p.commit === null ? "not in a git checkout" : `${p.commit}${p.commit_dirty ? " with uncommitted changes" : ""}`],
    ["areal version", p.areal_version],
    ["Node.js / V8", `${p.node} / ${p.v8}`],
    ["host", p.host],
    ["generated", p.generated],
  ];
  return `<table class="prov"><tbody>${rows.map(([a, b]) => `<tr><th>${esc(a)}</th><td>${esc(b)}</td></tr>`).join("")}</tbody></table>`;
}


/** The unit of a routine's output column (from the ABI table), for the tables. */
function unitOf(routine: string, output: string): string {
  const x = ABI_TABLE.exports.find((e) => e.routine === routine);
  const u = x?.outputs.find((o) => o.name === output)?.unit;
  return u === undefined || u === "1" ? "" : u;
}

/** The limit of a metric as a reviewer reads it: the flat limit, and how conditioning widens it. */
function limitText(r: SuiteResult, m: MetricResult): string {
  const L = r.limits;
  const flat = m.metric === "ulp" ? `${L.max_ulp ?? "-"} ulp` : m.metric === "rel" ? `${formatFigure(L.max_rel ?? NaN)} relative` : `${formatFigure(L.max_abs ?? NaN)} absolute`;
  return L.cond_factor !== undefined ? `max(${flat}, ${L.cond_factor} x cond)` : flat;
}

/** One suite as table rows: one per compared output, with the measured worst, its limit and the verdict. */
function suiteRows(r: SuiteResult): string[] {
  const verdict = !r.applicable ? "n/a" : r.pass ? "pass" : "FAIL";
  const cls = verdict === "FAIL" ? ` class="fail"` : "";
  const it = r.maxIterations !== undefined ? `${r.maxIterations} (mean ${r.meanIterations?.toFixed(2)}; limit ${r.limits.max_iterations ?? "none"})` : "-";
  const span = (n: number): string => (n > 1 ? ` rowspan="${n}"` : "");
  const head = `<td${span(r.metrics.length)}>${esc(r.suite)}</td><td${span(r.metrics.length)}>${r.cases - r.skipped}${r.skipped ? ` (${r.skipped} not exact in this precision)` : ""}</td>`;
  const tail = (n: number): string => `<td${span(n)}>${it}</td><td${span(n)}>${esc(r.limits.why ?? "")}${r.reasons.length ? `<br><strong>${esc(r.reasons.join("; "))}</strong>` : ""}</td><td${span(n)}>${verdict}</td>`;
  if (r.metrics.length === 0) return [`<tr${cls}>${head}<td colspan="5">no value compared</td>${tail(1)}</tr>`];
  return r.metrics.map((m, i) => {
    const unit = unitOf(r.routine, m.output);
    const cells = `<td>${esc(m.output)}${unit ? ` [${esc(unit)}]` : ""}</td><td>${formatFigure(m.max)} ${m.metric === "ulp" ? "ulp" : m.metric === "rel" ? "rel" : esc(unit || "abs")}</td><td>${formatFigure(m.maxAbs)}${unit ? ` ${esc(unit)}` : ""}</td><td>${esc(limitText(r, m))}</td><td>${formatFigure(m.maxRatio)}</td>`;
    return `<tr${cls}>${i === 0 ? head : ""}${cells}${i === 0 ? tail(r.metrics.length) : ""}</tr>`;
  });
}

/** The suites grouped by the ABI table's families, one table each. */
function suiteTables(results: readonly SuiteResult[]): string {
  const groupOf = (r: SuiteResult): string => ABI_TABLE.exports.find((e) => e.routine === r.routine)?.group ?? "other";
  const th = "<tr><th>suite</th><th>cases</th><th>output [unit]</th><th>worst error</th><th>worst |got - want|</th><th>limit</th><th>worst / limit</th><th>iterations max</th><th>why this limit; failures</th><th>result</th></tr>";
  const groups = [...ABI_TABLE.groups, { name: "other", title: "Other" }];
  return groups.map((g) => {
    const rs = results.filter((r) => groupOf(r) === g.name);
    if (rs.length === 0) return "";
    return `<h3>${esc(g.title)}</h3><table><thead>${th}</thead><tbody>${rs.flatMap(suiteRows).join("")}</tbody></table>`;
  }).join("\n");
}

/** The plain-language conclusion at the top: what was checked, what passed, what failed and why. */
function summaryText(results: readonly SuiteResult[], k: Kernels, sections: readonly Section[]): string {
  const ran = results.filter((r) => r.applicable);
  const failed = ran.filter((r) => !r.pass);
  const na = results.length - ran.length;
  const cases = ran.reduce((n, r) => n + r.cases - r.skipped, 0);
  const lines = [`The ${esc(k.label)} build was run on ${cases.toLocaleString("en")} reference cases in ${ran.length} vector suites, each compared with values computed independently at 50 to 60 significant digits; a case passes when its error is within the suite's limit (a flat limit, widened where the problem itself is ill-conditioned by a stated factor times its conditioning) and its iteration count within the cap.`];
  lines.push(failed.length === 0 ? `<strong>All ${ran.length} suites passed.</strong>` : `<strong>${failed.length} of ${ran.length} suites FAILED:</strong> ${failed.map((r) => `${esc(r.suite)} (${esc(r.reasons.join("; "))})`).join("; ")}.`);
  if (na) lines.push(`${na} suite(s) were not applicable to this build (no case has inputs exact in its precision): neither passed nor failed.`);
  const lost = singleLossLine(results);
  if (lost) lines.push(esc(lost));
  const fam = sections.filter((s) => s.outcome !== undefined);
  if (fam.length > 0) {
    const bad = fam.filter((s) => s.pass === false);
    lines.push(`The family sections below run their own suites on this build, case by case: ${bad.length === 0 ? "all passed" : `<strong>${bad.length} FAILED</strong>`} (${fam.map((s) => esc(s.outcome!)).join(" ")})`);
  }
  const absent = sections.filter((s) => s.svg === undefined && s.table === undefined);
  if (absent.length > 0) lines.push(`Not shown: ${absent.map((s) => `${esc(s.title)} (${esc(s.absent ?? "")})`).join("; ")}.`);
  return lines.join(" ");
}

const STYLE = `body{font-family:Helvetica,Arial,sans-serif;max-width:1100px;margin:2em auto;padding:0 1em;color:#222}
h1{font-size:1.5em}h2{font-size:1.2em;margin-top:2em;border-bottom:1px solid #ccc}
table{border-collapse:collapse;font-size:.9em}td,th{border:1px solid #ccc;padding:.25em .5em;text-align:left}
tr.fail td{background:#fdd}.caution{background:#fff4d6;border:1px solid #e0b000;padding:.6em 1em}
.absent{color:#666;font-style:italic}figure{margin:1em 0}svg{max-width:100%;height:auto}
@media print{body{max-width:none;margin:0}h2{break-after:avoid}figure,tr{break-inside:avoid}table{font-size:.75em}}
@page{size:A4;margin:15mm}`;

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
      svg: await renderSvg(heatmapSpec("iterations per grid point", im.cells, "log10 M", "-log10(1 - e)", "iterations", "oranges", false, true)) });
  }
  const orbits = opts.orbits ?? 100;
  const dr = drift(k, orbits);
  if (typeof dr === "string") sections.push({ id: "drift", title: "Invariant drift of the integrators", intro: "", absent: dr });
  else {
    data.drift = { scenario: "invented: mu = 1, a = 1, e = 0.1, from periapsis, 100 steps an orbit", orbits, summary: dr.summary, points: dr.points };
    sections.push({ id: "drift", title: "Invariant drift of the integrators",
      intro: `Relative deviation of the energy and of the angular momentum from step 0 (largest within each time block), for each fixed-step method on an invented unit orbit (mu = 1, a = 1, e = 0.1, 100 steps an orbit, ${orbits} orbits), and, where the module carries the transition matrix (integrate_transition_begin, integrate_phi), its symplectic defect max |Phi~^T J Phi~ - J|, checked on every step. A secular method grows; a symplectic one stays bounded, and its transition matrix stays symplectic to round-off.`,
      svg: await renderSvg(driftSpec("invariant deviation against time", dr.points)) });
  }
  const lin = linearisation(k);
  if (typeof lin === "string") sections.push({ id: "linearisation", title: "Linear relative-motion guidance against the two-body problem", intro: "", absent: lin });
  else {
    data.linearisation = { scenario: "invented: circular and e = 0.1 chiefs at a = 7000 km, deputy s behind and s/2 out, sent to the chief in 0.4 orbit", points: lin };
    sections.push({ id: "linearisation", title: "Linear relative-motion guidance against the two-body problem",
      intro: "Two impulses from rendezvous_linear (Yamanaka-Ankersen 2002) for a deputy a separation s behind the chief in-track and s/2 radially out, sent to the chief's position in 0.4 of an orbit (invented chiefs: a circular 7000 km orbit and an e = 0.1 one). The first impulse is flown on the full two-body problem (from_relative, propagate, to_relative); the miss at the end is the linearisation error, growing with the square of the separation. docs/relative-motion.md has the tables and scripts/relative-linearisation.mjs takes your own geometry.",
      svg: await renderSvg(linearisationSpec("miss distance of linear guidance against separation", lin)) });
  }
  const hb = await buildHistograms(k, opts.compareBuilds ?? ["js", "native"], opts.compareRows ?? 1500);
  if (typeof hb === "string") sections.push({ id: "builds", title: "Build comparison", intro: "", absent: hb });
  else {
    data.build_comparison = { baseline: "f64", rows_per_suite: opts.compareRows ?? 1500, histogram: hb.table, notes: hb.notes };
    sections.push({ id: "builds", title: "Build comparison: ULP differences from the release build",
      intro: `Every output value of (an evenly spread subset of up to ${opts.compareRows ?? 1500} rows of) every vector suite, difference from the release WebAssembly build in ulp. The host-JS build uses the host's sin, cos, ... (within an ulp or so of the library compiled into the module); the native build should be bit-identical.${hb.notes.length ? ` Not compared: ${esc(hb.notes.join("; "))}.` : ""}`,
      svg: await renderSvg(ulpHistogramSpec("output values per ULP difference", hb.bars)) });
  }

  for (const s of await familySections(k, opts)) {
    sections.push(s);
    if (s.data !== undefined) data[s.id.replace(/-/g, "_")] = s.data;
  }

  const pass = results.every((r) => r.verdict !== "fail");
  const prov = provenanceOf(k.label);
  const generated = prov.generated;
  const body = sections.map((s) => `<section id="${s.id}"><h2>${esc(s.title)}</h2>${s.svg || s.table ? `<p>${s.intro}</p>${s.svg ? `<figure class="plot" data-plot="${s.id}">${s.svg}</figure>` : ""}${s.table ?? ""}` : `<p class="absent">${/^not measured/.test(s.absent ?? "") ? "" : "Not shown: "}${esc(s.absent ?? "")}.</p>`}</section>`).join("\n");
  const html = `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>areal verification report</title>
<style>${STYLE}</style></head><body>
<h1>areal verification report</h1>
<p class="caution"><strong>Caution.</strong> ${esc(CAUTION)}</p>
<section id="summary"><h2>Summary</h2><p>${summaryText(results, k, sections)}</p></section>
<section id="provenance"><h2>What was checked, with what</h2>${provenanceTable(prov, k)}</section>
<section id="suites"><h2>Vector suites</h2><p>Errors in ulp are distances to the correctly rounded reference; relative errors are |got - want| / |want| (of the vector, for grouped outputs); units are those of the inputs (km, s, km^3/s^2 in the built-in suites). The same results are in areal-report.json beside this file.</p>${suiteTables(results)}</section>
${body}
<p class="caution">${esc(CAUTION)}</p>
<script>${CHECK_SCRIPT}</script>
</body></html>
`;
  const htmlPath = resolve(join(dir, "areal-report.html"));
  const jsonPath = resolve(join(dir, "areal-report.json"));
  const json = { tool: "areal report", generated, provenance: prov, build: k.label, real_bytes: k.realBytes, pass, caution: CAUTION, suites: results, sections: sections.map((s) => ({ id: s.id, title: s.title, shown: s.svg !== undefined || s.table !== undefined, plot: s.svg !== undefined, ...(s.absent ? { absent: s.absent } : {}), ...(s.outcome ? { outcome: s.outcome, pass: s.pass } : {}) })), ...data };
  writeAtomic(htmlPath, html);
  writeAtomic(jsonPath, JSON.stringify(json, null, 2) + "\n");
  return { html: htmlPath, json: jsonPath };
}
