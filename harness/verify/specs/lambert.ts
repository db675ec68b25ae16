/**
 * Vector suite for Lambert's problem. Each case starts from a state: orbital elements are turned into (r1, v1)
 * at high precision and rounded to doubles, the time of flight to a chosen true-anomaly change (with 0 to 5
 * complete revolutions) comes from Kepler's equation, and r2 from propagating (r1, v1) over that time
 * (harness/reference/lambert.ts, decimal.js). The revolution count, the direction and (for revs >= 1) the branch
 * follow from the starting orbit. The reference is then computed from the rounded inputs alone, by the p-iteration
 * polished by shooting, so the starting velocity is an independent check of it (tests/lambert-reference.test.ts).
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
} from "../reference/lambert.js";
import { exact, toDouble } from "../reference/decimal.js";
import type { Case, VectorSpec } from "./types.js";

/** Gravitational parameters and length scales of the three families of cases. */
const PROFILES = [
  // WGS 84 GM of the Earth, km^3/s^2 (NIMA TR8350.2); periapsis radii 6600 to 60000 km.
  { mu: 398600.4418, rmin: 6600, rmax: 60000 },
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

/** Build the case from its elements: state, time of flight, r2, labels. */
function build(d: Draw): LambertCase {
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

function drawCases(): Draw[] {
  const rng = new Rng(20261210);
  const out: Draw[] = [];
  const draw = (kind: string, N: number, e: number, nu1: number, dnu: number): void => {
    const profile = rng.below(PROFILES.length);
    const rp = periapsis(rng, profile);
    const [inc, raan, argp] = orientation(rng);
    out.push({ kind, N, e, p: rp * (1 + e), nu1, dnu, profile, inc, raan, argp });
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
    "areal vectors: harness/reference/lambert.ts (decimal.js, 50 digits: cases propagated from orbital elements by Kepler's equation; references by the p-iteration polished by shooting, exact input doubles)",
  precision: "50 significant digits, rounded to nearest double",
  notes: [
    "mu: 398600.4418 km^3/s^2 (WGS 84, NIMA TR8350.2), 1.32712440018e11 km^3/s^2 (Sun), or 1; lengths in km (or canonical), tof in s",
    "revs: complete revolutions; retrograde: 1 when the angular momentum has a negative z component; branch (revs >= 1): 0 short-period (smaller semi-major axis), 1 long-period",
    "cond_v1, cond_v2: first-order relative error of v1, v2 from rounding every input by half an ulp (2^-53 relative)",
    "tags: ellipse, hyperbola, near-parabola (|1 - e| in 1e-8..1e-2), rev1..rev5, near-180 (transfer angle within 1e-7..1e-2 rad of 180 deg); -short/-long way (seed 20261210)",
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
