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

/** A binned map: one rectangle per cell, colour = value. */
export function heatmapSpec(title: string, cells: readonly Cell[], xTitle: string, yTitle: string, valueTitle: string, scheme: string, log: boolean): TopLevelSpec {
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
      color: { field: "shown", type: "quantitative", title: valueTitle, scale: { scheme, ...(log ? { type: "log" } : {}) } },
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
    facet: { column: { field: "invariant", type: "nominal", title: null } },
    spec: {
      width: 300,
      height: 220,
      mark: { type: "line", strokeWidth: 1.2 },
      encoding: {
        x: { field: "orbits", type: "quantitative", title: "time (orbits)" },
        y: { field: "deviation", type: "quantitative", title: "relative deviation from step 0 (floor 1e-17)", scale: { type: "log" } },
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

/** ULP-difference histogram of builds against the release build. */
export function ulpHistogramSpec(title: string, bars: readonly HistBar[]): TopLevelSpec {
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title,
    width: 520,
    height: 240,
    config: FONT,
    data: { values: bars },
    mark: { type: "bar" },
    encoding: {
      x: { field: "bucket", type: "ordinal", title: "difference from the release build (ulp)", sort: { field: "order" } },
      xOffset: { field: "build", type: "nominal" },
      y: { field: "cases", type: "quantitative", title: "output values", scale: { type: "symlog" } },
      color: { field: "build", type: "nominal" },
      tooltip: [{ field: "build" }, { field: "bucket" }, { field: "cases" }],
    },
  } as TopLevelSpec;
}
