/**
 * `areal trajectory --plan FILE`: run a fixed-step integration described by a small JSON trajectory plan, monitor the
 * invariants on every step (the kernels integrate_begin / integrate_step, assembly/integrators.ts), and write
 *  - a trajectory CSV with the state and the invariants of every step, and
 *  - a CCSDS Orbit Ephemeris Message in KVN form (CCSDS 502.0-B, OEM version 2.0) that other tools can read.
 * A budget broken is reported with the invariant, the first step over it and its time; the caller exits non-zero.
 * With `"transition": true` the run carries the 6x6 transition matrix Phi of the discrete map (integrate_transition_begin,
 * then integrate_phi after every step): the CSV gains the symplectic defect of every step and the 36 entries of Phi,
 * and the budget `symp` bounds the defect.
 *
 * The plan's fields are documented in docs/trajectory-plan.md.
 */
import { parseJsonText } from "../core/json.js";
import type { Kernels } from "../module/load.js";
import { isOk, statusWord } from "../module/status.js";
import { shortest } from "../core/float.js";
import { abiExport, choicesOf, slotsOf } from "../module/routines.js";
import { schemaErrors } from "./plan-schema.js";

export class PlanError extends Error {}

/** The integrators by name (the ABI table's method enumeration). */
export const METHODS: Readonly<Record<string, number>> = choicesOf("method");
export type MethodName = string;
/** Output slots of the integration calls (the ABI table's integration layout). */
const S = slotsOf("integrate_step", "rx", "ry", "rz", "vx", "vy", "vz", "energy_dev", "h_dev", "ecc_dev", "areal_dev",
  "energy_step", "h_step", "ecc_step", "areal_step", "k", "t", "energy", "hx", "hy", "hz", "ex", "ey", "ez", "areal_velocity",
  "energy_dev_now", "h_dev_now", "ecc_dev_now", "areal_dev_now");
const TIME_SYSTEMS = ["UTC", "TAI", "TT", "GPS", "TDB", "TCB"] as const;
const INVARIANTS = ["energy", "h", "ecc", "areal", "symp"] as const;
export type InvariantName = (typeof INVARIANTS)[number];
/** Output slots of integrate_phi (the integration_transition layout). */
const T = slotsOf("integrate_phi", "phi_11", "symp_dev", "symp_step", "symp_dev_now");
/** phi_ij, i = row (final component), j = column (initial component), row-major. */
const PHI_COLUMNS: readonly string[] = Array.from({ length: 36 }, (_, q) => `phi_${Math.floor(q / 6) + 1}${(q % 6) + 1}`);
/** Largest step count a plan may ask for (the kernels take up to 1e9 a call; files would be too large). */
export const MAX_PLAN_STEPS = 5_000_000;

export interface Plan {
  readonly mission: string;
  readonly spacecraft: string;
  readonly objectId: string;
  readonly epoch: string;
  readonly timeSystem: string;
  readonly centerName: string;
  readonly refFrame: string;
  readonly mu: number;
  readonly radius: number;
  readonly j2: number;
  readonly j3: number;
  /** The initial state as given (r, v) or, with `elements`, undefined until initialState converts them. */
  readonly r?: readonly [number, number, number];
  readonly v?: readonly [number, number, number];
  /** The initial state as orbital elements (docs/trajectory-plan.schema.json, $defs/elements). */
  readonly elements?: PlanElements;
  /** The plan file's name, for messages. */
  readonly source: string;
  readonly method: MethodName;
  readonly step: number;
  readonly steps: number;
  readonly budgets: Readonly<Record<InvariantName, number>>;
  readonly oemEvery: number;
  /** Carry the transition matrix and monitor its symplectic defect. */
  readonly transition: boolean;
}

/** Orbital elements of a plan, in the plan's units (km, degrees); exactly one of a_km, p_km and of the anomalies. */
export interface PlanElements {
  readonly a_km?: number;
  readonly p_km?: number;
  readonly e: number;
  readonly i_deg: number;
  readonly raan_deg: number;
  readonly argp_deg: number;
  readonly true_anomaly_deg?: number;
  readonly mean_anomaly_deg?: number;
}

/** Every number in a parsed JSON value is finite (JSON.parse gives Infinity for 1e400); the path of the first that is not. */
function nonFinitePath(x: unknown, path: string): string | undefined {
  if (typeof x === "number") return Number.isFinite(x) ? undefined : path;
  if (Array.isArray(x)) {
    for (let i = 0; i < x.length; i++) {
      const p = nonFinitePath(x[i], `${path}[${i}]`);
      if (p) return p;
    }
  } else if (typeof x === "object" && x !== null) {
    for (const [k, v] of Object.entries(x)) {
      const p = nonFinitePath(v, `${path}.${k}`);
      if (p) return p;
    }
  }
  return undefined;
}

/**
 * Parse and check a trajectory plan against docs/trajectory-plan.schema.json (plan-schema.ts), then what a schema
 * cannot say. Errors name the file, the JSON path and what was expected; all schema errors at once.
 */
export function parsePlan(text: string, source: string): Plan {
  const raw = parseJsonText(text, source, (m) => new PlanError(m));
  const inf = nonFinitePath(raw, "$");
  if (inf) throw new PlanError(`${source}: ${inf}: expected a finite number (the value is beyond the double range)`);
  const errors = schemaErrors(raw, source);
  if (errors.length > 0) throw new PlanError(errors.join("\n"));
  const o = raw as Record<string, unknown>;
  const bad = (field: string, what: string): never => {
    throw new PlanError(`${source}: $.${field}: ${what}`);
  };
  const text_ = (f: string, def?: string): string => {
    const v = o[f];
    if (v === undefined) return def ?? bad(f, "is required");
    if (typeof v !== "string" || v.trim() === "" || /[\r\n]/.test(v)) return bad(f, "must be a non-empty one-line string");
    return v.trim();
  };
  const num = (f: string, def?: number): number => {
    const v = o[f];
    if (v === undefined) return def ?? bad(f, "is required");
    if (typeof v !== "number" || !Number.isFinite(v)) return bad(f, "must be a finite number");
    return v;
  };
  const vec = (f: string): [number, number, number] => {
    const v = o[f];
    if (!Array.isArray(v) || v.length !== 3 || !v.every((x) => typeof x === "number" && Number.isFinite(x))) {
      return bad(f, "must be an array of three finite numbers");
    }
    return [v[0], v[1], v[2]];
  };
  const mission = text_("mission");
  const spacecraft = text_("spacecraft");
  const objectId = text_("object_id", "UNKNOWN");
  const epoch = text_("epoch");
  parseEpoch(epoch, source);
  const timeSystem = text_("time_system", "UTC");
  if (!(TIME_SYSTEMS as readonly string[]).includes(timeSystem)) bad("time_system", `is '${timeSystem}'; expected one of ${TIME_SYSTEMS.join(", ")}`);
  const centerName = text_("center_name", "EARTH");
  const refFrame = text_("ref_frame", "EME2000");
  const mu = num("mu");
  if (!(mu > 0)) bad("mu", "must be positive");
  const radius = num("radius", 1);
  if (!(radius > 0)) bad("radius", "must be positive");
  const j2 = num("j2", 0);
  const j3 = num("j3", 0);
  const elements = o.elements as PlanElements | undefined;
  const r = elements ? undefined : vec("r");
  const v = elements ? undefined : vec("v");
  const m = text_("method");
  if (!(m in METHODS)) bad("method", `is '${m}'; expected one of ${Object.keys(METHODS).join(", ")}`);
  const step = num("step");
  if (step === 0) bad("step", "must not be zero");
  let steps: number;
  if (o.steps !== undefined && o.duration !== undefined) bad("steps", "and 'duration' exclude each other");
  if (o.steps !== undefined) {
    steps = num("steps");
    if (!Number.isInteger(steps) || steps < 0) bad("steps", "must be a whole number >= 0");
  } else {
    const duration = num("duration");
    steps = Math.round(duration / step);
    if (steps < 0 || Math.abs(steps * step - duration) > 1e-9 * Math.max(1, Math.abs(duration))) {
      bad("duration", `expected a whole number of steps of ${step} s in the step's direction; got ${duration} s`);
    }
  }
  if (steps > MAX_PLAN_STEPS) bad(o.steps !== undefined ? "steps" : "duration", `asks for ${steps} steps; at most ${MAX_PLAN_STEPS}`);
  if (o.transition !== undefined && typeof o.transition !== "boolean") bad("transition", "must be true or false");
  const transition = o.transition === true;
  const budgets = { energy: 0, h: 0, ecc: 0, areal: 0, symp: 0 };
  if (o.budgets !== undefined) {
    const b = o.budgets;
    if (typeof b !== "object" || b === null || Array.isArray(b)) bad("budgets", "must be an object {energy, h, ecc, areal, symp}");
    for (const [key, val] of Object.entries(b as Record<string, unknown>)) {
      if (!(INVARIANTS as readonly string[]).includes(key)) bad(`budgets.${key}`, `is not an invariant (known: ${INVARIANTS.join(", ")})`);
      if (typeof val !== "number" || !Number.isFinite(val) || val < 0) bad(`budgets.${key}`, "must be a finite number >= 0");
      if (key === "symp" && !transition) bad("budgets.symp", "needs \"transition\": true (the symplectic defect is that of the transition matrix)");
      budgets[key as InvariantName] = val as number;
    }
  }
  const oemEvery = num("oem_every", 1);
  if (!Number.isInteger(oemEvery) || oemEvery < 1) bad("oem_every", "must be a whole number >= 1");
  return { mission, spacecraft, objectId, epoch, timeSystem, centerName, refFrame, mu, radius, j2, j3,
    ...(r && v ? { r, v } : {}), ...(elements ? { elements } : {}), source, method: m as MethodName, step, steps, budgets, oemEvery, transition };
}

/** An epoch split as whole days since 1970-01-01 and seconds of that day (keeps sub-millisecond steps exact-ish). */
interface Epoch {
  readonly day: number;
  readonly sec: number;
}

function parseEpoch(s: string, source: string): Epoch {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)$/.exec(s);
  if (!m) throw new PlanError(`${source}: $.epoch: expected YYYY-MM-DDThh:mm:ss[.fff] (no zone suffix); got '${s}'`);
  const [y, mo, d, hh, mm] = [m[1], m[2], m[3], m[4], m[5]].map(Number) as [number, number, number, number, number];
  const ss = Number(m[6]);
  const ms = Date.UTC(y, mo - 1, d);
  const back = new Date(ms);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d || hh > 23 || mm > 59 || ss >= 60) {
    throw new PlanError(`${source}: $.epoch: expected a valid date and time; got '${s}'`);
  }
  return { day: Math.round(ms / 86400000), sec: hh * 3600 + mm * 60 + ss };
}

/** The epoch `t` seconds after `e`, formatted YYYY-MM-DDThh:mm:ss.ffffff (uniform time scale). */
let lastEpoch: [string, Epoch] | undefined;
export function epochPlus(e: string, t: number): string {
  if (lastEpoch?.[0] !== e) lastEpoch = [e, parseEpoch(e, "epoch")];
  const p = lastEpoch[1];
  let sec = p.sec + t;
  const dd = Math.floor(sec / 86400);
  sec -= dd * 86400;
  let micro = Math.round(sec * 1e6);
  let day = p.day + dd;
  if (micro >= 86400e6) {
    micro -= 86400e6;
    day += 1;
  }
  const date = new Date(day * 86400000).toISOString().slice(0, 10);
  const s = Math.floor(micro / 1e6);
  const frac = String(micro - s * 1e6).padStart(6, "0");
  const hh = String(Math.floor(s / 3600)).padStart(2, "0");
  const mm = String(Math.floor((s % 3600) / 60)).padStart(2, "0");
  const ss = String(s % 60).padStart(2, "0");
  return `${date}T${hh}:${mm}:${ss}.${frac}`;
}

/** A budget broken: the invariant, its budget, the first step over it and the largest deviation of the run. */
export interface Breach {
  readonly invariant: InvariantName;
  readonly budget: number;
  readonly step: number;
  readonly t: number;
  readonly max: number;
}

export interface TrajectoryResult {
  /** Steps done (equal to the plan's unless the kernel failed). */
  readonly steps: number;
  /** Kernel status of the run: 0 when every step went through. */
  readonly status: number;
  readonly csv: Uint8Array;
  readonly oem: string;
  /** Largest deviation of each invariant over the run (symp only when the run carries the transition matrix). */
  readonly maxDev: Readonly<Partial<Record<InvariantName, number>>>;
  readonly breaches: readonly Breach[];
}

export const CSV_COLUMNS = ["step", "t", "rx", "ry", "rz", "vx", "vy", "vz", "energy", "hx", "hy", "hz", "ex", "ey", "ez",
  "areal_velocity", "energy_dev", "h_dev", "ecc_dev", "areal_dev"] as const;
/** The slot behind each CSV column (the deviations are this step's, the *_now slots). */
const CSV_SLOTS: readonly number[] = [S.k, S.t, S.rx, S.ry, S.rz, S.vx, S.vy, S.vz, S.energy, S.hx, S.hy, S.hz, S.ex, S.ey, S.ez,
  S.areal_velocity, S.energy_dev_now, S.h_dev_now, S.ecc_dev_now, S.areal_dev_now];

export interface TrajectoryOptions {
  /** Called now and then with (steps done, total); the CLI draws its progress bar with it. */
  readonly progress?: (done: number, total: number) => void;
  /** CREATION_DATE of the OEM (YYYY-MM-DDThh:mm:ss); pass a fixed value for reproducible files. */
  readonly creationDate: string;
  /** Name of the build or module, written into the file headers. */
  readonly source: string;
}

const ROWS_PER_CHUNK = 20_000;

/**
 * Each CSV column: its unit and meaning, under a point mass and, where it differs, in a zonal field (j2 or j3 not
 * 0). The same table is in the README ("Trajectory files"); tests/trajectory-plan.test.ts checks that both list
 * every column. The deviations are this step's (the kernel's *_now slots), not running maxima.
 */
export const COLUMN_DOCS: Readonly<Record<(typeof CSV_COLUMNS)[number], { unit: string; doc: string; zonal?: string }>> = {
  step: { unit: "count", doc: "step index k (0 is the initial state)" },
  t: { unit: "s", doc: "time from the epoch, k * step" },
  rx: { unit: "km", doc: "position x in ref_frame" },
  ry: { unit: "km", doc: "position y" },
  rz: { unit: "km", doc: "position z" },
  vx: { unit: "km/s", doc: "velocity x in ref_frame" },
  vy: { unit: "km/s", doc: "velocity y" },
  vz: { unit: "km/s", doc: "velocity z" },
  energy: { unit: "km^2/s^2", doc: "specific energy v.v/2 - mu/r", zonal: "v.v/2 + V(r) with the J2, J3 terms of V (conserved: the field is static)" },
  hx: { unit: "km^2/s", doc: "angular momentum r x v, x" },
  hy: { unit: "km^2/s", doc: "angular momentum r x v, y" },
  hz: { unit: "km^2/s", doc: "angular momentum r x v, z (the conserved component in a zonal field)" },
  ex: { unit: "1", doc: "eccentricity vector ((v.v - mu/r) r - (r.v) v) / mu, x (osculating)" },
  ey: { unit: "1", doc: "eccentricity vector, y" },
  ez: { unit: "1", doc: "eccentricity vector, z" },
  areal_velocity: { unit: "km^2/s", doc: "areal velocity |h| / 2", zonal: "h_z / 2, that of the projection on the equator (the conserved part): hz / 2 on every row" },
  energy_dev: { unit: "1", doc: "|E - E0| / |E0| at this step" },
  h_dev: { unit: "1", doc: "|h - h0| / |h0| at this step (the whole vector)", zonal: "|h_z - h_z0| / |h0|: the same value as areal_dev on every row" },
  ecc_dev: { unit: "1", doc: "|e - e0| at this step", zonal: "not an invariant (J2 turns the orbit); an ecc budget is ignored" },
  areal_dev: { unit: "1", doc: "||h| - |h0|| / |h0| at this step (the size of h only)", zonal: "|h_z - h_z0| / |h0|: the same value as h_dev on every row" },
};

/** Columns added when the run carries the transition matrix: this step's symplectic defect, then Phi. */
export const CSV_TRANSITION_COLUMNS: readonly string[] = ["symp_dev", ...PHI_COLUMNS];
const CSV_TRANSITION_SLOTS: readonly number[] = [T.symp_dev_now, ...PHI_COLUMNS.map((_, q) => T.phi_11 + q)];

/** Header lines of the transition columns: meaning and unit from the ABI table's integration_transition layout. */
function transitionNotes(): string[] {
  const outs = abiExport("integrate_phi").outputs;
  const unit = (u: string): string => u.replace(/length/g, "km").replace(/time/g, "s");
  return CSV_TRANSITION_COLUMNS.map((c, i) => {
    const o = outs[CSV_TRANSITION_SLOTS[i]!]!;
    return `# column ${c} [${unit(o.unit)}]: ${o.doc ?? c}`;
  });
}

/** One header line per CSV column: its unit and its meaning under this plan's force model. */
function columnNotes(zonal: boolean, transition: boolean): string[] {
  const lines = CSV_COLUMNS.map((c) => {
    const d = COLUMN_DOCS[c];
    return `# column ${c} [${d.unit}]: ${zonal && d.zonal ? d.zonal : d.doc}`;
  });
  if (zonal) lines.push("# zonal field on: only h_z of the angular momentum is conserved, so h_dev and areal_dev carry one quantity and areal_velocity is hz / 2; the columns stay so that every plan has the same columns");
  return transition ? [...lines, ...transitionNotes()] : lines;
}

const DEG = Math.PI / 180;
const NU = slotsOf("mean_to_true", "nu");
const SV = slotsOf("state", "rx", "ry", "rz", "vx", "vy", "vz");

/**
 * The plan's initial state: r and v as given, or the elements converted by the module's own kernels (degrees to
 * radians; a mean anomaly to the true anomaly by mean_to_true; then state with a_km, state_p with p_km). A status
 * other than ok is an error naming the file, $.elements and the kernel's word (out-of-domain for a of the wrong
 * sign for e, unreachable for a true anomaly beyond a hyperbola's asymptote, ...).
 */
export function initialState(k: Kernels, sc: Plan): { r: [number, number, number]; v: [number, number, number]; nu?: number } {
  if (sc.r && sc.v) return { r: [...sc.r], v: [...sc.v] };
  const el = sc.elements!;
  const fail = (what: string): never => {
    throw new PlanError(`${sc.source}: $.elements: ${what}`);
  };
  let nu = (el.true_anomaly_deg ?? 0) * DEG;
  if (el.mean_anomaly_deg !== undefined) {
    const st = k.call("mean_to_true", [el.e, el.mean_anomaly_deg * DEG]);
    if (!isOk(st)) fail(`the mean anomaly is rejected by mean_to_true (e ${shortest(el.e)}): ${statusWord(st)}`);
    nu = k.out[NU.nu]!;
  }
  const [name, size] = el.a_km !== undefined ? ["state", el.a_km] : ["state_p", el.p_km!];
  if (name === "state" && el.e === 1) fail("e = 1 (a parabola) has no semi-major axis; give p_km");
  if (name === "state" && (el.e < 1) !== (size > 0)) fail(`a_km ${shortest(size)} with e ${shortest(el.e)}: expected a_km > 0 for e < 1 (ellipse), a_km < 0 for e > 1 (hyperbola)`);
  const st = k.call(name, [sc.mu, size, el.e, el.i_deg * DEG, el.raan_deg * DEG, el.argp_deg * DEG, nu]);
  const word = statusWord(st);
  if (!isOk(st)) fail(`rejected by the ${name} kernel: ${word}${word === "unreachable" ? " (the true anomaly is beyond the hyperbola's asymptote)" : ""}`);
  const o = k.out;
  return { r: [o[SV.rx]!, o[SV.ry]!, o[SV.rz]!], v: [o[SV.vx]!, o[SV.vy]!, o[SV.vz]!], nu };
}

/** The elements as given, with units, for the file headers. */
function elementsText(el: PlanElements): string {
  return Object.entries(el).map(([k, v]) => `${k} ${shortest(v as number)}`).join(", ");
}

/** Run a plan on a loaded module. Pure apart from calling the kernels: files are the caller's job. */
export function runTrajectory(k: Kernels, sc: Plan, opts: TrajectoryOptions): TrajectoryResult {
  const beginName = sc.transition ? "integrate_transition_begin" : "integrate_begin";
  const needs = [beginName, "integrate_step", ...(sc.transition ? ["integrate_phi"] : []), ...(sc.elements ? ["state", "state_p", "mean_to_true"] : [])];
  for (const name of needs) {
    if (!k.has(name)) throw new PlanError(`${k.label}: the module has no export ${name} (docs/abi.md)`);
  }
  const b = sc.budgets;
  const init = initialState(k, sc);
  const args = [sc.mu, ...init.r, ...init.v, sc.step, METHODS[sc.method]!, sc.j2, sc.j3, sc.radius, b.energy, b.h, b.ecc, b.areal];
  const st0 = k.call(beginName, sc.transition ? [...args, b.symp] : args);
  if (st0 !== 0) throw new PlanError(`the initial state is rejected by ${beginName}: ${statusWord(st0)}`);
  const invariants = INVARIANTS.filter((n) => sc.transition || n !== "symp");
  const out = k.out;
  const chunks: Buffer[] = [];
  const enc = (s: string): void => void chunks.push(Buffer.from(s, "utf8"));
  const header = [
    `# areal trajectory: mission ${sc.mission}, spacecraft ${sc.spacecraft}, module ${opts.source}`,
    `# method ${sc.method}, step ${shortest(sc.step)} s, ${sc.steps} steps, mu ${shortest(sc.mu)} km^3/s^2, radius ${shortest(sc.radius)} km, j2 ${shortest(sc.j2)}, j3 ${shortest(sc.j3)}`,
    `# epoch ${sc.epoch} ${sc.timeSystem}, frame ${sc.refFrame}, centre ${sc.centerName}; t in s from the epoch, km, km/s`,
    `# initial state ${init.r.map(shortest).join(" ")} km, ${init.v.map(shortest).join(" ")} km/s${sc.elements ? ` from the plan's elements (${elementsText(sc.elements)}) by areal's ${sc.elements.a_km !== undefined ? "state" : "state_p"} kernel${sc.elements.mean_anomaly_deg !== undefined ? ` (true anomaly ${shortest(init.nu! / DEG)} deg from mean_to_true)` : ""}` : " as given"}`,
    ...columnNotes(sc.j2 !== 0 || sc.j3 !== 0, sc.transition),
    `# budgets: ${invariants.map((n) => `${n} ${b[n] > 0 ? shortest(b[n]) : "none"}`).join(", ")}`,
    [...CSV_COLUMNS, ...(sc.transition ? CSV_TRANSITION_COLUMNS : [])].join(","),
  ];
  enc(header.join("\n") + "\n");
  const oemLines: string[] = [];
  // With Phi, integrate_phi overwrites the region after the integration slots are read (it writes its own layout).
  let sympMax = 0;
  let sympFirst = -1;
  const row = (): string => {
    const base = CSV_SLOTS.map((i) => shortest(out[i]!)).join(",");
    if (!sc.transition) return base;
    const st = k.call("integrate_phi", []);
    if (st !== 0) throw new PlanError(`integrate_phi failed: ${statusWord(st)}`);
    sympMax = out[T.symp_dev]!;
    sympFirst = out[T.symp_step]!;
    return `${base},${CSV_TRANSITION_SLOTS.map((i) => shortest(out[i]!)).join(",")}`;
  };
  const oemRow = (): string => {
    const t = out[S.t]!;
    return `${epochPlus(sc.epoch, t)} ${[S.rx, S.ry, S.rz, S.vx, S.vy, S.vz].map((i) => shortest(out[i]!)).join(" ")}`;
  };
  let lines: string[] = [];
  // The integration summary of the last good step, read before integrate_phi rewrites the region.
  const maxDev: Partial<Record<InvariantName, number>> = {};
  const firsts: Partial<Record<InvariantName, number>> = {};
  const record = (withOem: boolean): void => {
    if (withOem) oemLines.push(oemRow());
    Object.assign(maxDev, { energy: out[S.energy_dev]!, h: out[S.h_dev]!, ecc: out[S.ecc_dev]!, areal: out[S.areal_dev]! });
    Object.assign(firsts, { energy: out[S.energy_step]!, h: out[S.h_step]!, ecc: out[S.ecc_step]!, areal: out[S.areal_step]! });
    lines.push(row());
  };
  record(true);
  let status = 0;
  let done = 0;
  const tick = Math.max(1, Math.floor(sc.steps / 200));
  for (let i = 1; i <= sc.steps; i++) {
    status = k.call("integrate_step", [1]);
    if (status !== 0) break;
    done = i;
    record(i % sc.oemEvery === 0 || i === sc.steps);
    if (lines.length >= ROWS_PER_CHUNK) {
      enc(lines.join("\n") + "\n");
      lines = [];
    }
    if (opts.progress && i % tick === 0) opts.progress(i, sc.steps);
  }
  if (lines.length > 0) enc(lines.join("\n") + "\n");
  if (opts.progress) opts.progress(done, sc.steps);
  // A failing step writes nothing but the failed step number: the summary is the last good step's (record()).
  if (sc.transition) {
    maxDev.symp = sympMax;
    firsts.symp = sympFirst;
  }
  const breaches: Breach[] = [];
  for (const n of invariants) {
    const f = firsts[n]!;
    if (f >= 0) breaches.push({ invariant: n, budget: b[n], step: f, t: f * sc.step, max: maxDev[n]! });
  }
  const oem = formatOem(sc, oemLines, opts, done);
  return { steps: done, status, csv: Buffer.concat(chunks), oem, maxDev, breaches };
}

/** The OEM text (KVN): header, one metadata block, the ephemeris lines. */
export function formatOem(sc: Plan, data: readonly string[], opts: TrajectoryOptions, steps: number): string {
  const start = epochPlus(sc.epoch, 0);
  const stop = epochPlus(sc.epoch, steps * sc.step);
  const [first, last] = sc.step > 0 ? [start, stop] : [stop, start];
  const ordered = sc.step > 0 ? data : [...data].reverse(); // OEM epochs must increase
  return [
    "CCSDS_OEM_VERS = 2.0",
    `CREATION_DATE = ${opts.creationDate}`,
    "ORIGINATOR = AREAL",
    "",
    "META_START",
    `OBJECT_NAME = ${sc.spacecraft}`,
    `OBJECT_ID = ${sc.objectId}`,
    `CENTER_NAME = ${sc.centerName}`,
    `REF_FRAME = ${sc.refFrame}`,
    `TIME_SYSTEM = ${sc.timeSystem}`,
    `START_TIME = ${first}`,
    `STOP_TIME = ${last}`,
    "META_STOP",
    "",
    `COMMENT mission ${sc.mission}; propagated by areal (${opts.source}), method ${sc.method}, step ${shortest(sc.step)} s`,
    `COMMENT force model: mu ${shortest(sc.mu)} km**3/s**2, radius ${shortest(sc.radius)} km, J2 ${shortest(sc.j2)}, J3 ${shortest(sc.j3)}`,
    ...(sc.elements ? [`COMMENT initial state from orbital elements: ${elementsText(sc.elements)}`] : []),
    "COMMENT units: km and km/s; not flight-qualified",
    ...ordered,
    "",
  ].join("\n");
}
