/**
 * The report's sections per family beyond the elliptic solver: hyperbolic Kepler, propagation, Lambert, the
 * transition matrix, the single-precision build in physical units, speed and instruction counts. Each section is a
 * plot and/or a table with its data for the JSON, or the reason it cannot be shown ("not measured" for speed and
 * counts without their files).
 */
import type { Kernels } from "../module/load.js";
import type { SuiteResult } from "../verify/check.js";
import { formatFigure } from "../verify/check.js";
import { renderSvg, heatmapSpec, ratioSpec, barSpec, type RatioPoint } from "./plots.js";
import { hyperbolicMap, propagationCases, lambertCases, transitionCases, type CasePoint } from "./families.js";
import { physicalRows } from "./physical.js";
import { readSpeed, readCounts } from "./measured.js";

export interface Section {
  readonly id: string;
  readonly title: string;
  readonly intro: string;
  readonly svg?: string;
  /** An HTML table shown under the plot (or alone). */
  readonly table?: string;
  /** Why there is nothing to show. */
  readonly absent?: string;
  /** The section's data for the JSON. */
  readonly data?: unknown;
  /** The outcome of the suite behind the section, in one sentence, for the report's summary. */
  readonly outcome?: string;
  /** False when that suite failed. */
  readonly pass?: boolean;
}

export const esc = (s: string): string => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

/** A plain HTML table. */
export function htmlTable(head: readonly string[], rows: readonly (readonly string[])[]): string {
  return `<table><thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join("")}</tr></thead><tbody>${rows.map((r) => `<tr>${r.map((c) => `<td>${esc(c)}</td>`).join("")}</tr>`).join("")}</tbody></table>`;
}

/** One sentence on a suite's outcome: cases, the worst error over its limit, the verdict and why. */
function outcome(r: SuiteResult): string {
  const worst = Math.max(0, ...r.metrics.map((m) => m.maxRatio));
  const v = r.pass ? "passed" : `FAILED (${r.reasons.join("; ")})`;
  return `${r.suite}: ${(r.cases - r.skipped).toLocaleString("en")} cases, the worst at ${formatFigure(worst)} of its limit; ${v}.`;
}

const ratioPoints = (ps: readonly CasePoint[], x: (p: CasePoint) => number | string): RatioPoint[] => ps.map((p) => ({ x: x(p), ratio: p.ratio, group: p.group, output: p.output, tag: p.tag }));
const compact = (ps: readonly CasePoint[]): unknown[] => ps.map((p) => [p.tag, p.output, p.x, p.err, p.ratio]);

async function hyperbolic(k: Kernels): Promise<Section> {
  const id = "hyperbolic";
  const title = "Kepler's equation on the hyperbola";
  const m = hyperbolicMap(k);
  if (typeof m === "string") return { id, title, intro: "", absent: m };
  return { id, title, intro: `Largest error per cell in ulp (whole numbers: one legend entry each) of the hyperbolic solver against the 50-digit references, over e from just above 1 to 1.8e308 and |M| up to 1.8e308. ${esc(outcome(m.result))}`,
    svg: await renderSvg(heatmapSpec("largest error (ulp) per cell", m.cells, "log10(e - 1)", "log10 |M| (M in rad)", "error (ulp)", "oranges", false, true)),
    data: { x: "log10(e - 1)", y: "log10 |M|", value: "largest error (ulp)", cells: m.cells }, outcome: outcome(m.result), pass: m.result.pass };
}

/** How a per-case family is drawn: the plot's title, its x (from a case) and axes, the JSON's column names. */
interface CasePlot {
  readonly plot: string;
  readonly x: (q: CasePoint) => number | string;
  readonly xAxis: Parameters<typeof ratioSpec>[2];
  readonly colour: Parameters<typeof ratioSpec>[3];
  readonly columns: readonly string[];
}

/** A section of error / limit per case (families.ts), or why it is absent; the intro ends with the suite's outcome. */
async function caseSection(id: string, title: string, p: { points: CasePoint[]; result: SuiteResult } | string, intro: string, how: CasePlot): Promise<Section> {
  if (typeof p === "string") return { id, title, intro: "", absent: p };
  return { id, title, intro: `${intro} ${esc(outcome(p.result))}`,
    svg: await renderSvg(ratioSpec(how.plot, ratioPoints(p.points, how.x), how.xAxis, how.colour)),
    data: { columns: how.columns, cases: compact(p.points) }, outcome: outcome(p.result), pass: p.result.pass };
}

function propagation(k: Kernels): Promise<Section> {
  return caseSection("propagation", "Propagation (universal variables)", propagationCases(k), "Every case of the propagate suite: the error of r and of v (relative, as vectors) over that case's own limit, max(1e-13 (1 + revolutions), 10 x cond), against the case's conditioning (the relative change of r when one input moves by one ulp, computed at high precision). Near-parabolic cases have the largest conditioning, and the limit grows with it.",
    { plot: "error / limit per case against conditioning", x: (q) => q.x, xAxis: { title: "conditioning of r (relative change per input ulp, log)", log: true }, colour: { title: "orbit class" }, columns: ["tag", "output", "cond", "error (rel)", "error / limit"] });
}

function lambert(k: Kernels): Promise<Section> {
  return caseSection("lambert", "Lambert targeting", lambertCases(k), "Every case of the lambert suite: the error of v1 and of v2 (relative, as vectors) over that case's limit, max(1e-13, 16 x cond), against the transfer angle; colour is the number of whole revolutions (0 to 5). The conditioning, and with it the limit, grows next to 180 deg, where the transfer plane is undefined.",
    { plot: "error / limit per case against the transfer angle", x: (q) => q.x, xAxis: { title: "transfer angle (deg)", domain: [0, 360] }, colour: { title: "revolutions", ordinal: true }, columns: ["tag", "output", "transfer angle (deg)", "error (rel)", "error / limit"] });
}

function transition(k: Kernels): Promise<Section> {
  return caseSection("transition", "State transition matrices", transitionCases(k), "Every case of the transition suite (up to 25 revolutions, forwards and backwards), per orbit class: r and v as in propagation, and each 3x3 block of the scale-free matrix Phi~ = D^-1 Phi D against central differences of the 60-digit propagation, over the largest entry, each over its case's limit.",
    { plot: "error / limit per case and orbit class", x: (q) => q.group, xAxis: { title: "orbit class", nominal: true }, colour: { title: "orbit class" }, columns: ["tag", "output", "-", "error", "error / limit"] });
}

/** The f32 build against the release build in metres and metres a second. */
async function physical(k: Kernels): Promise<Section> {
  const id = "f32-physical";
  const title = "Single precision in physical units";
  // This report's build is one side: the f32 build against it, or (a single-precision report) it against f64.
  let f64: Kernels;
  let f32: Kernels;
  try {
    const { loadNamedBuild } = await import("../module/builds.js");
    [f64, f32] = k.realBytes === 8 ? [k, loadNamedBuild("f32")] : [loadNamedBuild("f64"), k];
  } catch (err) {
    return { id, title, intro: "", absent: `the other build could not be loaded (${(err as Error).message})` };
  }
  const rows = physicalRows(f64, f32);
  const fig = (x: number): string => (Number.isNaN(x) ? "-" : x.toPrecision(2));
  return { id, title, intro: `The single-precision build (${esc(f32.label)}) and the double-precision build (${esc(f64.label)}) on invented scenarios with the same inputs (rounded to single precision first, so only the arithmetic differs): the difference in metres, millimetres a second and metres a second. Earth GM of WGS 84. What single precision costs in flight terms, where ulps of a 7000 km coordinate say little.`,
    svg: await renderSvg(barSpec("f32 against f64: difference per scenario", rows.map((r) => ({ label: r.scenario, value: r.difference, group: `${r.quantity} (${r.unit})` })), "|f32 - f64| (log; m, mm/s or m/s as the colour says)", "quantity (unit)")),
    table: htmlTable(["scenario", "quantity", "|f32 - f64|", "unit", "note"], rows.map((r) => [r.scenario, r.quantity, fig(r.difference), r.unit, r.note ?? ""])),
    data: { baseline: "f64 on the f32-rounded inputs", rows } };
}

async function speed(file: string | undefined): Promise<Section> {
  const id = "speed";
  const title = "Speed";
  const s = readSpeed(file);
  if (typeof s === "string") return { id, title, intro: "", absent: s };
  const timed = s.rows.filter((r) => r.wasmNs !== undefined);
  const bars = timed.flatMap((r) => [{ label: r.routine, value: r.wasmNs!, group: "WebAssembly" }, ...(r.jsNs !== undefined ? [{ label: r.routine, value: r.jsNs, group: "host JS" }] : [])]);
  const ns = (x: number | undefined): string => (x === undefined ? "-" : x.toFixed(1));
  return { id, title, intro: `Time per call from ${esc(file!)} (areal bench --json${s.date ? `, ${esc(s.date)}` : ""}${s.host ? `, ${esc(s.host)}` : ""}): the kernels called from the host on their vector suites' inputs. Timings move by 10-20% between runs on a shared machine; ratios: ${esc(Object.entries(s.ratios).map(([a, b]) => `${a} ${b.toFixed(2)}`).join(", ") || "none")}.`,
    svg: bars.length > 0 ? await renderSvg(barSpec("time per call", bars, "ns per call (log)", "build")) : undefined,
    table: htmlTable(["routine", "cases", "WebAssembly (ns)", "host JS (ns)", "JS / WebAssembly", "note"], s.rows.map((r) => [r.routine, String(r.cases), ns(r.wasmNs), ns(r.jsNs), r.wasmNs && r.jsNs ? (r.jsNs / r.wasmNs).toFixed(2) : "-", r.note ?? ""])),
    data: s };
}

async function counts(file: string | undefined): Promise<Section> {
  const id = "counts";
  const title = "Instruction counts on target instruction sets";
  const c = readCounts(file);
  if (typeof c === "string") return { id, title, intro: "", absent: c };
  return { id, title, intro: `Instructions per call from ${esc(file!)} (areal count --json): typical and worst over the inputs counted, per target, build and kernel; the worst case's inputs beside it. These are instructions executed, not cycles.`,
    svg: await renderSvg(barSpec("worst-case instructions per call", c.map((r) => ({ label: `${r.kernel} (${r.build})`, value: r.worst, group: r.target })), "instructions per call (log)", "target")),
    table: htmlTable(["target", "build", "kernel", "typical", "worst", "worst case inputs"], c.map((r) => [r.target, r.build, r.kernel, r.typical.toLocaleString("en"), r.worst.toLocaleString("en"), r.worstInputs])),
    data: c };
}

/** Every family section, in the report's order. */
export async function familySections(k: Kernels, opts: { benchJson?: string; countsJson?: string }): Promise<Section[]> {
  return [await hyperbolic(k), await propagation(k), await transition(k), await lambert(k), await physical(k), await speed(opts.benchJson), await counts(opts.countsJson)];
}
