/** Vega-Lite specifications of the report's plots, rendered to SVG text in Node (no browser, no canvas). */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";

/** Render a Vega-Lite spec to an SVG string. */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: "none" });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

const FONT = { font: "Helvetica, Arial, sans-serif" };

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
    facet: { column: { field: "invariant", type: "nominal", title: null, header: { labelExpr: "datum.value == 'energy' ? 'energy E' : 'angular momentum h'", labelFontSize: 12 } } },
    spec: {
      width: 300,
      height: 220,
      mark: { type: "line", strokeWidth: 1.2 },
      encoding: {
        x: { field: "orbits", type: "quantitative", title: "time (orbits)", axis: { format: "~s" } },
        y: { field: "deviation", type: "quantitative", title: "|X - X0| / |X0| (largest in each time block; floor 1e-17)", scale: { type: "log" }, axis: { format: ".0e" } },
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
