/**
 * `areal propagate --scenario FILE`: run a fixed-step propagation described by a small JSON scenario, monitor the
 * invariants on every step (the kernels integrate_begin / integrate_step, assembly/integrators.ts), and write
 *  - a trajectory CSV with the state and the invariants of every step, and
 *  - a CCSDS Orbit Ephemeris Message in KVN form (CCSDS 502.0-B, OEM version 2.0) that other tools can read.
 * A budget broken is reported with the invariant, the first step over it and its time; the caller exits non-zero.
 *
 * Scenario fields (JSON object; units km, s, km^3/s^2):
 *   mission, spacecraft        names written into the files (text)
 *   object_id                  OEM OBJECT_ID (text, default "UNKNOWN")
 *   epoch                      start time, YYYY-MM-DDThh:mm:ss[.fff] (no zone suffix)
 *   time_system                OEM TIME_SYSTEM: UTC, TAI, TT, GPS, TDB or TCB (default UTC). Epochs are written
 *                              as epoch + k * step on a uniform scale: no leap second is inserted.
 *   center_name, ref_frame     OEM CENTER_NAME (default EARTH) and REF_FRAME (default EME2000). The zonal field
 *                              takes z of this frame as the body's symmetry axis.
 *   mu, radius, j2, j3         force model (radius, j2, j3 optional: defaults 1, 0, 0)
 *   r, v                       initial position [km] and velocity [km/s], three numbers each
 *   method                     rk4 | verlet | yoshida4 | butcher6
 *   step                       step [s] (negative: backwards)
 *   duration or steps          length of the run: seconds (a whole number of steps) or a step count
 *   budgets                    optional {energy, h, ecc, areal}: relative deviations; absent or 0 means none
 *   oem_every                  write every n-th step to the OEM (default 1; the CSV always has every step)
 */
import type { Kernels } from "../module/load.js";
import { statusWord } from "../module/status.js";
import { shortest } from "../core/float.js";

export class ScenarioError extends Error {}

export const METHODS = { rk4: 0, verlet: 1, yoshida4: 2, butcher6: 3 } as const;
export type MethodName = keyof typeof METHODS;
const TIME_SYSTEMS = ["UTC", "TAI", "TT", "GPS", "TDB", "TCB"] as const;
const INVARIANTS = ["energy", "h", "ecc", "areal"] as const;
export type InvariantName = (typeof INVARIANTS)[number];
/** Largest step count a scenario may ask for (the kernels take up to 1e9 a call; files would be too large). */
export const MAX_SCENARIO_STEPS = 5_000_000;

export interface Scenario {
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
  readonly r: readonly [number, number, number];
  readonly v: readonly [number, number, number];
  readonly method: MethodName;
  readonly step: number;
  readonly steps: number;
  readonly budgets: Readonly<Record<InvariantName, number>>;
  readonly oemEvery: number;
}

const KNOWN_FIELDS = new Set(["mission", "spacecraft", "object_id", "epoch", "time_system", "center_name", "ref_frame",
  "mu", "radius", "j2", "j3", "r", "v", "method", "step", "duration", "steps", "budgets", "oem_every", "comment"]);

/** Parse and check a scenario. Errors name the file and the field. */
export function parseScenario(text: string, source: string): Scenario {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new ScenarioError(`${source}: not valid JSON (${(err as Error).message})`);
  }
  if (typeof raw !== "object" || raw === null || Array.isArray(raw)) throw new ScenarioError(`${source}: expected a JSON object`);
  const o = raw as Record<string, unknown>;
  const bad = (field: string, what: string): never => {
    throw new ScenarioError(`${source}: field '${field}' ${what}`);
  };
  for (const key of Object.keys(o)) if (!KNOWN_FIELDS.has(key)) bad(key, `is not a scenario field (known: ${[...KNOWN_FIELDS].join(", ")})`);
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
  const r = vec("r");
  const v = vec("v");
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
      bad("duration", `(${duration} s) is not a whole number of steps of ${step} s in the step's direction`);
    }
  }
  if (steps > MAX_SCENARIO_STEPS) bad(o.steps !== undefined ? "steps" : "duration", `asks for ${steps} steps; at most ${MAX_SCENARIO_STEPS}`);
  const budgets = { energy: 0, h: 0, ecc: 0, areal: 0 };
  if (o.budgets !== undefined) {
    const b = o.budgets;
    if (typeof b !== "object" || b === null || Array.isArray(b)) bad("budgets", "must be an object {energy, h, ecc, areal}");
    for (const [key, val] of Object.entries(b as Record<string, unknown>)) {
      if (!(INVARIANTS as readonly string[]).includes(key)) bad(`budgets.${key}`, `is not an invariant (known: ${INVARIANTS.join(", ")})`);
      if (typeof val !== "number" || !Number.isFinite(val) || val < 0) bad(`budgets.${key}`, "must be a finite number >= 0");
      budgets[key as InvariantName] = val as number;
    }
  }
  const oemEvery = num("oem_every", 1);
  if (!Number.isInteger(oemEvery) || oemEvery < 1) bad("oem_every", "must be a whole number >= 1");
  return { mission, spacecraft, objectId, epoch, timeSystem, centerName, refFrame, mu, radius, j2, j3, r, v,
    method: m as MethodName, step, steps, budgets, oemEvery };
}

/** An epoch split as whole days since 1970-01-01 and seconds of that day (keeps sub-millisecond steps exact-ish). */
interface Epoch {
  readonly day: number;
  readonly sec: number;
}

function parseEpoch(s: string, source: string): Epoch {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)$/.exec(s);
  if (!m) throw new ScenarioError(`${source}: field 'epoch' is '${s}'; expected YYYY-MM-DDThh:mm:ss[.fff] (no zone suffix)`);
  const [y, mo, d, hh, mm] = [m[1], m[2], m[3], m[4], m[5]].map(Number) as [number, number, number, number, number];
  const ss = Number(m[6]);
  const ms = Date.UTC(y, mo - 1, d);
  const back = new Date(ms);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d || hh > 23 || mm > 59 || ss >= 60) {
    throw new ScenarioError(`${source}: field 'epoch' is '${s}', which is not a valid date and time`);
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

export interface PropagateResult {
  /** Steps done (equal to the scenario's unless the kernel failed). */
  readonly steps: number;
  /** Kernel status of the run: 0 when every step went through. */
  readonly status: number;
  readonly csv: Uint8Array;
  readonly oem: string;
  /** Largest deviation of each invariant over the run. */
  readonly maxDev: Readonly<Record<InvariantName, number>>;
  readonly breaches: readonly Breach[];
}

export const CSV_COLUMNS = ["step", "t", "rx", "ry", "rz", "vx", "vy", "vz", "energy", "hx", "hy", "hz", "ex", "ey", "ez",
  "areal_velocity", "energy_dev", "h_dev", "ecc_dev", "areal_dev"] as const;

export interface PropagateOptions {
  /** Called now and then with (steps done, total); the CLI draws its progress bar with it. */
  readonly progress?: (done: number, total: number) => void;
  /** CREATION_DATE of the OEM (YYYY-MM-DDThh:mm:ss); pass a fixed value for reproducible files. */
  readonly creationDate: string;
  /** Name of the build or module, written into the file headers. */
  readonly source: string;
}

const ROWS_PER_CHUNK = 20_000;

/** Run a scenario on a loaded module. Pure apart from calling the kernels: files are the caller's job. */
export function propagate(k: Kernels, sc: Scenario, opts: PropagateOptions): PropagateResult {
  for (const name of ["integrate_begin", "integrate_step"]) {
    if (!k.has(name)) throw new ScenarioError(`${k.label}: the module has no export ${name} (docs/abi.md)`);
  }
  const b = sc.budgets;
  const st0 = k.call("integrate_begin", [sc.mu, ...sc.r, ...sc.v, sc.step, METHODS[sc.method], sc.j2, sc.j3, sc.radius, b.energy, b.h, b.ecc, b.areal]);
  if (st0 !== 0) throw new ScenarioError(`the initial state is rejected by integrate_begin: ${statusWord(st0)}`);
  const out = k.out;
  const chunks: Buffer[] = [];
  const enc = (s: string): void => void chunks.push(Buffer.from(s, "utf8"));
  const header = [
    `# areal propagate: mission ${sc.mission}, spacecraft ${sc.spacecraft}, module ${opts.source}`,
    `# method ${sc.method}, step ${shortest(sc.step)} s, ${sc.steps} steps, mu ${shortest(sc.mu)} km^3/s^2, radius ${shortest(sc.radius)} km, j2 ${shortest(sc.j2)}, j3 ${shortest(sc.j3)}`,
    `# epoch ${sc.epoch} ${sc.timeSystem}, frame ${sc.refFrame}, centre ${sc.centerName}; t in s from the epoch, km, km/s`,
    `# invariants of every step; deviations from step 0 as defined in assembly/monitor.ts`,
    `# budgets: ${INVARIANTS.map((n) => `${n} ${b[n] > 0 ? shortest(b[n]) : "none"}`).join(", ")}`,
    CSV_COLUMNS.join(","),
  ];
  enc(header.join("\n") + "\n");
  const oemLines: string[] = [];
  const row = (): string => {
    const cells = [out[14]!, out[15]!, out[0]!, out[1]!, out[2]!, out[3]!, out[4]!, out[5]!, out[16]!, out[17]!, out[18]!, out[19]!,
      out[20]!, out[21]!, out[22]!, out[23]!, out[24]!, out[25]!, out[26]!, out[27]!];
    return cells.map(shortest).join(",");
  };
  const oemRow = (): string => {
    const t = out[15]!;
    return `${epochPlus(sc.epoch, t)} ${[out[0]!, out[1]!, out[2]!, out[3]!, out[4]!, out[5]!].map(shortest).join(" ")}`;
  };
  let lines: string[] = [row()];
  oemLines.push(oemRow());
  let status = 0;
  let done = 0;
  const tick = Math.max(1, Math.floor(sc.steps / 200));
  for (let i = 1; i <= sc.steps; i++) {
    status = k.call("integrate_step", [1]);
    if (status !== 0) break;
    done = i;
    lines.push(row());
    if (i % sc.oemEvery === 0 || i === sc.steps) oemLines.push(oemRow());
    if (lines.length >= ROWS_PER_CHUNK) {
      enc(lines.join("\n") + "\n");
      lines = [];
    }
    if (opts.progress && i % tick === 0) opts.progress(i, sc.steps);
  }
  if (lines.length > 0) enc(lines.join("\n") + "\n");
  if (opts.progress) opts.progress(done, sc.steps);
  // A failing integrate_step writes only slot 14 (the failed step): slots 6..13 still hold the last good step's.
  const maxDev = { energy: out[6]!, h: out[7]!, ecc: out[8]!, areal: out[9]! };
  const firsts = { energy: out[10]!, h: out[11]!, ecc: out[12]!, areal: out[13]! };
  const breaches: Breach[] = [];
  for (const n of INVARIANTS) {
    const f = firsts[n];
    if (f >= 0) breaches.push({ invariant: n, budget: b[n], step: f, t: f * sc.step, max: maxDev[n] });
  }
  const oem = formatOem(sc, oemLines, opts, done);
  return { steps: done, status, csv: Buffer.concat(chunks), oem, maxDev, breaches };
}

/** The OEM text (KVN): header, one metadata block, the ephemeris lines. */
export function formatOem(sc: Scenario, data: readonly string[], opts: PropagateOptions, steps: number): string {
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
    "COMMENT units: km and km/s; not flight-qualified",
    ...ordered,
    "",
  ].join("\n");
}

/** A one-line progress bar on a terminal stream: returns the callback for PropagateOptions.progress. */
export function progressBar(stream: NodeJS.WriteStream, label: string): (done: number, total: number) => void {
  const WIDTH = 30;
  let shown = -1;
  return (done, total) => {
    const pct = total === 0 ? 100 : Math.floor((100 * done) / total);
    if (pct === shown) return;
    shown = pct;
    const fill = Math.round((WIDTH * pct) / 100);
    stream.write(`\r${label} [${"#".repeat(fill)}${".".repeat(WIDTH - fill)}] ${String(pct).padStart(3)}% ${done}/${total}`);
    if (done === total) stream.write("\n");
  };
}
