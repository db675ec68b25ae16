/**
 * Vector suite for Lambert's problem. Each case starts from a state: orbital elements are turned into (r1, v1)
 * at high precision and rounded to doubles, the time of flight to a chosen true-anomaly change (with 0 to 5
 * complete revolutions) comes from Kepler's equation, and r2 from propagating (r1, v1) over that time
 * (harness/reference/lambert.ts, decimal.js). The revolution count, the direction and (for revs >= 1) the branch
 * follow from the starting orbit. The reference is then computed from the rounded inputs alone, by the p-iteration
 * polished by shooting, so the starting velocity is an independent check of it (tests/lambert-reference.test.ts).
 * The edge cases (transfer angles within 1e-9 to 0.1 degree of 0 and 360 degrees, within 1e-7 to 0.1 degree of 180,
 * all of them) are built the other way round: r1 and r2 first, at the chosen angle in a random frame, then a member of
 * the family of conics through them (by its semi-latus rectum) and that member's time of flight.
 */
import { Rng } from "../../core/rng.js";
import {
  LambertDecimal as D,
  elementsToState,
  timeBetween,
  propagateDec,
  vecDouble,
  vecExact,
  branchOf,
  referenceLambert,
  withDigits,
  ellipticPRange,
  familyMember,
  familyTime,
  minimumTime,
  motionNormal,
  transferAngle,
  type V3,
} from "../reference/lambert.js";
import { exact, toDouble, piOf, type Dec } from "../reference/decimal.js";
import type { Case, VectorSpec } from "./types.js";
import { GM_EARTH, GM_EARTH_NOTE } from "../../core/constants.js";

/** Gravitational parameters and length scales of the three families of cases. */
const PROFILES = [
  // WGS 84 GM of the Earth, km^3/s^2 (NIMA TR8350.2); periapsis radii 6600 to 60000 km.
  { mu: GM_EARTH, rmin: 6600, rmax: 60000 },
  // The Sun's GM in km^3/s^2, a widely used value (common practice; any value serves the check); periapsis radii
  // 0.3 to 30 AU in km.
  { mu: 1.32712440018e11, rmin: 4.5e7, rmax: 4.5e9 },
  // Canonical units (mu = 1).
  { mu: 1, rmin: 0.5, rmax: 5 },
] as const;

export interface LambertCase extends Case {
  /** The velocity at r1 of the state the case was built from (rounded to doubles). */
  readonly v1Start: readonly [number, number, number];
}

const TWO_PI = 2 * Math.PI;
const MARGIN = 0.05; // rad kept between the fractional transfer angle and 0, pi, 2 pi

/** A fractional transfer angle in (MARGIN, pi - MARGIN) (short way) or (pi + MARGIN, 2 pi - MARGIN) (long way). */
function fraction(rng: Rng, way: "short" | "long"): number {
  const t = rng.between(MARGIN, Math.PI - MARGIN);
  return way === "short" ? t : t + Math.PI;
}

function orientation(rng: Rng): [number, number, number] {
  const u = rng.uniform();
  // Mostly inclined (|cos i| >= 0.05, so prograde/retrograde is clear-cut); some exactly equatorial either way.
  let inc: number;
  if (u < 0.08) inc = 0;
  else if (u < 0.12) inc = Math.PI;
  else {
    inc = Math.acos(rng.between(0.05, 1));
    if (rng.uniform() < 0.35) inc = Math.PI - inc;
  }
  return [inc, rng.between(0, TWO_PI), rng.between(0, TWO_PI)];
}

interface Draw {
  geometry: "orbit";
  kind: string;
  N: number;
  e: number;
  p: number;
  nu1: number;
  dnu: number;
  profile: number;
  inc: number;
  raan: number;
  argp: number;
}

/**
 * A case at a chosen transfer angle (the edges of the domain: near 0, 180 and 360 degrees). r1 and r2 lie in the
 * plane of (inc, raan, argp) at angles 0 and `deg` about its normal W (the direction of motion), at radii r1n and
 * r2n; the orbit is the member of the family of conics through the rounded r1, r2 whose semi-latus rectum is
 * `where` of the way along its range (see edgeP); the time of flight is that member's, by Kepler's equation.
 */
interface EdgeDraw {
  geometry: "edge";
  kind: string;
  /** Transfer angle in degrees, as a decimal string (exact). */
  deg: string;
  N: number;
  /** revs 0: "ellipse" or "hyperbola"; revs >= 1: "short-period" or "long-period". */
  member: "ellipse" | "hyperbola" | "short-period" | "long-period";
  where: number;
  r1n: number;
  r2n: number;
  profile: number;
  inc: number;
  raan: number;
  argp: number;
}

type AnyDraw = Draw | EdgeDraw;

function build(d: AnyDraw): LambertCase {
  return d.geometry === "orbit" ? buildOrbit(d) : buildEdge(d);
}

/**
 * The semi-latus rectum of the member: geometric interpolation `where` of the way across its range. Ellipses lie
 * in (p_i, p_ii) (Bate, Mueller and White 1971, sec. 5.4); hyperbolas above p_ii on the short way, below p_i on
 * the long way (up to a factor 4 from the parabola); with N >= 1 the short-period branch lies between the
 * parabola p_i and the p of the minimum time on the short way, between that p and p_ii on the long way.
 */
function edgeP(d: EdgeDraw, mu: Dec, R1: V3, R2: V3, nhat: V3, theta: Dec): Dec {
  const [pi, pii] = ellipticPRange(R1, R2, theta);
  const shortWay = theta.lt(piOf(D));
  const geo = (a: Dec, b: Dec): Dec => a.pow(1 - d.where).times(b.pow(d.where));
  if (d.member === "ellipse") return geo(pi, pii);
  if (d.member === "hyperbola") return shortWay ? geo(pii, pii.times(4)) : geo(pi, pi.div(4));
  // The minimum's p to 1e-6 of the width of the elliptic range (near 180 degrees that range is narrow).
  const pm = minimumTime(mu, R1, R2, nhat, d.N, pii.minus(pi).div(pii).times(1e-6))[1];
  const below = (d.member === "short-period") === shortWay;
  return below ? geo(pm, pi) : geo(pm, pii);
}

/** Build an edge case: positions, the member's time of flight and velocity, labels (branch by branchOf). */
function buildEdge(d: EdgeDraw): LambertCase {
  const prof = PROFILES[d.profile]!;
  const mu = exact(D, prof.mu);
  const [inc, raan, argp] = [exact(D, d.inc), exact(D, d.raan), exact(D, d.argp)];
  const angle = new D(d.deg).times(piOf(D)).div(180);
  // Points on circles of radius r1n and r2n at true anomalies 0 and the transfer angle (elementsToState with e = 0).
  const r1 = vecDouble(elementsToState(mu, exact(D, d.r1n), new D(0), inc, raan, argp, new D(0)).r);
  const r2 = vecDouble(elementsToState(mu, exact(D, d.r2n), new D(0), inc, raan, argp, angle).r);
  // The direction of motion is W (its z component is cos inc, nonzero by construction).
  const retrograde = Math.cos(d.inc) < 0 ? 1 : 0;
  const R1 = vecExact(r1);
  const R2 = vecExact(r2);
  const nhat = motionNormal(R1, R2, retrograde);
  const theta = transferAngle(R1, R2, nhat);
  const p = edgeP(d, mu, R1, R2, nhat, theta);
  const t = familyTime(mu, R1, R2, theta, d.N, p);
  if (t === undefined) throw new Error(`lambert spec: no ${d.member} member at ${d.deg} deg`);
  const v1 = familyMember(mu, R1, R2, theta, p).v1;
  const branch = d.N >= 1 ? branchOf(mu, R1, R2, v1, d.N) : 0;
  if (d.N >= 1 && branch !== (d.member === "short-period" ? 0 : 1)) throw new Error(`lambert spec: branch label disagrees at ${d.deg} deg`);
  const way = theta.lt(piOf(D)) ? "short" : "long";
  return { inputs: [prof.mu, ...r1, ...r2, toDouble(t), d.N, retrograde, branch], tag: `${d.kind}-${way}`, v1Start: vecDouble(v1) };
}

/** Build the case from its elements: state, time of flight, r2, labels. */
function buildOrbit(d: Draw): LambertCase {
  const prof = PROFILES[d.profile]!;
  const mu = exact(D, prof.mu);
  const p = exact(D, d.p);
  const e = exact(D, d.e);
  const st = elementsToState(mu, p, e, exact(D, d.inc), exact(D, d.raan), exact(D, d.argp), exact(D, d.nu1));
  const r1 = vecDouble(st.r);
  const v1 = vecDouble(st.v);
  const tb = timeBetween(mu, p, e, exact(D, d.nu1), exact(D, d.dnu));
  const tof = toDouble(tb.tof);
  const R1 = vecExact(r1);
  const V1 = vecExact(v1);
  const r2 = vecDouble(propagateDec(mu, R1, V1, exact(D, tof), tb.dA).r);
  const hz = r1[0] * v1[1] - r1[1] * v1[0];
  const retrograde = hz < 0 ? 1 : 0;
  const branch = d.N >= 1 ? branchOf(mu, R1, vecExact(r2), V1, d.N) : 0;
  const way = d.dnu - TWO_PI * d.N < Math.PI ? "short" : "long";
  return { inputs: [prof.mu, ...r1, ...r2, tof, d.N, retrograde, branch], tag: `${d.kind}-${way}`, v1Start: v1 };
}

function periapsis(rng: Rng, profile: number): number {
  const prof = PROFILES[profile]!;
  return rng.logUniform(Math.log10(prof.rmin), Math.log10(prof.rmax));
}

/**
 * Every case of the suite with the velocity it was built from, deterministic (seed 20261210). Built at 34 digits:
 * the inputs only need to be right as doubles (the reference then solves the rounded problem at 50 digits).
 */
export function lambertCases(): LambertCase[] {
  return withDigits(34, () => drawCases().map(build));
}

/** The cases with the given indices only (the draws are cheap; building a case costs a propagation). */
export function lambertCasesAt(indices: readonly number[]): LambertCase[] {
  const draws = drawCases();
  return withDigits(34, () => indices.map((i) => build(draws[i]!)));
}

/** The number of cases in the suite. */
export function lambertCaseCount(): number {
  return drawCases().length;
}

function drawCases(): AnyDraw[] {
  const rng = new Rng(20261210);
  const out: AnyDraw[] = [];
  const draw = (kind: string, N: number, e: number, nu1: number, dnu: number): void => {
    const profile = rng.below(PROFILES.length);
    const rp = periapsis(rng, profile);
    const [inc, raan, argp] = orientation(rng);
    out.push({ geometry: "orbit", kind, N, e, p: rp * (1 + e), nu1, dnu, profile, inc, raan, argp });
  };
  // Ellipses, no complete revolution, both ways.
  for (let i = 0; i < 240; i++) {
    const e = rng.uniform() < 0.2 ? rng.between(0, 0.01) : rng.between(0, 0.9);
    draw("ellipse", 0, e, rng.between(0, TWO_PI), fraction(rng, i % 2 === 0 ? "short" : "long"));
  }
  // Hyperbolas: both anomalies inside 0.95 of the asymptote angle; the long way needs 2 nu_inf > pi + margin.
  for (let i = 0; i < 160; i++) {
    const e = 1 + rng.logUniform(-1.3, 1);
    const lim = 0.95 * Math.acos(-1 / e);
    const wantLong = i % 2 === 1 && 2 * lim > Math.PI + 2 * MARGIN;
    const dnu = wantLong ? rng.between(Math.PI + MARGIN, 2 * lim) : rng.between(MARGIN, Math.min(Math.PI - MARGIN, 2 * lim));
    const nu1 = rng.between(-lim, lim - dnu);
    draw("hyperbola", 0, e, nu1, dnu);
  }
  // Near the parabola from both sides: |1 - e| from 1e-2 to 1e-8, arcs within 2.5 rad of periapsis.
  for (let i = 0; i < 80; i++) {
    const d = rng.logUniform(-8, -2);
    const e = i % 2 === 0 ? 1 - d : 1 + d;
    const dnu = i % 4 < 2 ? rng.between(MARGIN, Math.PI - MARGIN) : rng.between(Math.PI + MARGIN, 4.9);
    const nu1 = rng.between(-2.5, 2.5 - dnu);
    draw("near-parabola", 0, e, nu1, dnu);
  }
  // 1 to 5 complete revolutions, both ways; the starting orbit decides the branch.
  for (let N = 1; N <= 5; N++) {
    for (let i = 0; i < 80; i++) {
      const e = rng.uniform() < 0.2 ? rng.between(0, 0.01) : rng.between(0, 0.8);
      draw(`rev${N}`, N, e, rng.between(0, TWO_PI), TWO_PI * N + fraction(rng, i % 2 === 0 ? "short" : "long"));
    }
  }
  // Close to the 180-degree transfer (outside the accuracy target; the limit follows the conditioning).
  for (let i = 0; i < 40; i++) {
    const N = i % 4 === 3 ? 1 + (i % 3) : 0;
    const off = (rng.uniform() < 0.5 ? -1 : 1) * rng.logUniform(-7, -2);
    draw("near-180", N, rng.between(0, 0.7), rng.between(0, TWO_PI), TWO_PI * N + Math.PI + off);
  }
  return [...out, ...edgeDraws()];
}

/** Transfer angles at the edges of the domain, degrees as exact decimal strings. */
const EDGE_ANGLES: readonly string[] = [
  "1e-9", "1e-6", "1e-4", "0.1",
  "359.9", "359.9999", "359.999999", "359.999999999",
  "179.9", "179.9999", "179.9999999", "180.0000001", "180.0001", "180.1",
];
/** Revolution counts of the edge cases. */
const EDGE_MAX_REVS = 3;

/**
 * The edge cases, drawn from their own generator (seed 20261215) after the others, so that the earlier cases keep
 * their inputs: every angle of EDGE_ANGLES, prograde and retrograde, revs 0 (an ellipse and a hyperbola) and
 * 1..EDGE_MAX_REVS (both branches); radii from the profile, 1.12 to 2 apart; random frames (some equatorial).
 */
function edgeDraws(): EdgeDraw[] {
  const rng = new Rng(20261215);
  const out: EdgeDraw[] = [];
  for (const deg of EDGE_ANGLES) {
    const kind = Number(deg) < 90 ? "edge0" : Number(deg) > 270 ? "edge360" : "edge180";
    for (const retro of [0, 1]) {
      for (let N = 0; N <= EDGE_MAX_REVS; N++) {
        const members = N === 0 ? (["ellipse", "hyperbola"] as const) : (["short-period", "long-period"] as const);
        for (const member of members) {
          const profile = rng.below(PROFILES.length);
          const r1n = periapsis(rng, profile);
          const r2n = r1n * Math.pow(10, (rng.uniform() < 0.5 ? -1 : 1) * rng.between(0.05, 0.3));
          let [inc, raan, argp] = orientation(rng);
          if (Math.cos(inc) < 0 !== (retro === 1)) inc = Math.PI - inc;
          out.push({ geometry: "edge", kind, deg, N, member, where: rng.between(0.1, 0.9), r1n, r2n, profile, inc, raan, argp });
        }
      }
    }
  }
  return out;
}

export const lambertSpec: VectorSpec = {
  suite: "lambert",
  routine: "lambert",
  inputs: ["mu", "r1x", "r1y", "r1z", "r2x", "r2y", "r2z", "tof", "revs", "retrograde", "branch"],
  refs: ["v1x_ref", "v1y_ref", "v1z_ref", "v2x_ref", "v2y_ref", "v2z_ref", "cond_v1", "cond_v2"],
  compare: [
    // Relative error of each velocity as a vector: |v - v_ref| / |v_ref|.
    { output: "v1x", ref: "v1x_ref", metric: "rel", cond: "cond_v1", group: ["v1x", "v1y", "v1z"], refGroup: ["v1x_ref", "v1y_ref", "v1z_ref"] },
    { output: "v2x", ref: "v2x_ref", metric: "rel", cond: "cond_v2", group: ["v2x", "v2y", "v2z"], refGroup: ["v2x_ref", "v2y_ref", "v2z_ref"] },
  ],
  iterations: "iterations",
  generator:
    "areal vectors: harness/reference/lambert.ts (decimal.js, 50 digits: cases propagated from orbital elements by Kepler's equation, edge cases from members of the family of conics through r1 and r2; references by the p-iteration polished by shooting, exact input doubles)",
  precision: "50 significant digits, rounded to nearest double",
  notes: [
    `mu: ${GM_EARTH_NOTE}, 1.32712440018e11 km^3/s^2 (Sun), or 1; lengths in km (or canonical), tof in s`,
    "revs: complete revolutions; retrograde: 1 when the angular momentum has a negative z component; branch (revs >= 1): 0 short-period (smaller semi-major axis), 1 long-period",
    "cond_v1, cond_v2: first-order relative error of v1, v2 from rounding every input by half an ulp (2^-53 relative)",
    "tags: ellipse, hyperbola, near-parabola (|1 - e| in 1e-8..1e-2), rev1..rev5, near-180 (transfer angle within 1e-7..1e-2 rad of 180 deg); -short/-long way (seed 20261210)",
    "edge cases (seed 20261215): edge0, edge360 (transfer angle 1e-9, 1e-6, 1e-4, 0.1 deg from 0 or 360 deg), edge180 (179.9, 179.9999, 179.9999999, 180.0000001, 180.0001, 180.1 deg); revs 0 (ellipse, hyperbola) to 3 (both branches), prograde and retrograde, random frames",
  ],
  cases(): Case[] {
    return lambertCases().map((c) => ({ inputs: c.inputs, tag: c.tag }));
  },
  reference(inputs): number[] {
    const [mu, r1x, r1y, r1z, r2x, r2y, r2z, tof, revs, retrograde, branch] = inputs as number[];
    const ref = referenceLambert(mu!, [r1x!, r1y!, r1z!], [r2x!, r2y!, r2z!], tof!, revs!, retrograde!, branch!);
    if (ref === undefined) throw new Error("no solution for this revolution count");
    return [...ref.v1, ...ref.v2, ref.cond1, ref.cond2];
  },
};

export const LAMBERT_SPECS: readonly VectorSpec[] = [lambertSpec];
