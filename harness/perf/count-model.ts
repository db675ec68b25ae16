/**
 * The cost model of `bench` (opcount.ts: operations per call from the counting module, priced by a target
 * profile) checked against the exact instruction counts of `areal count`. A model that is right up to one factor
 * per target (cycles per instruction) gives the same predicted/counted ratio for every kernel; the spread of that
 * ratio over the kernels (largest / smallest) is the disagreement reported.
 */
import { existsSync } from "node:fs";
import { hang, table } from "../core/text.js";
import { COUNTING_FILE, loadCounting, predictCost, readProfile, type Profile } from "./opcount.js";
import { EXAMPLE_PROFILE } from "./bench.js";
import { argValues, readCountInputs, INSN_CLASSES, type InsnClass } from "./count.js";
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
  const rows = m.rows.map((x) => [x.kernel, x.predicted.toFixed(0), ...targets.map((t) => (x.ratio[t] !== undefined ? x.ratio[t]!.toFixed(3) : "-"))]);
  rows.push(["spread (max/min)", "", ...targets.map((t) => m.spread[t]!.toFixed(2))]);
  const numeric = new Set(targets.map((_, i) => i + 2).concat(1));
  const head = ["kernel", "predicted", ...targets];
  return [`cost model (${profileName}) against the counts, f64 typical inputs: predicted cost / instructions`, ...table(head, rows, numeric)].join("\n") + "\n";
}

/** One kernel's cost predicted from its exact counts by class: cycles per instruction class of a profile. */
export interface CountPrediction {
  readonly target: string;
  readonly build: string;
  readonly kernel: string;
  readonly typical: number;
  readonly worst: number;
}

/** The classes a counts file carries for one kernel (`areal count --json`), or undefined for an older file. */
type ClassCounts = Partial<Record<InsnClass, number>>;

/**
 * Predicted cost of every counted kernel: sum over the classes of instructions x the profile's cycles for that
 * class (`profile.classes`, every class required), for the typical and the worst inputs. Throws a plain Error
 * naming what is missing.
 */
export function predictFromCounts(counts: unknown, profile: Profile, source: string): CountPrediction[] {
  const cls = profile.classes;
  const missing = INSN_CLASSES.filter((c) => cls?.[c] === undefined);
  if (missing.length) throw new Error(`${profile.name}: the profile has no "classes" cycles for ${missing.join(", ")} (needed to price exact counts)`);
  const price = (c: ClassCounts | undefined, what: string): number => {
    if (!c) throw new Error(`${source}: ${what} has no instruction classes (counted by an older areal count: count again)`);
    return INSN_CLASSES.reduce((s, k) => s + (c[k] ?? 0) * cls![k]!, 0);
  };
  const targets = (counts as { targets?: Record<string, Record<string, Record<string, { typical_classes?: ClassCounts; worst_classes?: ClassCounts }>>> }).targets;
  if (typeof targets !== "object" || targets === null) throw new Error(`${source}: not a file of areal count --json (no "targets")`);
  const out: CountPrediction[] = [];
  for (const [target, builds] of Object.entries(targets)) {
    for (const [build, kernels] of Object.entries(builds)) {
      for (const [kernel, k] of Object.entries(kernels)) {
        const where = `${target} ${build} ${kernel}`;
        out.push({ target, build, kernel, typical: price(k.typical_classes, where), worst: price(k.worst_classes, where) });
      }
    }
  }
  return out;
}

/** The predictions as text: cycles (and microseconds at the profile's clock) per kernel, typical / worst. */
export function formatPredictions(p: readonly CountPrediction[], profile: Profile): string {
  const us = (c: number): string => (profile.clock_hz ? ` (${((c / profile.clock_hz) * 1e6).toFixed(2)} us)` : "");
  const o = hang("", `predicted from exact counts (${profile.name}; cycles per instruction class: ${INSN_CLASSES.map((c) => `${c} ${profile.classes![c]}`).join(", ")}), typical / worst ${profile.unit}:`);
  for (const x of p) o.push(`  ${`${x.target} ${x.build}`.padEnd(16)} ${x.kernel.padEnd(27)} ${x.typical.toFixed(0)}${us(x.typical)} / ${x.worst.toFixed(0)}${us(x.worst)}`);
  return o.join("\n") + "\n";
}
