/**
 * Vector suites for the two-body kernels: universal-variable propagation, classical elements both ways, and
 * modified equinoctial elements both ways. Cases are seeded orbits of named classes (tags): low orbits,
 * geostationary, e about 0.74 and 0.95, transfer orbits, hyperbolic escape, near-parabolic on both sides of
 * e = 1, retrograde, polar, equatorial, circular, and canonical units (mu = 1). Earth's GM is the WGS 84 value
 * 398600.4418 km^3/s^2 (NIMA TR8350.2); lengths in km, times in s. Each suite has an exact-f32-input companion
 * (`<suite>-f32in`: a few hundred of its cases rounded to binary32) for the single-precision build.
 */
import { Rng } from "../../core/rng.js";
import { referencePropagate, referenceElements, referenceState, referenceEquinoctial, referenceFromEquinoctial } from "../reference/twobody.js";
import type { Case, Comparison, VectorSpec } from "./types.js";
import { GM_EARTH, GM_EARTH_NOTE } from "../../core/constants.js";

/** WGS 84 Earth GM, km^3/s^2 (NIMA TR8350.2). */
const TWO_PI = 2 * Math.PI;
const EDGE_NOTE = "tags edge-*: the edges of the domain (docs/edges.md), seeded groups appended after the other cases so that those keep their rows";

export const ORBIT_CLASSES = [
  "leo",
  "geo",
  "e074",
  "e095",
  "transfer",
  "hyperbolic",
  "near-parabolic-e",
  "near-parabolic-h",
  "retrograde",
  "polar",
  "equatorial",
  "circular",
  "circular-equatorial",
  "canonical",
] as const;
export type OrbitClass = (typeof ORBIT_CLASSES)[number];

/** An orbit by elements (p instead of a, so every conic fits), and how to zero z for an equatorial one. */
export interface Orbit {
  mu: number;
  p: number;
  e: number;
  i: number;
  raan: number;
  argp: number;
  nu: number;
  cls: OrbitClass;
  /** Set the z components to exactly 0 (equatorial orbits, i = 0 or pi). */
  planar: boolean;
}

/** An angle away from the 0 / 2 pi seam (so that wrapped outputs are compared without ambiguity). */
const angle = (rng: Rng): number => rng.between(0.05, TWO_PI - 0.05);

/** A true anomaly reachable on the conic, at most `frac` of the way to the asymptote for e >= 1. */
function anomaly(rng: Rng, e: number, frac = 0.9): number {
  if (e < 1) return angle(rng);
  const lim = Math.min(Math.acos(-1 / e), 2.8) * frac;
  const nu = rng.between(-lim, lim);
  return nu < 0 ? nu + TWO_PI : nu;
}

/** A seeded orbit of the given class. */
export function orbitOf(rng: Rng, cls: OrbitClass): Orbit {
  const mu = GM_EARTH;
  const o: Orbit = { mu, p: 0, e: 0, i: rng.between(0.05, 1.7), raan: angle(rng), argp: angle(rng), nu: 0, cls, planar: false };
  const fromRp = (rp: number, e: number): void => {
    o.e = e;
    o.p = rp * (1 + e);
  };
  switch (cls) {
    case "leo":
      fromRp(rng.between(6578, 7378), rng.uniform() < 0.3 ? 0 : rng.logUniform(-6, -2));
      break;
    case "geo": {
      o.e = rng.logUniform(-6, -3.5);
      o.p = 42164.17 * (1 - o.e * o.e);
      o.i = rng.between(0.001, 0.03);
      break;
    }
    case "e074":
      o.e = rng.between(0.73, 0.75);
      o.p = rng.between(26000, 27000) * (1 - o.e * o.e);
      o.i = rng.between(0.9, 1.2);
      break;
    case "e095":
      fromRp(rng.between(6600, 12000), rng.between(0.94, 0.96));
      o.i = rng.between(0.05, Math.PI - 0.05);
      break;
    case "transfer": {
      const u = rng.uniform();
      const rp = u < 0.4 ? 6578 : u < 0.7 ? 6678 : 6700;
      const ra = u < 0.4 ? 42164 : u < 0.7 ? 42164.17 : 384400; // GTO, LEO-GEO Hohmann, translunar
      const rpj = rp * (1 + rng.between(-1e-3, 1e-3));
      fromRp(rpj, (ra - rpj) / (ra + rpj));
      o.i = u < 0.7 ? rng.between(0, 0.5) : rng.between(0.3, 0.5);
      break;
    }
    case "hyperbolic":
      fromRp(rng.between(6500, 50000), 1 + rng.logUniform(-1.3, 0.9));
      o.i = rng.between(0.05, Math.PI - 0.05);
      break;
    case "near-parabolic-e":
      fromRp(rng.between(6600, 20000), 1 - rng.logUniform(-12, -3));
      break;
    case "near-parabolic-h":
      fromRp(rng.between(6600, 20000), 1 + rng.logUniform(-12, -3));
      break;
    case "retrograde":
      fromRp(rng.between(6600, 30000), rng.uniform() * 0.6);
      o.i = rng.between(Math.PI / 2 + 0.05, Math.PI - 0.05);
      break;
    case "polar":
      fromRp(rng.between(6600, 30000), rng.uniform() * 0.3);
      o.i = Math.PI / 2;
      break;
    case "equatorial":
      fromRp(rng.between(6600, 42164), rng.between(1e-3, 0.8));
      o.i = rng.uniform() < 0.7 ? 0 : Math.PI;
      o.raan = 0;
      o.planar = true;
      break;
    case "circular":
      fromRp(rng.between(6600, 42164), 0);
      o.i = rng.between(0.05, Math.PI - 0.05);
      o.argp = 0;
      break;
    case "circular-equatorial":
      fromRp(rng.between(6600, 42164), 0);
      o.i = 0;
      o.raan = 0;
      o.argp = 0;
      o.planar = true;
      break;
    case "canonical":
      o.mu = 1;
      o.e = rng.uniform() * 0.9;
      o.p = rng.between(0.5, 3) * (1 - o.e * o.e);
      break;
  }
  if (o.e === 0) o.argp = 0; // the argument of latitude (= nu) then stays off the 0 / 2 pi seam
  o.nu = anomaly(rng, o.e);
  return o;
}

/** The state of an orbit, in double precision (the case's exact inputs are whatever doubles this gives). */
export function stateOf(o: Orbit): number[] {
  const cO = Math.cos(o.raan), sO = Math.sin(o.raan), ci = Math.cos(o.i), si = Math.sin(o.i), cw = Math.cos(o.argp), sw = Math.sin(o.argp);
  const P = [cO * cw - sO * sw * ci, sO * cw + cO * sw * ci, sw * si];
  const Q = [-cO * sw - sO * cw * ci, -sO * sw + cO * cw * ci, cw * si];
  const cn = Math.cos(o.nu), sn = Math.sin(o.nu);
  const r = o.p / (1 + o.e * cn);
  const k = Math.sqrt(o.mu / o.p);
  const state = [0, 1, 2].map((j) => r * cn * P[j]! + r * sn * Q[j]!).concat([0, 1, 2].map((j) => -k * sn * P[j]! + k * (o.e + cn) * Q[j]!));
  if (o.planar) state[2] = state[5] = 0; // z and vz
  return state;
}

/** A time step for the orbit: |dt| log-uniform from 1 s (1e-4 time units for mu = 1) to 100 periods. */
function stepFor(rng: Rng, o: Orbit): number {
  const rp = o.p / (1 + o.e);
  const tp = TWO_PI * Math.sqrt((rp * rp * rp) / o.mu); // period of the circle at periapsis
  let upper: number;
  if (o.e < 1) {
    const a = o.p / (1 - o.e * o.e);
    const T = TWO_PI * Math.sqrt((a * a * a) / o.mu);
    upper = o.cls === "near-parabolic-e" && rng.uniform() < 0.8 ? Math.min(100 * T, 1e3 * tp) : 100 * T;
  } else {
    upper = 1e3 * tp;
  }
  const lower = o.mu === 1 ? 1e-4 * tp : 1;
  const dt = rng.logUniform(Math.log10(lower), Math.log10(upper));
  return rng.uniform() < 0.3 ? -dt : dt;
}

const GENERATOR = "areal vectors: harness/reference/twobody.ts (decimal.js, classical elements and Kepler's equation by bracketed Newton, exact input doubles)";
const CONVERSION_GENERATOR = "areal vectors: harness/reference/twobody.ts (decimal.js, vector and angle forms, exact input doubles)";
const COND_NOTE = "cond_*: largest change of the output (relative for lengths, vectors and e; absolute for angles, f, g, h, k) when one input double moves up by one ulp";
const UNITS_NOTE = `mu = ${GM_EARTH_NOTE}, km, km/s, s; tag canonical: mu = 1`;

/** Cases cycling through the classes. */
function classCases(seed: number, count: number, make: (rng: Rng, o: Orbit) => number[] | undefined, classes: readonly OrbitClass[] = ORBIT_CLASSES): Case[] {
  const rng = new Rng(seed);
  const out: Case[] = [];
  for (let n = 0; out.length < count && n < count * 4; n++) {
    const cls = classes[n % classes.length]!;
    const inputs = make(rng, orbitOf(rng, cls));
    if (inputs) out.push({ inputs, tag: cls });
  }
  return out;
}

const vec = (prefix: string, suffix = ""): string[] => ["x", "y", "z"].map((c) => `${prefix}${c}${suffix}`);
/** A state output (r, v) compared as two vectors against the reference, each widened by its conditioning. */
const STATE_REFS = [...vec("r", "_ref"), ...vec("v", "_ref"), "cond_r", "cond_v"];
const STATE_COMPARE: Comparison[] = [
  { output: "rx", ref: "rx_ref", metric: "rel", group: vec("r"), refGroup: vec("r", "_ref"), cond: "cond_r" },
  { output: "vx", ref: "vx_ref", metric: "rel", group: vec("v"), refGroup: vec("v", "_ref"), cond: "cond_v" },
];

export const propagateSpec: VectorSpec = {
  suite: "propagate",
  routine: "propagate",
  inputs: ["mu", "r0x", "r0y", "r0z", "v0x", "v0y", "v0z", "dt"],
  refs: [...vec("r", "_ref"), ...vec("v", "_ref"), "cond_r", "cond_v", "revs"],
  compare: [
    { output: "rx", ref: "rx_ref", metric: "rel", group: vec("r"), refGroup: vec("r", "_ref"), cond: "cond_r", revs: "revs" },
    { output: "vx", ref: "vx_ref", metric: "rel", group: vec("v"), refGroup: vec("v", "_ref"), cond: "cond_v", revs: "revs" },
  ],
  iterations: "iterations",
  generator: GENERATOR,
  precision: "50 significant digits (more near e = 1: 50 + digits lost in 2 - r v^2 / mu), rounded to nearest double",
  notes: [
    "r_ref, v_ref: state after dt; compared as vectors: |r - r_ref| / |r_ref| <= max(max_rel (1 + revs), cond_factor cond_r), same for v",
    COND_NOTE,
    "revs: |dt| / period for the ellipse, 0 otherwise",
    UNITS_NOTE,
    "tags: orbit classes (specs/twobody.ts), seed 20261210; |dt| log-uniform from 1 s to 100 periods, 30% negative",
  ],
  cases: () => classCases(20261210, 3100, (rng, o) => [o.mu, ...stateOf(o), stepFor(rng, o)]),
  reference: (x) => referencePropagate(x),
};

const ELEMENT_NAMES = ["a", "e", "i", "raan", "argp", "nu", "p"];
const EQ_NAMES = ["p", "f", "g", "h", "k", "L"];

/** Output `n` against column `n_ref`, within the limits scaled by column `cond_n`. */
const against = (n: string, metric: "rel" | "abs"): Comparison => ({ output: n, ref: `${n}_ref`, metric, cond: `cond_${n}` });

export const elementsSpec: VectorSpec = {
  suite: "elements",
  routine: "elements",
  inputs: ["mu", "rx", "ry", "rz", "vx", "vy", "vz"],
  refs: [...ELEMENT_NAMES.map((n) => `${n}_ref`), "status_ref", ...ELEMENT_NAMES.map((n) => `cond_${n}`)],
  // e is absolute (its cond column stays relative, scaled by |e_ref|): e of a nearly circular orbit is about 1e-16,
  // where a relative limit widened by the conditioning accepted 100% error or more on 203 of the 1200 rows.
  compare: [
    against("a", "rel"),
    { ...against("e", "abs"), condRelative: true },
    against("p", "rel"),
    ...["i", "raan", "argp", "nu"].map((n) => against(n, "abs")),
  ],
  generator: CONVERSION_GENERATOR,
  precision: "50 significant digits (more near e = 1), rounded to nearest double",
  notes: [
    "conventions: circular (e <= 2^-36) argp = 0, nu = argument of latitude (status 1); equatorial (sin i <= 2^-36) raan = 0, argp = longitude of periapsis (2); both: nu = true longitude (3)",
    "status_ref: the status the conventions give; a = 0 would mark a parabola",
    COND_NOTE,
    UNITS_NOTE,
    "tags: orbit classes, seed 20261211",
    `${EDGE_NOTE}; seed 20261231`,
  ],
  cases: () => [...classCases(20261211, 1200, (_rng, o) => [o.mu, ...stateOf(o)]), ...edgeOrbitCases(20261231, 3, (o) => [o.mu, ...stateOf(o)])],
  reference: (x) => referenceElements(x),
};

export const stateSpec: VectorSpec = {
  suite: "state",
  routine: "state",
  inputs: ["mu", "a", "e", "i", "raan", "argp", "nu"],
  refs: STATE_REFS,
  compare: STATE_COMPARE,
  generator: CONVERSION_GENERATOR,
  precision: "50 significant digits, rounded to nearest double",
  notes: ["a = p / (1 - e^2) of the seeded orbit, rounded; e = 1 is not in this suite (state_p takes p)", COND_NOTE, UNITS_NOTE, "tags: orbit classes, seed 20261212", `${EDGE_NOTE}; seed 20261232`],
  cases: () => {
    const make = (o: Orbit): number[] => [o.mu, o.p / ((1 - o.e) * (1 + o.e)), o.e, o.i, o.raan, o.argp, o.nu];
    return [...classCases(20261212, 1200, (_rng, o) => make(o)), ...edgeOrbitCases(20261232, 3, (o) => make(o))];
  },
  reference: (x) => referenceState(x),
};

export const equinoctialSpec: VectorSpec = {
  suite: "equinoctial",
  routine: "equinoctial",
  inputs: ["mu", "rx", "ry", "rz", "vx", "vy", "vz"],
  refs: [...EQ_NAMES.map((n) => `${n}_ref`), ...EQ_NAMES.map((n) => `cond_${n}`)],
  compare: [against("p", "rel"), ...EQ_NAMES.slice(1).map((n) => against(n, "abs"))],
  generator: CONVERSION_GENERATOR,
  precision: "50 significant digits, rounded to nearest double",
  notes: [
    "modified equinoctial elements (Walker, Ireland and Owens 1985), retrograde factor +1; the reference goes through the classical angles",
    "no retrograde equatorial case (the set is singular at i = pi)",
    COND_NOTE,
    UNITS_NOTE,
    "tags: orbit classes, seed 20261213",
    `${EDGE_NOTE}; seed 20261233`,
  ],
  cases: () => {
    const make = (o: Orbit): number[] | undefined => {
      if (o.i > 3.0) return undefined;
      // L = raan + argp + nu must stay off the 0 / 2 pi seam.
      const L = (((o.raan + o.argp + o.nu) % TWO_PI) + TWO_PI) % TWO_PI;
      if (L < 0.01 || L > TWO_PI - 0.01) return undefined;
      return [o.mu, ...stateOf(o)];
    };
    return [...classCases(20261213, 1200, (_rng, o) => make(o)), ...edgeOrbitCases(20261233, 3, make)];
  },
  reference: (x) => referenceEquinoctial(x),
};

export const fromEquinoctialSpec: VectorSpec = {
  suite: "from-equinoctial",
  routine: "from-equinoctial",
  inputs: ["mu", "p", "f", "g", "h", "k", "L"],
  refs: STATE_REFS,
  compare: STATE_COMPARE,
  generator: CONVERSION_GENERATOR,
  precision: "50 significant digits, rounded to nearest double",
  notes: ["the reference goes through the classical elements", COND_NOTE, UNITS_NOTE, "tags: random (e < 0.9), hyperbolic (e up to 3), circular, equatorial; seed 20261214", `${EDGE_NOTE}; seed 20261234`],
  cases(): Case[] {
    const rng = new Rng(20261214);
    const out: Case[] = [];
    const tags = ["random", "hyperbolic", "circular", "equatorial"];
    for (let n = 0; out.length < 1000; n++) {
      const tag = tags[n % tags.length]!;
      const e = tag === "circular" ? 0 : tag === "hyperbolic" ? rng.between(1.01, 3) : rng.uniform() * 0.9;
      const w = rng.between(0, TWO_PI);
      const t = tag === "equatorial" ? 0 : Math.tan(rng.between(0, 1.45)); // i up to 2.9 rad
      const O = rng.between(0, TWO_PI);
      const L = rng.between(0.01, TWO_PI - 0.01);
      const f = e * Math.cos(w);
      const g = e * Math.sin(w);
      if (1 + f * Math.cos(L) + g * Math.sin(L) < 0.05) continue;
      out.push({ inputs: [GM_EARTH, rng.between(6600, 50000), f, g, t * Math.cos(O), t * Math.sin(O), L], tag });
    }
    return [...out, ...fromEquinoctialEdges()];
  },
  reference: (x) => referenceFromEquinoctial(x),
};

// ---- edge cases (docs/edges.md) ----------------------------------------------------------------------------

const isEdge = (c: Case): boolean => c.tag.startsWith("edge-");

/** One edge of the state-based suites: a tag and the parts of an orbit it pins (the rest drawn by the seed). */
interface EdgeOrbit {
  tag: string;
  mu?: number;
  rp?: number;
  e?: number;
  i?: number;
  nu?: number;
  planar?: boolean;
}

/**
 * The edges of the element conversions: e next to 0 (either side of the 2^-36 circular convention, never within
 * a factor 2 of it), next to 1 from both sides and huge; i next to 0 and pi (either side of the equatorial
 * convention); nu next to 0, pi and the asymptote; tiny and huge lengths and mu; near-rectilinear orbits (e next to
 * 1, far from periapsis: |r x v| down to 1e-6 |r| |v|).
 */
function edgeOrbits(): EdgeOrbit[] {
  const list: EdgeOrbit[] = [];
  for (const e of [1e-300, 1e-14, 2 ** -38, 2 ** -34, 1e-9, 1e-6]) list.push({ tag: "edge-e0", e });
  for (const e of [1 - 1e-15, 1 - 1e-12, 1 - 1e-9, 1 - 1e-6]) list.push({ tag: "edge-e1-", e });
  for (const e of [1 + 1e-15, 1 + 1e-12, 1 + 1e-9, 1 + 1e-6]) list.push({ tag: "edge-e1+", e });
  for (const e of [1e3, 1e6, 1e10]) list.push({ tag: "edge-huge-e", e });
  for (const i of [1e-300, 1e-14, 2 ** -38, 2 ** -34, 1e-9, 1e-6]) list.push({ tag: "edge-i0", i });
  for (const d of [1e-14, 2 ** -34, 1e-9, 1e-6]) list.push({ tag: "edge-ipi", i: Math.PI - d });
  list.push({ tag: "edge-ipi", i: Math.PI, planar: true }, { tag: "edge-i0", i: 0, planar: true });
  for (const nu of [1e-6, Math.PI - 1e-9, Math.PI, Math.PI + 1e-9, TWO_PI - 1e-6]) list.push({ tag: "edge-nu", nu });
  for (const [mu, rp] of [[1e-10, 1e-6], [1e-20, 1], [1, 1e-10], [GM_EARTH, 1e-3], [GM_EARTH, 1e12], [1e20, 1e6], [1e30, 1e15]] as const) list.push({ tag: "edge-scale", mu, rp });
  for (const e of [1 - 1e-12, 1 - 1e-9, 1 + 1e-12, 1 + 1e-9]) list.push({ tag: "edge-rectilinear", e, nu: 0.999 * (e < 1 ? Math.PI : Math.acos(-1 / e)) });
  return list;
}

/** Seeded orbits for the edges, `reps` draws of each (the unpinned parts random). */
function edgeOrbitCases(seed: number, reps: number, make: (o: Orbit) => number[] | undefined): Case[] {
  const rng = new Rng(seed);
  const out: Case[] = [];
  for (let r = 0; r < reps; r++) {
    for (const d of edgeOrbits()) {
      const mu = d.mu ?? GM_EARTH;
      const e = d.e ?? rng.uniform() * 0.9;
      const rp = d.rp ?? rng.between(6600, 42164);
      const o: Orbit = { mu, p: rp * (1 + e), e, i: d.i ?? rng.between(0.05, 3.0), raan: angle(rng), argp: angle(rng), nu: 0, cls: "leo", planar: d.planar ?? false };
      if (o.planar) o.raan = 0;
      o.nu = d.nu ?? anomaly(rng, e);
      if (e >= 1 && Math.abs(o.nu > Math.PI ? o.nu - TWO_PI : o.nu) >= Math.acos(-1 / e)) o.nu = anomaly(rng, e);
      const inputs = make(o);
      if (inputs) out.push({ inputs, tag: d.tag });
    }
  }
  return out;
}

/**
 * From-equinoctial edges (seed 20261234): e next to 0, next to 1 and huge; tan(i/2) tiny and huge (i next to 0 and
 * pi); tiny and huge p and mu; L next to 0, pi and 2 pi; 1 + f cos L + g sin L down to 1e-6 (near-rectilinear).
 */
function fromEquinoctialEdges(): Case[] {
  const rng = new Rng(20261234);
  const out: Case[] = [];
  const draw = (tag: string, d: { mu?: number; p?: number; e?: number; t?: number; L?: number; w?: number }): void => {
    const e = d.e ?? rng.uniform() * 0.9;
    const w = d.w ?? rng.between(0, TWO_PI);
    const t = d.t ?? Math.tan(rng.between(0, 1.45));
    const O = rng.between(0, TWO_PI);
    const L = d.L ?? rng.between(0.01, TWO_PI - 0.01);
    out.push({ inputs: [d.mu ?? GM_EARTH, d.p ?? rng.between(6600, 50000), e * Math.cos(w), e * Math.sin(w), t * Math.cos(O), t * Math.sin(O), L], tag });
  };
  for (let r = 0; r < 3; r++) {
    for (const e of [0, 1e-300, 1e-14, 1e-9]) draw("edge-e0", { e });
    for (const e of [1 - 1e-15, 1 - 1e-9, 1 + 1e-15, 1 + 1e-9, 10, 1e6]) {
      const w = rng.between(0, TWO_PI);
      // Keep 1 + e cos(L - w) >= 0.05 (away from the asymptote), L off the seam.
      const lim = e > 1 ? Math.acos(-0.95 / e) : 2.5;
      draw(e > 2 ? "edge-huge-e" : "edge-e1", { e, w, L: (((w + rng.between(-lim, lim)) % TWO_PI) + TWO_PI) % TWO_PI || 1 });
    }
    for (const t of [0, 1e-300, 1e-14, 1e-8, 1e4, 1e8, 1e15]) draw(t > 1 ? "edge-ipi" : "edge-i0", { t });
    for (const L of [1e-9, 1e-6, Math.PI - 1e-9, Math.PI, TWO_PI - 1e-6]) draw("edge-L", { L });
    for (const [mu, p] of [[1e-10, 1e-6], [1e-20, 1], [1, 1e-10], [GM_EARTH, 1e-3], [GM_EARTH, 1e12], [1e20, 1e6], [1e30, 1e15]] as const) draw("edge-scale", { mu, p });
    for (const q of [1e-3, 1e-6]) {
      const e = 1 - 1e-9;
      const w = rng.between(0, TWO_PI);
      const dL = Math.acos((q - 1) / e); // 1 + e cos(dL) = q
      draw("edge-rectilinear", { e, w, L: (((w + (rng.uniform() < 0.5 ? dL : -dL)) % TWO_PI) + TWO_PI) % TWO_PI });
    }
  }
  return out;
}

// ---- exact-f32-input companion suites ---------------------------------------------------------------------

/**
 * A companion of a suite whose inputs are exact binary32 values (so that the single-precision build is checked
 * on the inputs it can hold): the base cases thinned (seeded) to about `count`, every input rounded to f32, kept where
 * every input is a normal f32 (or 0) and `valid` accepts the rounded case. The reference is the base suite's, on
 * the rounded inputs taken exactly.
 */
function f32Inputs(base: VectorSpec, count: number, valid: (x: readonly number[]) => boolean): VectorSpec {
  return {
    ...base,
    suite: `${base.suite}-f32in`,
    notes: [...base.notes, `inputs: the cases of ${base.suite}, thinned to about ${count} (the edge cases all kept) and rounded to binary32 (exact f32 values), kept where still valid`],
    cases(): Case[] {
      const all = base.cases();
      // Seeded thinning (a fixed stride would alias with the cycle of orbit classes and keep only a few). The
      // edge cases (appended last) are all kept, and the rate is set by the others so that their rows stay.
      const rng = new Rng(20261202);
      const keep = count / all.filter((c) => !isEdge(c)).length;
      const out: Case[] = [];
      for (const c of all) {
        if (!isEdge(c) && !(rng.uniform() < keep)) continue;
        const x = c.inputs.map((v) => Math.fround(v));
        const normal = x.every((v) => Number.isFinite(v) && (v === 0 || Math.abs(v) >= 1.1754943508222875e-38));
        if (normal && valid(x)) out.push({ inputs: x, tag: c.tag });
      }
      return out;
    },
  };
}

/** The elements' conventions (2^-36, as in harness/reference/twobody.ts). */
const CONVENTION_EPS = 2 ** -36;
/** Angles compared in absolute terms are kept this far from the 0 / 2 pi seam in the f32-input suites. */
const SEAM_MARGIN = 1e-3;

/**
 * i, raan, argp, nu and whether the orbit counts as circular / equatorial, in double precision with the kernels'
 * conventions: only to keep the rounded cases' angles off the 0 / 2 pi seam (the reference computes the values).
 */
function anglesOf(mu: number, r: readonly number[], v: readonly number[]): { e: number; sinI: number; raan: number; argp: number; nu: number; circular: boolean; equatorial: boolean } {
  const cross = (a: readonly number[], b: readonly number[]): number[] => [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
  const dot = (a: readonly number[], b: readonly number[]): number => a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
  const wrap = (x: number): number => (x < 0 ? x + TWO_PI : x);
  const h = cross(r, v);
  const hn = Math.hypot(h[0]!, h[1]!, h[2]!);
  const planeAngle = (d: readonly number[], x: readonly number[]): number => Math.atan2(dot(h, cross(d, x)), hn * dot(d, x));
  const rn = Math.hypot(r[0]!, r[1]!, r[2]!);
  const v2 = dot(v, v);
  const rv = dot(r, v);
  const ev = [0, 1, 2].map((j) => ((v2 - mu / rn) * r[j]! - rv * v[j]!) / mu);
  const e = Math.hypot(ev[0]!, ev[1]!, ev[2]!);
  const sinI = Math.hypot(h[0]!, h[1]!) / hn;
  const circular = e <= CONVENTION_EPS;
  const equatorial = sinI <= CONVENTION_EPS;
  const n = equatorial ? [1, 0, 0] : [-h[1]!, h[0]!, 0];
  return {
    e,
    sinI,
    raan: equatorial ? 0 : wrap(Math.atan2(n[1]!, n[0]!)),
    argp: circular ? 0 : wrap(planeAngle(n, ev)),
    nu: wrap(planeAngle(circular ? n : ev, r)),
    circular,
    equatorial,
  };
}

const offSeam = (x: number): boolean => x > SEAM_MARGIN && x < TWO_PI - SEAM_MARGIN;

/** A state that is not close to rectilinear (|r x v| above 1e-6 |r| |v|). */
function notRectilinear([, rx, ry, rz, vx, vy, vz]: readonly number[]): boolean {
  const h = Math.hypot(ry! * vz! - rz! * vy!, rz! * vx! - rx! * vz!, rx! * vy! - ry! * vx!);
  return h > 1e-6 * Math.hypot(rx!, ry!, rz!) * Math.hypot(vx!, vy!, vz!);
}

export const propagateF32Spec = f32Inputs(propagateSpec, 400, (x) => notRectilinear(x) && x[7] !== 0);

/**
 * The single-precision build's circular / equatorial thresholds (2^-17, assembly/elements.ts) differ from the
 * reference's (2^-36): a rounded state with e or sin i (not 0) below twice the f32 threshold is left out of
 * elements-f32in, since the two would apply different conventions to it.
 */
const F32_CONVENTION_EPS = 2 ** -16;

export const elementsF32Spec: VectorSpec = (() => {
  const spec = f32Inputs(elementsSpec, 300, (x) => {
    if (!notRectilinear(x)) return false;
    const a = anglesOf(x[0]!, x.slice(1, 4), x.slice(4, 7));
    if (a.e <= F32_CONVENTION_EPS || (a.sinI !== 0 && a.sinI <= F32_CONVENTION_EPS)) return false;
    return (a.equatorial || offSeam(a.raan)) && (a.circular || offSeam(a.argp)) && offSeam(a.nu);
  });
  return { ...spec, notes: [...spec.notes, "left out: e <= 2^-16, or 0 < sin i <= 2^-16 (the f32 build's circular / equatorial thresholds are 2^-17, the reference's 2^-36)"] };
})();

export const stateF32Spec = f32Inputs(stateSpec, 300, ([, a, e, , , , nu]) => ((e! < 1 && a! > 0) || (e! > 1 && a! < 0)) && 1 + e! * Math.cos(nu!) > 1e-3);

export const equinoctialF32Spec = f32Inputs(equinoctialSpec, 300, (x) => {
  if (!notRectilinear(x)) return false;
  const a = anglesOf(x[0]!, x.slice(1, 4), x.slice(4, 7));
  const L = (a.raan + a.argp + a.nu) % TWO_PI;
  return L > 0.01 && L < TWO_PI - 0.01;
});

export const fromEquinoctialF32Spec = f32Inputs(fromEquinoctialSpec, 300, ([, p, f, g, , , L]) => p! > 0 && 1 + f! * Math.cos(L!) + g! * Math.sin(L!) > 0.05);

export const TWOBODY_SPECS: readonly VectorSpec[] = [
  propagateSpec,
  elementsSpec,
  stateSpec,
  equinoctialSpec,
  fromEquinoctialSpec,
  propagateF32Spec,
  elementsF32Spec,
  stateF32Spec,
  equinoctialF32Spec,
  fromEquinoctialF32Spec,
];
