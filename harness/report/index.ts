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
import { SPECS } from "../verify/specs/index.js";
import { findRoutine } from "../module/routines.js";
import { readVectors, vectorPath, col, type VectorSet } from "../verify/vectors.js";
import { ulpDistance, ulpDistance32 } from "../core/float.js";
import { iterationGridAxes } from "../perf/bench.js";
import { renderSvg, heatmapSpec, driftSpec, ulpHistogramSpec, type Cell, type DriftPoint, type HistBar } from "./plots.js";
import { existsSync } from "node:fs";

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

/** Fold a mean anomaly into [0, pi] (the solver's symmetry); undefined beyond 2^53. */
function foldM(M: number): number | undefined {
  const a = Math.abs(M);
  if (!(a < 2 ** 53)) return undefined;
  let m = a % (2 * Math.PI);
  if (m > Math.PI) m = 2 * Math.PI - m;
  return m;
}

/** Bin points into a grid of cells keeping the maximum value. */
function binMax(points: readonly { x: number; y: number; v: number }[], xs: readonly number[], ys: readonly number[]): Cell[] {
  const idx = (edges: readonly number[], v: number): number => {
    for (let i = 0; i < edges.length - 1; i++) if (v < edges[i + 1]!) return i;
    return edges.length - 2;
  };
  const cells = new Map<string, { x: number; y: number; v: number; n: number }>();
  for (const p of points) {
    const i = idx(xs, p.x);
    const j = idx(ys, p.y);
    const key = `${i},${j}`;
    const c = cells.get(key);
    if (!c) cells.set(key, { x: i, y: j, v: p.v, n: 1 });
    else {
      c.v = Math.max(c.v, p.v);
      c.n++;
    }
  }
  return [...cells.values()].map((c) => ({ x0: xs[c.x]!, x1: xs[c.x + 1]!, y0: ys[c.y]!, y1: ys[c.y + 1]!, value: c.v, cases: c.n }));
}

const linspace = (a: number, b: number, n: number): number[] => Array.from({ length: n + 1 }, (_, i) => a + ((b - a) * i) / n);

/** Error of the build on the kepler-elliptic suite, binned over (M folded to [0, pi], -log10(1 - e)). */
function errorMap(k: Kernels): { cells: Cell[]; cases: number } | string {
  const spec = SPECS.find((s) => s.suite === "kepler-elliptic");
  if (!spec || !existsSync(vectorPath(spec.suite))) return "the kepler-elliptic vector suite is missing";
  if (!k.has("kepler_elliptic")) return `${k.label} has no kepler_elliptic export`;
  const v = readVectors(vectorPath(spec.suite));
  const ce = col(v, "e");
  const cm = col(v, "M");
  const cr = col(v, "E_ref");
  const pts: { x: number; y: number; v: number }[] = [];
  for (const row of v.values) {
    const e = row[ce]!;
    const M = row[cm]!;
    const m = foldM(M);
    if (m === undefined) continue;
    if (k.realBytes === 4 && (Math.fround(e) !== e || Math.fround(M) !== M)) continue;
    const st = k.call("kepler_elliptic", [e, M]);
    if (st >= 16) continue;
    const got = k.out[0]!;
    const want = row[cr]!;
    const err = k.realBytes === 4 ? ulpDistance32(got, Math.fround(want)) : ulpDistance(got, want);
    pts.push({ x: m, y: e === 1 ? 16 : Math.min(16, -Math.log10(1 - e)), v: err });
  }
  return { cells: binMax(pts, linspace(0, Math.PI, 36), linspace(0, 16, 16)), cases: pts.length };
}

/** Cell edges around grid coordinates: midpoints between neighbours, the end cells mirrored. */
function edgesAround(c: readonly number[]): number[] {
  const e = [c[0]! - (c[1]! - c[0]!) / 2];
  for (let i = 0; i + 1 < c.length; i++) e.push((c[i]! + c[i + 1]!) / 2);
  e.push(c[c.length - 1]! + (c[c.length - 1]! - c[c.length - 2]!) / 2);
  return e;
}

/** Iteration counts of the build's elliptic solver over the bench grid: one cell per grid point. */
function iterationMap(k: Kernels): { cells: Cell[]; mean: number; worst: number; failures: number } | string {
  if (!k.has("kepler_elliptic")) return `${k.label} has no kepler_elliptic export`;
  const { e, M } = iterationGridAxes(64, 64);
  const ys = e.map((x) => (x === 0 ? 0 : -Math.log10(1 - x)));
  const xs = M.map((x) => Math.log10(x));
  const ye = edgesAround(ys);
  const xe = edgesAround(xs);
  const cells: Cell[] = [];
  let sum = 0;
  let worst = 0;
  let failures = 0;
  e.forEach((ei, i) => M.forEach((mj, j) => {
    const st = k.call("kepler_elliptic", [ei, mj]);
    if (st >= 16) failures++;
    const it = st < 16 ? k.out[1]! : -1;
    sum += Math.max(it, 0);
    worst = Math.max(worst, it);
    cells.push({ x0: xe[j]!, x1: xe[j + 1]!, y0: ye[i]!, y1: ye[i + 1]!, value: it, cases: 1 });
  }));
  return { cells, mean: sum / cells.length, worst, failures };
}

const METHODS: readonly [string, number][] = [["rk4", 0], ["verlet", 1], ["yoshida4", 2], ["butcher6", 3]];

/** Energy and angular-momentum deviation against time for each integrator on an invented unit orbit. */
function drift(k: Kernels, orbits: number): { points: DriftPoint[]; summary: Record<string, Record<string, number>> } | string {
  if (!k.has("integrate_begin") || !k.has("integrate_step")) return `${k.label} has no integrate_begin / integrate_step exports (the integrators are not in this module)`;
  // Invented scenario: mu = 1, a = 1, e = 0.1, started at periapsis; 100 steps an orbit.
  const e = 0.1;
  const r0 = 1 - e;
  const v0 = Math.sqrt((1 + e) / (1 - e));
  const perOrbit = 100;
  const h = (2 * Math.PI) / perOrbit;
  const points: DriftPoint[] = [];
  const summary: Record<string, Record<string, number>> = {};
  const block = Math.max(1, Math.floor((orbits * perOrbit) / 400));
  for (const [name, id] of METHODS) {
    const st = k.call("integrate_begin", [1, r0, 0, 0, 0, v0, 0, h, id, 0, 0, 1, 0, 0, 0, 0]);
    if (st >= 16) return `integrate_begin rejected the drift scenario (status ${st})`;
    let maxE = 0;
    let maxH = 0;
    for (let s = 1; s <= orbits * perOrbit; s++) {
      if (k.call("integrate_step", [1]) >= 16) break;
      maxE = Math.max(maxE, Math.abs(k.out[24]!));
      maxH = Math.max(maxH, Math.abs(k.out[25]!));
      if (s % block === 0) {
        points.push({ method: name, invariant: "energy", orbits: s / perOrbit, deviation: maxE });
        points.push({ method: name, invariant: "angular momentum", orbits: s / perOrbit, deviation: maxH });
        maxE = 0;
        maxH = 0;
      }
    }
    summary[name] = { energy_max: Math.abs(k.out[6]!), h_max: Math.abs(k.out[7]!) };
  }
  return { points, summary };
}

const BUCKETS: readonly [string, number][] = [["0", 0], ["1", 1], ["2", 2], ["3-4", 4], ["5-16", 16], ["17-256", 256], ["257-65536", 65536], ["> 65536", Infinity]];

function subset(v: VectorSet, max: number): VectorSet {
  if (v.values.length <= max) return v;
  const keep: number[] = [];
  const stride = v.values.length / max;
  for (let x = 0; Math.floor(x) < v.values.length && keep.length < max; x += stride) keep.push(Math.floor(x));
  return { ...v, values: keep.map((i) => v.values[i]!), tags: keep.map((i) => v.tags[i]!) };
}

/** ULP differences of other builds from the release build over (a spread subset of) every suite. */
async function buildHistograms(base: Kernels, builds: readonly string[], maxRows: number): Promise<{ bars: HistBar[]; notes: string[]; table: Record<string, Record<string, number>> } | string> {
  if (base.label !== "f64") return `the histograms compare other builds with the release build; this report is for ${base.label}`;
  const { loadNamedBuild, nativeUnavailable, closeNative, isBuildName } = await import("../module/builds.js");
  const { traceSuite } = await import("../verify/compare.js");
  const notes: string[] = [];
  const others: Kernels[] = [];
  for (const b of builds) {
    if (!isBuildName(b) || b === "f64") continue;
    if (b === "native") {
      const why = nativeUnavailable();
      if (why) {
        notes.push(`native: ${why}`);
        continue;
      }
    }
    try {
      others.push(loadNamedBuild(b));
    } catch (err) {
      notes.push(`${b}: not available (${(err as Error).message})`);
    }
  }
  if (others.length === 0) return `no other build could be loaded${notes.length ? `: ${notes.join("; ")}` : ""}`;
  const counts = new Map<string, number[]>(others.map((o) => [o.label, BUCKETS.map(() => 0)]));
  try {
    for (const spec of SPECS) {
      if (!existsSync(vectorPath(spec.suite)) || !findRoutine(spec.routine)) continue;
      const v = subset(readVectors(vectorPath(spec.suite)), maxRows);
      const tb = traceSuite(spec, base, v);
      for (const o of others) {
        if (o.realBytes !== 8 || !o.has(findRoutine(spec.routine)!.exportName)) continue;
        const to = traceSuite(spec, o, v);
        const c = counts.get(o.label)!;
        for (let i = 0; i < tb.values.length; i++) {
          const a = tb.values[i]!;
          const b = to.values[i]!;
          if (Number.isNaN(a) || Number.isNaN(b)) continue;
          const d = ulpDistance(a, b);
          c[BUCKETS.findIndex(([, hi]) => d <= hi)]!++;
        }
      }
    }
  } finally {
    if (others.some((o) => o.label === "native")) closeNative();
  }
  const bars: HistBar[] = [];
  const table: Record<string, Record<string, number>> = {};
  for (const [build, c] of counts) {
    table[build] = {};
    BUCKETS.forEach(([name], i) => {
      bars.push({ build, bucket: name, order: i, cases: c[i]! });
      table[build]![name] = c[i]!;
    });
  }
  return { bars, notes, table };
}

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
