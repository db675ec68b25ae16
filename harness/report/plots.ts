/** Vega-Lite specifications of the report's plots, rendered to SVG text in Node (no browser, no canvas). */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";

/** Render a Vega-Lite spec to an SVG string. */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: "none" });
  try {
    return shortenGeometry(await view.toSVG());
  } finally {
    view.finalize();
  }
}

/** Fonts of every plot; no ARIA labels on marks (a static page; one label per point made the page megabytes). */
/**
 * Coordinates in the SVG's geometry attributes (transform, d, x, y, width, height) to two decimals: a hundredth
 * of a pixel is below what any screen or printer shows, and thousands of points at 16 digits made pages of
 * megabytes. Text is left as it is.
 */
function shortenGeometry(svg: string): string {
  return svg.replace(/ (transform|d|x|y|width|height)="([^"]*)"/g, (_, a: string, v: string) => ` ${a}="${v.replace(/(\d+\.\d{2})\d+/g, "$1")}"`);
}

const FONT = { font: "Helvetica, Arial, sans-serif", aria: false };

export interface Cell {
  readonly x0: number;
  readonly x1: number;
  readonly y0: number;
  readonly y1: number;
  readonly value: number;
  readonly cases: number;
}

/**
 * A binned map: one rectangle per cell, colour = value. `log`: a continuous log colour scale (errors in ulp);
 * `discrete`: integer values (iteration counts) as an ordinal scale with one legend entry per value.
 */
export function heatmapSpec(title: string, cells: readonly Cell[], xTitle: string, yTitle: string, valueTitle: string, scheme: string, log: boolean, discrete = false): TopLevelSpec {
  const color = discrete
    ? { field: "value", type: "ordinal", title: valueTitle, scale: { scheme }, legend: { symbolType: "square" } }
    : { field: "shown", type: "quantitative", title: valueTitle, scale: { scheme, ...(log ? { type: "log" } : {}) }, ...(log ? { legend: { format: "~s" } } : {}) };
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 520,
    height: 300,
    config: FONT,
    data: { values: cells.map((c) => ({ ...c, shown: log ? Math.max(c.value, 0.5) : c.value })) },
    mark: { type: "rect" },
    encoding: {
      x: { field: "x0", type: "quantitative", title: xTitle, scale: { zero: false, nice: false } },
      x2: { field: "x1" },
      y: { field: "y0", type: "quantitative", title: yTitle, scale: { zero: false, nice: false } },
      y2: { field: "y1" },
      color,
      tooltip: [{ field: "value", title: valueTitle }, { field: "cases" }],
    },
  } as TopLevelSpec;
}

export interface DriftPoint {
  readonly method: string;
  readonly invariant: string;
  readonly orbits: number;
  readonly deviation: number;
}

/** Invariant deviation against time, one panel per invariant, one line per method, log scale. */
export function driftSpec(title: string, points: readonly DriftPoint[]): TopLevelSpec {
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    config: FONT,
    data: { values: points.map((p) => ({ ...p, deviation: Math.max(p.deviation, 1e-17) })) },
    facet: { column: { field: "invariant", type: "nominal", title: null, header: { labelExpr: "datum.value == 'energy' ? 'energy E' : datum.value == 'angular momentum' ? 'angular momentum h' : 'symplectic defect of Phi'", labelFontSize: 12 } } },
    spec: {
      width: 300,
      height: 220,
      mark: { type: "line", strokeWidth: 1.2 },
      encoding: {
        x: { field: "orbits", type: "quantitative", title: "time (orbits)", axis: { format: "~s" } },
        y: { field: "deviation", type: "quantitative", title: "|X - X0| / |X0|, or max |Phi~^T J Phi~ - J| (largest in each time block; floor 1e-17)", scale: { type: "log" }, axis: { format: ".0e" } },
        color: { field: "method", type: "nominal" },
      },
    },
  } as TopLevelSpec;
}

export interface HistBar {
  readonly build: string;
  readonly bucket: string;
  readonly order: number;
  readonly cases: number;
}

/**
 * ULP-difference histogram of builds against the release build: a log axis (bars from 0.5, so a bin with one
 * value shows beside one with a million) with the count written on each bar.
 */
export function ulpHistogramSpec(title: string, bars: readonly HistBar[]): TopLevelSpec {
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 520,
    height: 260,
    config: FONT,
    data: { values: bars.map((b) => ({ ...b, shown: Math.max(b.cases, 0.5) })) },
    encoding: {
      x: { field: "bucket", type: "ordinal", title: "difference from the release build (ulp)", sort: { field: "order" }, axis: { labelAngle: 0 } },
      xOffset: { field: "build", type: "nominal" },
      color: { field: "build", type: "nominal", title: "build" },
    },
    layer: [
      {
        mark: { type: "bar" },
        encoding: {
          y: { field: "shown", type: "quantitative", title: "output values (log scale)", scale: { type: "log", domainMin: 0.5 }, axis: { format: "~s" } },
          y2: { datum: 0.5 },
          tooltip: [{ field: "build" }, { field: "bucket" }, { field: "cases" }],
        },
      },
      {
        mark: { type: "text", dy: -6, fontSize: 9 },
        encoding: { y: { field: "shown", type: "quantitative" }, text: { field: "cases", type: "quantitative", format: "~s" } },
      },
    ],
  } as TopLevelSpec;
}

/** Miss distance of linear guidance flown on the two-body problem against the initial separation, log-log. */
export function linearisationSpec(title: string, points: readonly { chief: string; separation: number; miss: number }[]): TopLevelSpec {
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 520,
    height: 280,
    config: FONT,
    data: { values: points.map((p) => ({ ...p, separation_m: p.separation * 1000, miss_m: Math.max(p.miss * 1000, 1e-9) })) },
    mark: { type: "line", point: true },
    encoding: {
      x: { field: "separation_m", type: "quantitative", title: "initial separation (m)", scale: { type: "log" }, axis: { format: "~s" } },
      y: { field: "miss_m", type: "quantitative", title: "miss distance after the transfer (m; floor 1e-9)", scale: { type: "log" }, axis: { format: ".0e" } },
      color: { field: "chief", type: "nominal", title: "chief orbit" },
      tooltip: [{ field: "chief" }, { field: "separation_m", title: "separation (m)" }, { field: "miss_m", title: "miss (m)" }],
    },
  } as TopLevelSpec;
}

/** Log-axis ticks at whole powers of ten, labelled 1e-3, 0.01, ... 1e3 (readable without a format key). */
const POW10_AXIS = {
  labelExpr: "abs(log(datum.value) / LN10 - round(log(datum.value) / LN10)) > 1e-6 ? '' : datum.value >= 0.01 && datum.value <= 1000 ? format(datum.value, '~g') : format(datum.value, '.0e')",
  tickCount: 10,
};

/** A point of a per-case plot: its place, its error over its limit, its colour group. */
export interface RatioPoint {
  readonly x: number | string;
  readonly ratio: number;
  readonly group: string;
  readonly output: string;
  readonly tag: string;
}

/**
 * Each case's error over its own limit (log; the rule at 1 is the limit, a case passes below it) against `x`
 * (log or linear quantitative, or nominal), coloured by group: ordinal (one legend entry per whole number:
 * revolutions) or nominal (orbit classes). Errors of exactly 0 are drawn at the floor.
 */
export function ratioSpec(title: string, points: readonly RatioPoint[], x: { title: string; log?: boolean; nominal?: boolean; domain?: [number, number] }, colour: { title: string; ordinal?: boolean }, floor = 1e-4): TopLevelSpec {
  const xEnc = x.nominal
    ? { field: "x", type: "nominal", title: x.title, axis: { labelAngle: -30 } }
    : { field: "x", type: "quantitative", title: x.title, scale: { ...(x.log ? { type: "log" } : { zero: false }), ...(x.domain ? { domain: x.domain } : {}) }, axis: x.log ? POW10_AXIS : { tickCount: 8 } };
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 560,
    height: 280,
    config: FONT,
    layer: [
      {
        data: { values: points.map((p) => ({ ...p, shown: Math.max(p.ratio, floor) })) },
        mark: { type: "point", filled: true, size: 14, opacity: 0.6 },
        encoding: {
          x: xEnc,
          y: { field: "shown", type: "quantitative", title: `error / limit (log; 1 = the limit; floor ${floor})`, scale: { type: "log", domainMax: 10 }, axis: POW10_AXIS },
          color: { field: "group", type: colour.ordinal ? "ordinal" : "nominal", title: colour.title, ...(colour.ordinal ? { sort: "ascending", scale: { scheme: "category10" }, legend: { symbolType: "circle" } } : {}) },
          shape: { field: "output", type: "nominal", title: "output" },
          tooltip: [{ field: "tag" }, { field: "output" }, { field: "ratio", title: "error / limit" }],
        },
      },
      { data: { values: [{ y: 1 }] }, mark: { type: "rule", color: "#c00", strokeDash: [6, 3] }, encoding: { y: { field: "y", type: "quantitative" } } },
    ],
  } as TopLevelSpec;
}

/** Horizontal bars of a positive quantity per label on a log axis, with the value written at each bar's end. */
export function barSpec(title: string, bars: readonly { label: string; value: number; group: string }[], valueTitle: string, groupTitle: string): TopLevelSpec {
  const shown = bars.filter((b) => b.value > 0 && Number.isFinite(b.value));
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 420,
    height: { step: 13 },
    config: FONT,
    data: { values: shown },
    encoding: {
      y: { field: "label", type: "nominal", title: null, sort: null, axis: { labelLimit: 360 } },
      yOffset: { field: "group", type: "nominal" },
      x: { field: "value", type: "quantitative", title: valueTitle, scale: { type: "log" }, axis: POW10_AXIS },
      color: { field: "group", type: "nominal", title: groupTitle },
    },
    layer: [
      { mark: { type: "bar", height: { band: 0.9 } }, encoding: { x2: { datum: Math.min(...shown.map((b) => b.value)) / 3 } } },
      { mark: { type: "text", align: "left", dx: 3, fontSize: 9 }, encoding: { text: { field: "value", type: "quantitative", format: ",.3~r" } } },
    ],
  } as TopLevelSpec;
}
