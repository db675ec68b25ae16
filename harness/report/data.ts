/**
 * The report's data: runs the build's kernels for the error map of the elliptic solver over the (e, M) plane, its
 * iteration-count map, the integrators' invariant drift against time, and the ULP histograms of the other builds
 * against the release build. Each returns a string saying why when its data cannot be had. Drawing is html.ts.
 */
import type { Kernels } from "../module/load.js";
import { SPECS } from "../verify/specs/index.js";
import { choicesOf, findRoutine, slotsOf } from "../module/routines.js";
import { isOk } from "../module/status.js";
import { readVectors, vectorPath, col, type VectorSet } from "../verify/vectors.js";
import { ulpDistance, ulpDistance32 } from "../core/float.js";
import { iterationGridAxes } from "../perf/bench.js";
import type { Cell, DriftPoint, HistBar } from "./plots.js";
import { existsSync } from "node:fs";
import { GM_EARTH } from "../core/constants.js";

const KE = slotsOf("kepler_elliptic", "E", "iterations");
const IN = slotsOf("integrate_step", "energy_dev", "h_dev", "energy_dev_now", "h_dev_now");
const PH = slotsOf("integrate_phi", "symp_dev", "symp_dev_now");


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
export function errorMap(k: Kernels): { cells: Cell[]; cases: number } | string {
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
    if (!isOk(st)) continue;
    const got = k.out[KE.E]!;
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
export function iterationMap(k: Kernels): { cells: Cell[]; mean: number; worst: number; failures: number } | string {
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
    if (!isOk(st)) failures++;
    const it = isOk(st) ? k.out[KE.iterations]! : -1;
    sum += Math.max(it, 0);
    worst = Math.max(worst, it);
    cells.push({ x0: xe[j]!, x1: xe[j + 1]!, y0: ye[i]!, y1: ye[i + 1]!, value: it, cases: 1 });
  }));
  return { cells, mean: sum / cells.length, worst, failures };
}

/** The integrators, in the order of the ABI table's method enumeration. */
const METHODS: readonly [string, number][] = Object.entries(choicesOf("method"));

/**
 * Energy and angular-momentum deviation against time for each integrator on an invented unit orbit, and the
 * symplectic defect of the transition matrix the run carries when the module has the transition exports.
 */
export function drift(k: Kernels, orbits: number): { points: DriftPoint[]; summary: Record<string, Record<string, number>> } | string {
  if (!k.has("integrate_begin") || !k.has("integrate_step")) return `${k.label} has no integrate_begin / integrate_step exports (the integrators are not in this module)`;
  const phi = k.has("integrate_transition_begin") && k.has("integrate_phi");
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
    const begin = phi ? "integrate_transition_begin" : "integrate_begin";
    const args = [1, r0, 0, 0, 0, v0, 0, h, id, 0, 0, 1, 0, 0, 0, 0];
    const st = k.call(begin, phi ? [...args, 0] : args);
    if (!isOk(st)) return `${begin} rejected the drift scenario (status ${st})`;
    let maxE = 0;
    let maxH = 0;
    let maxS = 0;
    let energyMax = 0;
    let hMax = 0;
    for (let s = 1; s <= orbits * perOrbit; s++) {
      if (!isOk(k.call("integrate_step", [1]))) break;
      maxE = Math.max(maxE, Math.abs(k.out[IN.energy_dev_now]!));
      maxH = Math.max(maxH, Math.abs(k.out[IN.h_dev_now]!));
      energyMax = Math.abs(k.out[IN.energy_dev]!);
      hMax = Math.abs(k.out[IN.h_dev]!);
      if (phi && isOk(k.call("integrate_phi", []))) maxS = Math.max(maxS, Math.abs(k.out[PH.symp_dev_now]!)); // overwrites the region
      if (s % block === 0) {
        points.push({ method: name, invariant: "energy", orbits: s / perOrbit, deviation: maxE });
        points.push({ method: name, invariant: "angular momentum", orbits: s / perOrbit, deviation: maxH });
        if (phi) points.push({ method: name, invariant: "symplectic defect", orbits: s / perOrbit, deviation: maxS });
        maxE = 0;
        maxH = 0;
        maxS = 0;
      }
    }
    summary[name] = { energy_max: energyMax, h_max: hMax, ...(phi ? { symp_max: Math.abs(k.out[PH.symp_dev]!) } : {}) };
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
export async function buildHistograms(base: Kernels, builds: readonly string[], maxRows: number): Promise<{ bars: HistBar[]; notes: string[]; table: Record<string, Record<string, number>> } | string> {
  if (base.label !== "f64") return `the histograms compare other builds with the release build; this report is for ${base.label}`;
  const { loadNamedBuild, nativeUnavailable, isBuildName } = await import("../module/builds.js");
  const { traceSuite } = await import("../verify/compare-builds.js");
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

/** One point of the linearisation plot: the miss of the linear guidance flown on the two-body problem. */
export interface LinearPoint {
  readonly chief: string;
  readonly separation: number;
  readonly miss: number;
}

/**
 * Where linear relative-motion guidance is trustworthy: for an invented chief (a circular 7000 km orbit and an
 * e = 0.1 one, mu of the Earth), a deputy `s` behind in-track and `s/2` radially out is sent to the chief's
 * position in 0.4 of an orbit with the two impulses of rendezvous_linear; the first impulse is flown on the full
 * two-body problem (from_relative, propagate of both, to_relative) and the miss distance at the end is the
 * linearisation error. It grows with the square of the separation.
 */
export function linearisation(k: Kernels): LinearPoint[] | string {
  for (const x of ["rendezvous_linear", "from_relative", "to_relative", "propagate"]) if (!k.has(x)) return `${k.label} has no ${x} export`;
  const MU = GM_EARTH;
  const RV = slotsOf("rendezvous_linear", "dv1x", "dv1y", "dv1z");
  const FR = slotsOf("from_relative", "rdx", "rdy", "rdz", "vdx", "vdy", "vdz");
  const TR = slotsOf("to_relative", "x", "y", "z");
  const P = slotsOf("propagate", "rx", "ry", "rz", "vx", "vy", "vz");
  const state = (s: Readonly<Record<string, number>>, names: readonly string[]): number[] => names.map((n) => k.out[s[n]!]!);
  const points: LinearPoint[] = [];
  for (const [chief, e] of [["circular, 7000 km", 0], ["e = 0.1, a = 7000 km", 0.1]] as const) {
    const a = 7000;
    const rc = [a * (1 - e), 0, 0];
    const vc = [0, Math.sqrt((MU * (1 + e)) / (a * (1 - e))), 0];
    const dt = 0.4 * 2 * Math.PI * Math.sqrt(a ** 3 / MU);
    for (let j = 0; j <= 16; j++) {
      const s = 0.01 * 10 ** (j / 4); // km: 10 m to 100 km
      const rel0 = [s / 2, -s, 0, 0, 0, 0];
      if (!isOk(k.call("rendezvous_linear", [MU, ...rc, ...vc, ...rel0, 0, 0, 0, dt]))) continue;
      const dv1 = state(RV, ["dv1x", "dv1y", "dv1z"]);
      if (!isOk(k.call("from_relative", [...rc, ...vc, ...rel0.slice(0, 3), ...rel0.slice(3).map((v, i) => v + dv1[i]!)]))) continue;
      const dep = state(FR, ["rdx", "rdy", "rdz", "vdx", "vdy", "vdz"]);
      if (!isOk(k.call("propagate", [MU, ...dep, dt]))) continue;
      const depEnd = state(P, ["rx", "ry", "rz", "vx", "vy", "vz"]);
      if (!isOk(k.call("propagate", [MU, ...rc, ...vc, dt]))) continue;
      const chiefEnd = state(P, ["rx", "ry", "rz", "vx", "vy", "vz"]);
      if (!isOk(k.call("to_relative", [...chiefEnd, ...depEnd]))) continue;
      const [x, y, z] = state(TR, ["x", "y", "z"]);
      points.push({ chief, separation: s, miss: Math.hypot(x!, y!, z!) });
    }
  }
  return points.length > 0 ? points : "no transfer could be computed";
}
