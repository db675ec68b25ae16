/**
 * `areal compare`: build-to-build comparison.
 *
 *  - `areal compare --builds f64,native,js,f32 [--suite NAME]...`: every vector case of every suite through each
 *    build; per suite and build (against the first, the baseline): cases, bit-identical count, max ULP and max
 *    absolute difference, the first differing case. `baseline` and `optimizing` are the release module run in a
 *    child engine with one compiler tier forced (V8: --liftoff --no-wasm-tier-up, --no-liftoff). A
 *    single-precision build is compared where its inputs are exact f32 values (as `areal check` does), in f32 ULP,
 *    and its error against the references is given in physical units (radians for anomalies; metres and mm/s
 *    for a low-orbit state after one orbit).
 * Two result files of the same cases are compared by compare-files.ts.
 */
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { sameBits, ulpDistance, ulpDistance32 } from "../core/float.js";
import { hang, table } from "../core/text.js";
import { readVectors, vectorPath, col, type VectorSet } from "./vectors.js";
import { findRoutine, ROUTINES, type Routine } from "../module/routines.js";
import { SPECS } from "./specs/index.js";
import type { VectorSpec } from "./specs/types.js";
import type { Kernels } from "../module/load.js";
import { isBuildName, loadNamedBuild, type BuildName } from "../module/builds.js";
import { loadLibrary } from "../module/library.js";
import { loadFile } from "../module/load.js";
import { isOk } from "../module/status.js";
import { ROOT } from "../core/paths.js";
import { GM_EARTH } from "../core/constants.js";


/** Engine tiers of the release module, run in a child process with the tier forced. */
export const TIER_FLAGS: Readonly<Record<string, readonly string[]>> = {
  baseline: ["--liftoff", "--no-wasm-tier-up"],
  optimizing: ["--no-liftoff"],
};

/** A built-in build, an engine tier, or a file: a native library (`.so`) or a WebAssembly module (`.wasm`). */
export type CompareBuild = BuildName | "baseline" | "optimizing" | `${string}.so` | `${string}.wasm`;

export function isCompareBuild(s: string): s is CompareBuild {
  return isBuildName(s) || s in TIER_FLAGS || /\.(so|wasm)$/.test(s);
}

/** Load a build that runs in this process: a library (in its child process), a module file, or a built-in build. */
function loadCompareBuild(b: CompareBuild): Kernels {
  if (b.endsWith(".so")) return loadLibrary(b).kernels;
  if (b.endsWith(".wasm")) return loadFile(b);
  return loadNamedBuild(b as BuildName);
}

/** Everything a build gave on one suite: per row, the status and the routine's outputs (NaN where not run). */
export interface Trace {
  readonly build: string;
  readonly realBytes: 4 | 8;
  readonly statuses: Float64Array;
  /** Row-major: row r, output j at r * outputs + j. */
  readonly values: Float64Array;
  readonly outputs: number;
}

/** True when every input of the row is an exact, normal (or zero) f32 value. */
function f32Exact(row: readonly number[], cols: readonly number[]): boolean {
  return cols.every((c) => {
    const x = row[c]!;
    return Math.fround(x) === x && (x === 0 || !Number.isFinite(x) || Math.abs(x) >= 1.1754943508222875e-38);
  });
}

function argCols(routine: Routine, v: VectorSet): number[] {
  return routine.inputs.map((i) => col(v, i.name));
}

/** Run one suite's vectors through a loaded build. Rows a single-precision build cannot take exactly are NaN/-1. */
export function traceSuite(spec: VectorSpec, k: Kernels, v: VectorSet = readVectors(vectorPath(spec.suite))): Trace {
  const routine = findRoutine(spec.routine);
  if (!routine) throw new Error(`suite ${spec.suite}: unknown routine ${spec.routine}`);
  const cols = argCols(routine, v);
  const n = routine.outputs.length;
  const statuses = new Float64Array(v.values.length).fill(-1);
  const values = new Float64Array(v.values.length * n).fill(NaN);
  const args = new Array<number>(cols.length);
  v.values.forEach((row, r) => {
    if (k.realBytes === 4 && !f32Exact(row, cols)) return;
    for (let i = 0; i < cols.length; i++) args[i] = row[cols[i]!]!;
    const st = k.call(routine.exportName, args);
    statuses[r] = st;
    if (isOk(st)) for (let j = 0; j < n; j++) values[r * n + j] = k.out[j]!;
  });
  return { build: k.label, realBytes: k.realBytes, statuses, values, outputs: n };
}

/** Entry point of the child process that runs the release module with a forced tier (see tracesInChild). */
export function traceChild(): void {
  const suites = (process.env.AREAL_TRACE_SUITES ?? "").split(",").filter(Boolean);
  const k = loadNamedBuild("f64");
  const parts: Buffer[] = [];
  for (const s of suites) {
    const spec = SPECS.find((x) => x.suite === s);
    if (!spec) throw new Error(`unknown suite ${s}`);
    const t = traceSuite(spec, k);
    parts.push(Buffer.from(t.statuses.buffer), Buffer.from(t.values.buffer));
  }
  process.stdout.write(Buffer.concat(parts));
}

/** The compiled harness module to load in a child engine (dist/, also when this file runs from source). */
function childModuleUrl(): string {
  const here = fileURLToPath(import.meta.url);
  const path = here.endsWith(".js") ? here : join(ROOT, "dist", "harness", "verify", "compare-builds.js");
  if (!existsSync(path)) throw new Error(`the tier comparison runs the compiled harness (${path}); run 'npm run build'`);
  return pathToFileURL(path).href;
}

/** Trace suites with the release module in a child engine with the given V8 flags. */
export function tracesInChild(tier: string, specs: readonly VectorSpec[], vectors: ReadonlyMap<string, VectorSet>): Trace[] {
  const flags = TIER_FLAGS[tier];
  if (!flags) throw new Error(`unknown tier ${tier}`);
  const code = `import(${JSON.stringify(childModuleUrl())}).then((m) => m.traceChild())`;
  const buf = execFileSync(process.execPath, [...flags, "-e", code], {
    env: { ...process.env, AREAL_TRACE_SUITES: specs.map((s) => s.suite).join(",") },
    maxBuffer: 1 << 30,
    stdio: ["ignore", "pipe", "inherit"],
  });
  const out: Trace[] = [];
  let off = 0;
  const take = (count: number): Float64Array => {
    const a = new Float64Array(count);
    Buffer.from(a.buffer).set(buf.subarray(off, off + 8 * count));
    off += 8 * count;
    return a;
  };
  for (const s of specs) {
    const rows = vectors.get(s.suite)!.values.length;
    const n = findRoutine(s.routine)!.outputs.length;
    out.push({ build: tier, realBytes: 8, statuses: take(rows), values: take(rows * n), outputs: n });
  }
  if (off !== buf.length) throw new Error(`tier ${tier}: the child engine returned ${buf.length} bytes, expected ${off}`);
  return out;
}

export interface Difference {
  readonly row: number;
  readonly tag: string;
  readonly inputs: Readonly<Record<string, number>>;
  readonly output: string;
  readonly a: number | string;
  readonly b: number | string;
}

export interface BuildComparison {
  readonly suite: string;
  readonly routine: string;
  readonly baseline: string;
  readonly build: string;
  /** Rows both builds ran (a single-precision build runs only rows with exact f32 inputs). */
  readonly cases: number;
  readonly identical: number;
  readonly statusDiffers: number;
  /** Largest ULP difference over outputs of rows both ran successfully; in f32 ULP when either build is f32. */
  readonly maxUlp: number;
  readonly ulpUnit: "f64" | "f32";
  readonly maxAbs: number;
  readonly first?: Difference;
}

/** Compare a build's trace to the baseline's on one suite. */
export function compareTraces(spec: VectorSpec, v: VectorSet, base: Trace, other: Trace): BuildComparison {
  const routine = findRoutine(spec.routine)!;
  const cols = argCols(routine, v);
  const n = routine.outputs.length;
  const f32 = base.realBytes === 4 || other.realBytes === 4;
  // Iteration counts take part in bit-identity but not in the ULP and absolute figures (they are counts).
  const counted = routine.outputs.map((o) => o !== spec.iterations && o !== "iterations");
  let cases = 0;
  let identical = 0;
  let statusDiffers = 0;
  let maxUlp = 0;
  let maxAbs = 0;
  let first: Difference | undefined;
  const inputsOf = (r: number): Record<string, number> => Object.fromEntries(routine.inputs.map((inp, i) => [inp.name, v.values[r]![cols[i]!]!]));
  for (let r = 0; r < v.values.length; r++) {
    const sa = base.statuses[r]!;
    const sb = other.statuses[r]!;
    if (sa === -1 || sb === -1) continue; // not run by one of them
    cases++;
    if (sa !== sb) {
      statusDiffers++;
      first ??= { row: r, tag: v.tags[r]!, inputs: inputsOf(r), output: "status", a: sa, b: sb };
      continue;
    }
    let same = true;
    for (let j = 0; j < n; j++) {
      const a = base.values[r * n + j]!;
      const b = other.values[r * n + j]!;
      if (sameBits(a, b)) continue;
      same = false;
      first ??= { row: r, tag: v.tags[r]!, inputs: inputsOf(r), output: routine.outputs[j]!, a, b };
      if (!counted[j]) continue;
      const u = f32 ? ulpDistance32(a, b) : ulpDistance(a, b);
      if (u > maxUlp) maxUlp = u;
      const d = Math.abs(a - b);
      if (d > maxAbs || Number.isNaN(d)) maxAbs = Number.isNaN(d) ? Infinity : d;
    }
    if (same) identical++;
  }
  return { suite: spec.suite, routine: routine.name, baseline: base.build, build: other.build, cases, identical, statusDiffers, maxUlp, ulpUnit: f32 ? "f32" : "f64", maxAbs, first };
}

/** Units of outputs compared against references, for the physical-error lines. */
const UNITS: Readonly<Record<string, string>> = {
  E: "rad", H: "rad", nu: "rad", anomaly: "rad", M: "rad", D: "(tan of half the true anomaly)", tof: "time units of the case",
  i: "rad", raan: "rad", argp: "rad", L: "rad", e: "1", f: "1", g: "1", h: "1", k: "1",
  // The built-in suites are in km, s (vectors/*.csv headers); a canonical case (mu = 1) in its own units.
  rx: "km (suite units)", ry: "km (suite units)", rz: "km (suite units)", a: "km (suite units)", p: "km (suite units)",
  vx: "km/s (suite units)", vy: "km/s (suite units)", vz: "km/s (suite units)",
  area: "km^2 (suite units)", areal_velocity: "km^2/s (suite units)",
};

export interface PhysicalError {
  readonly suite: string;
  readonly build: string;
  readonly output: string;
  readonly unit: string;
  readonly cases: number;
  /** Largest |got - ref| over all compared rows. */
  readonly maxAbs: number;
  /** Largest |got - ref| over rows whose reference is within one turn (|ref| <= pi), the everyday range; NaN for an output that is not an angle. */
  readonly maxAbsOneTurn: number;
  /** Largest |got - ref| / |ref| (over rows with ref != 0): what a length or a speed error means. */
  readonly maxRel: number;
  readonly worst?: { readonly row: number; readonly inputs: Readonly<Record<string, number>>; readonly got: number; readonly want: number };
}

/** A build's error against the suite's references, in the outputs' own units. */
export function physicalErrors(spec: VectorSpec, v: VectorSet, t: Trace): PhysicalError[] {
  const routine = findRoutine(spec.routine)!;
  const cols = argCols(routine, v);
  const n = routine.outputs.length;
  return spec.compare.map((c) => {
    const j = routine.outputs.indexOf(c.output);
    const ref = col(v, c.ref);
    let cases = 0;
    let maxAbs = 0;
    let maxAbsOneTurn = 0;
    let maxRel = 0;
    let worst: PhysicalError["worst"];
    for (let r = 0; r < v.values.length; r++) {
      if (t.statuses[r] === -1 || !isOk(t.statuses[r]!)) continue;
      const want = v.values[r]![ref]!;
      if (Number.isNaN(want)) continue;
      const got = t.values[r * n + j]!;
      cases++;
      const d = Math.abs(got - want);
      if (d > maxAbs) {
        maxAbs = d;
        worst = { row: r, inputs: Object.fromEntries(routine.inputs.map((inp, i) => [inp.name, v.values[r]![cols[i]!]!])), got, want };
      }
      if (Math.abs(want) <= Math.PI && d > maxAbsOneTurn) maxAbsOneTurn = d;
      if (want !== 0 && d / Math.abs(want) > maxRel) maxRel = d / Math.abs(want);
    }
    const unit = UNITS[c.output] ?? "";
    return { suite: spec.suite, build: t.build, output: c.output, unit, cases, maxAbs, maxAbsOneTurn: unit === "rad" ? maxAbsOneTurn : NaN, maxRel, worst };
  });
}

/** The low-orbit scenario: an invented 400 km, 51.6 degree orbit; WGS 84 GM (NIMA TR8350.2). */
export const LEO = {
  mu: GM_EARTH,
  r0: [6778.137, 0, 0] as const,
  /** Circular speed sqrt(mu / r) split by the inclination, km/s. */
  v0(): [number, number, number] {
    const v = Math.sqrt(this.mu / this.r0[0]);
    const inc = (51.6 * Math.PI) / 180;
    return [0, v * Math.cos(inc), v * Math.sin(inc)];
  },
  period(): number {
    return 2 * Math.PI * Math.sqrt(this.r0[0] ** 3 / this.mu);
  },
  steps: 1000,
} as const;

export interface StateError {
  readonly routine: string;
  readonly build: string;
  readonly positionM: number;
  readonly velocityMmS: number;
  readonly note: string;
}

/**
 * A low-orbit state after one orbit, from a build and from the baseline (the release f64 build): the position
 * difference in metres and the velocity difference in mm/s. Uses the `propagate` routine when the module has it
 * (two-body, one period), else `integrate` (RK4, 1000 steps an orbit). Undefined when neither can run.
 */
export function leoStateError(base: Kernels, other: Kernels): StateError | undefined {
  const [vx, vy, vz] = LEO.v0();
  const [rx, ry, rz] = LEO.r0;
  const T = LEO.period();
  const known: Record<string, number> = {
    mu: LEO.mu, r0x: rx, r0y: ry, r0z: rz, v0x: vx, v0y: vy, v0z: vz, rx, ry, rz, vx, vy, vz, x: rx, y: ry, z: rz,
    dt: T, tof: T, t: T, step: T / LEO.steps, steps: LEO.steps, method: 0,
  };
  for (const name of ["propagate", "integrate"]) {
    const routine = ROUTINES.find((r) => r.name === name);
    if (!routine || !base.has(routine.exportName) || !other.has(routine.exportName)) continue;
    const args: number[] = [];
    let ok = true;
    for (const inp of routine.inputs) {
      const v = known[inp.name] ?? inp.default;
      if (v === undefined) ok = false;
      else args.push(v);
    }
    const outNames = ["rx", "ry", "rz", "vx", "vy", "vz"];
    const slots = outNames.map((o) => routine.outputs.indexOf(o));
    if (!ok || slots.some((s) => s < 0)) continue;
    const run = (k: Kernels): number[] | undefined => (isOk(k.call(routine.exportName, args)) ? slots.map((s) => k.out[s]!) : undefined);
    const a = run(base);
    const b = run(other);
    if (!a || !b) continue;
    const dr = Math.hypot(a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!) * 1e3;
    const dv = Math.hypot(a[3]! - b[3]!, a[4]! - b[4]!, a[5]! - b[5]!) * 1e6;
    const note = name === "propagate" ? "two-body propagation over one period" : `${LEO.steps} RK4 steps over one period`;
    return { routine: name, build: other.label, positionM: dr, velocityMmS: dv, note };
  }
  return undefined;
}

export interface BuildsReport {
  readonly builds: readonly string[];
  readonly comparisons: readonly BuildComparison[];
  readonly physical: readonly PhysicalError[];
  readonly states: readonly StateError[];
  /** Suites left out because their vector file does not exist. */
  readonly missing: readonly string[];
}

/** Run the comparison of builds over the given suites. The first build is the baseline. */
export function compareBuilds(builds: readonly CompareBuild[], allSpecs: readonly VectorSpec[] = SPECS): BuildsReport {
  // A suite whose vector file is not generated yet is left out and named in the report.
  const kernels = new Map<string, Kernels>();
  for (const b of builds) if (!(b in TIER_FLAGS)) kernels.set(b, loadCompareBuild(b));
  // A module or library file runs the suites whose exports it has; the rest are left out and named.
  const has = (s: VectorSpec): boolean => [...kernels.values()].every((k) => k.has(findRoutine(s.routine)?.exportName ?? ""));
  const specs = allSpecs.filter((s) => existsSync(vectorPath(s.suite)) && has(s));
  const missing = allSpecs.filter((s) => !specs.includes(s)).map((s) => s.suite);
  const vectors = new Map(specs.map((s) => [s.suite, readVectors(vectorPath(s.suite))]));
  const traces = new Map<string, Trace[]>();
  for (const b of builds) {
    if (b in TIER_FLAGS) traces.set(b, tracesInChild(b, specs, vectors));
    else traces.set(b, specs.map((s) => traceSuite(s, kernels.get(b)!, vectors.get(s.suite)!)));
  }
  const base = builds[0]!;
  const comparisons: BuildComparison[] = [];
  const physical: PhysicalError[] = [];
  specs.forEach((s, i) => {
    const v = vectors.get(s.suite)!;
    for (const b of builds.slice(1)) comparisons.push(compareTraces(s, v, traces.get(base)![i]!, traces.get(b)![i]!));
    for (const b of builds) {
      const t = traces.get(b)![i]!;
      if (t.realBytes === 4) physical.push(...physicalErrors(s, v, t).filter((p) => p.cases > 0));
    }
  });
  const states: StateError[] = [];
  const baseK = kernels.get(base) ?? loadNamedBuild("f64");
  for (const [name, k] of kernels) {
    if (name === base || k.realBytes !== 4) continue;
    const e = leoStateError(baseK, k);
    if (e) states.push(e);
  }
  return { builds, comparisons, physical, states, missing };
}

export function fig(x: number): string {
  if (x === 0) return "0";
  if (!Number.isFinite(x)) return String(x);
  if (Number.isInteger(x) && Math.abs(x) < 1e9) return String(x);
  return x.toPrecision(3);
}

/**
 * A table whose rows end in a long text (`detail`, the last cell of each row): the other columns as a table, the
 * detail under its row, indented and wrapped, so the text stays within 100 columns whatever the inputs' digits.
 */
export function tableWithDetail(head: string[], rows: string[][], detail: string): string[] {
  const t = table(head, rows.map((r) => r.slice(0, -1)));
  const out = t.slice(0, 2);
  rows.forEach((r, i) => {
    out.push(t[i + 2]!);
    const d = r[r.length - 1]!;
    if (d !== "-") out.push(...hang(`    ${detail}: `, d));
  });
  return out;
}

/**
 * A unit for the table's column: without its parenthesised gloss ("km (suite units)" -> "km"; a gloss alone is a
 * pure number: "1"), a long description cut to its first word ("time units of the case" -> "time").
 */
function shortUnit(u: string): string {
  const v = u.replace(/\s*\(.*\)\s*$/, "") || "1";
  return v.length > 10 ? v.split(" ")[0]! : v;
}

function diffText(d: Difference | undefined): string {
  if (!d) return "-";
  const ins = Object.entries(d.inputs).map(([k, v]) => `${k}=${v}`).join(" ");
  return `row ${d.row} (${d.tag}) ${ins}: ${d.output} ${d.a} vs ${d.b}`;
}

/** The text report of a build comparison. */
export function formatBuildsReport(rep: BuildsReport): string {
  const out = [`areal compare: baseline ${rep.builds[0]}; compared ${rep.builds.slice(1).join(", ")}`];
  out.push(...tableWithDetail(
    ["suite", "build", "cases", "bit-identical", "max ulp", "max abs"], 
    rep.comparisons.map((c) => [c.suite, c.build, String(c.cases), String(c.identical) + (c.statusDiffers ? ` (${c.statusDiffers} status)` : ""), `${fig(c.maxUlp)}${c.ulpUnit === "f32" ? " (f32)" : ""}`, fig(c.maxAbs), diffText(c.first)]),
    "first difference",
  ));
  if (rep.physical.length) {
    out.push("", "single precision against the references (absolute error in the output's units):");
    out.push(...tableWithDetail(
      ["suite", "build", "output", "cases", "max error", "unit", "max rel", "|ref|<=pi"],
      rep.physical.map((p) => [p.suite, p.build, p.output, String(p.cases), fig(p.maxAbs), shortUnit(p.unit), fig(p.maxRel), Number.isNaN(p.maxAbsOneTurn) ? "-" : fig(p.maxAbsOneTurn),
        p.worst ? `${Object.entries(p.worst.inputs).map(([k, v]) => `${k}=${v}`).join(" ")} got ${p.worst.got} want ${p.worst.want}` : "-"]),
      "worst case",
    ));
    out.push("(|ref|<=pi: the max error over the cases whose reference angle is within one half turn; angles only)");
  }
  for (const s of rep.states) {
    out.push("", ...hang("", `${s.build}: low-orbit state after one orbit (400 km, 51.6 deg; ${s.note}, routine ${s.routine}) differs from ${rep.builds[0]} by ${fig(s.positionM)} m in position and ${fig(s.velocityMmS)} mm/s in velocity`));
  }
  if (rep.missing.length) out.push("", ...hang("", `left out (no vector file, or an export a module or library file lacks): ${rep.missing.join(", ")}`));
  const ids = rep.comparisons.filter((c) => c.identical !== c.cases);
  out.push("", ...hang("", ids.length === 0 ? "every compared build is bit-identical to the baseline on every case." : `${ids.length} suite/build pair(s) differ from the baseline (expected for js and f32; not for native, baseline, optimizing).`));
  return out.join("\n") + "\n";
}

