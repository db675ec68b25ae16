/**
 * The cost model of `bench` (opcount.ts: operations per call from the counting module, priced by a target
 * profile) checked against the exact instruction counts of `areal count`. A model that is right up to one factor
 * per target (cycles per instruction) gives the same predicted/counted ratio for every kernel; the spread of that
 * ratio over the kernels (largest / smallest) is the disagreement reported.
 */
import { existsSync } from "node:fs";
import { COUNTING_FILE, loadCounting, predictCost, readProfile, type Profile } from "./opcount.js";
import { EXAMPLE_PROFILE } from "./bench.js";
import { argValues, readCountInputs } from "./count.js";
import type { CountResult } from "./count-all.js";

export interface ModelRow {
  readonly kernel: string;
  /** The profile's predicted cost of the typical call. */
  readonly predicted: number;
  /** target -> predicted / counted instructions (typical inputs, f64). */
  readonly ratio: Record<string, number>;
}

/** Predicted / counted for every kernel the f64 counts hold; undefined when the counting module is not built. */
export function modelCheck(r: CountResult, profile: Profile = readProfile(EXAMPLE_PROFILE)): { rows: ModelRow[]; spread: Record<string, number> } | undefined {
  if (!existsSync(COUNTING_FILE)) return undefined;
  const cm = loadCounting();
  const inputs = readCountInputs();
  const targets = Object.keys(r.targets).filter((t) => r.targets[t]!.f64);
  const rows: ModelRow[] = [];
  for (const [kernel, inp] of Object.entries(inputs)) {
    if (!cm.kernels.has(kernel) || !targets.some((t) => r.targets[t]!.f64![kernel])) continue;
    const c = inp.typical;
    if (c.setup) cm.kernels.call(c.setup.export, argValues(c.setup.export, c.setup.args));
    const { counts } = cm.count(kernel, argValues(kernel, c.args));
    const predicted = predictCost(profile, counts);
    const ratio: Record<string, number> = {};
    for (const t of targets) {
      const n = r.targets[t]!.f64![kernel]?.typical;
      if (n) ratio[t] = predicted / n;
    }
    rows.push({ kernel, predicted, ratio });
  }
  const spread: Record<string, number> = {};
  for (const t of targets) {
    const v = rows.map((x) => x.ratio[t]).filter((x): x is number => x !== undefined);
    if (v.length) spread[t] = Math.max(...v) / Math.min(...v);
  }
  return { rows, spread };
}

/** The check as text: one row per kernel, the spread per target. */
export function formatModel(m: NonNullable<ReturnType<typeof modelCheck>>, profileName: string): string {
  const targets = Object.keys(m.spread);
  const o = [`cost model (${profileName}) against the counts, f64 typical inputs: predicted cost / instructions`,
    ["kernel".padEnd(18), "predicted".padStart(10), ...targets.map((t) => t.padStart(11))].join("  ")];
  for (const x of m.rows) o.push([x.kernel.padEnd(18), x.predicted.toFixed(0).padStart(10), ...targets.map((t) => (x.ratio[t] !== undefined ? x.ratio[t]!.toFixed(3) : "-").padStart(11))].join("  "));
  o.push(["spread (max/min)".padEnd(18), "".padStart(10), ...targets.map((t) => m.spread[t]!.toFixed(2).padStart(11))].join("  "));
  return o.join("\n") + "\n";
}
