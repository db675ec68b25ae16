/**
 * Vector suite for first-order relative motion (relative_motion, assembly/relative.ts). Each case is a chief
 * on an elliptic Earth orbit (from a circular low orbit to e = 0.999, periapsis 6578 to 42164 km), a relative
 * state in its rotating frame (separations 1 m to 50 km, velocities up to twice the separation times the mean
 * motion), and a time step from a hundredth of an orbit to six orbits, 20% of them backwards. The reference is
 * the difference of two 60-digit nonlinear two-body propagations with the deputy's offset scaled to 1e-20,
 * divided back (harness/verify/reference/relative.ts): the exact first-order answer, with no linear model inside.
 */
import { Rng } from "../../core/rng.js";
import { referenceRelativeMotion } from "../reference/relative.js";
import { stateOf } from "./twobody.js";
import type { Case, VectorSpec } from "./types.js";
import { GM_EARTH, GM_EARTH_NOTE } from "../../core/constants.js";

const TWO_PI = 2 * Math.PI;

/** Chief classes: tag and eccentricity draw. */
const CHIEFS: readonly { tag: string; e: (rng: Rng) => number }[] = [
  { tag: "circular", e: () => 0 },
  { tag: "near-circular", e: (rng) => rng.logUniform(-7, -2) },
  { tag: "moderate", e: (rng) => rng.between(0.01, 0.5) },
  { tag: "eccentric", e: (rng) => rng.between(0.5, 0.9) },
  { tag: "high-e", e: (rng) => rng.between(0.9, 0.99) },
  { tag: "extreme", e: (rng) => (rng.uniform() < 0.3 ? 0.999 : rng.between(0.99, 0.999)) },
];

/** Cases per chief class and per arc kind (short: under one orbit; long: one to six orbits). */
const PER_CLASS = 40;

function relativeCase(rng: Rng, tag: string, e: number, long: boolean): Case {
  const rp = rng.uniform() < 0.7 ? rng.between(6578, 7378) : rng.logUniform(Math.log10(7378), Math.log10(42164));
  const p = rp * (1 + e);
  const a = p / (1 - e * e);
  const T = TWO_PI * Math.sqrt((a * a * a) / GM_EARTH);
  const n = TWO_PI / T;
  const chief = stateOf({ mu: GM_EARTH, p, e, i: rng.between(0, 1.7), raan: rng.between(0, TWO_PI), argp: rng.between(0, TWO_PI), nu: rng.between(0, TWO_PI), cls: "leo", planar: false });
  const sep = rng.logUniform(-3, Math.log10(50));
  const rel = [0, 1, 2].map(() => rng.between(-sep, sep)).concat([0, 1, 2].map(() => rng.between(-2, 2) * sep * n));
  const frac = long ? rng.between(1, 6) : rng.logUniform(-2, 0);
  const dt = (rng.uniform() < 0.2 ? -1 : 1) * frac * T;
  return { inputs: [GM_EARTH, ...chief, ...rel, dt], tag: `${tag}-${long ? "long" : "short"}` };
}

const vec = (p: string, s = ""): string[] => ["x", "y", "z"].map((c) => `${p}${c}${s}`);

export const relativeMotionSpec: VectorSpec = {
  suite: "relative-motion",
  routine: "relative-motion",
  inputs: ["mu", "rcx", "rcy", "rcz", "vcx", "vcy", "vcz", "x0", "y0", "z0", "vx0", "vy0", "vz0", "dt"],
  refs: ["x_ref", "y_ref", "z_ref", "vx_ref", "vy_ref", "vz_ref"],
  compare: [
    // |r - r_ref| / |r_ref| and |v - v_ref| / |v_ref|: the error against the size of the relative position
    // (velocity) as a whole, within sqrt(3) of "against its largest component".
    { output: "x", ref: "x_ref", metric: "rel", group: ["x", "y", "z"], refGroup: vec("", "_ref") },
    { output: "vx", ref: "vx_ref", metric: "rel", group: ["vx", "vy", "vz"], refGroup: vec("v", "_ref") },
  ],
  generator:
    "areal vectors: harness/reference/relative.ts (decimal.js, 60 digits plus those lost to 1 - e^2: chief and a deputy offset by 1e-20 times the relative state propagated on the two-body problem by Kepler's equation, the difference in the chief's rotating frame divided by 1e-20; exact input doubles)",
  precision: "60 significant digits or more, rounded to nearest double",
  notes: [
    `mu = ${GM_EARTH_NOTE}; km, km/s, s`,
    "frame: x radial outward, z along the chief's angular momentum, y = z x x; velocities as seen in the rotating frame (omega = h / r^2)",
    "tags: circular (e = 0 in the elements), near-circular (1e-7..1e-2), moderate (0.01..0.5), eccentric (0.5..0.9), high-e (0.9..0.99), extreme (0.99..0.999); -short (0.01..1 orbit) / -long (1..6 orbits); 20% with dt < 0 (seed 20261205)",
  ],
  cases(): Case[] {
    const rng = new Rng(20261205);
    const out: Case[] = [];
    for (const c of CHIEFS) {
      for (let i = 0; i < 2 * PER_CLASS; i++) out.push(relativeCase(rng, c.tag, c.e(rng), i % 2 === 1));
    }
    return out;
  },
  reference: (inputs) => referenceRelativeMotion(inputs),
};

export const RELATIVE_SPECS: readonly VectorSpec[] = [relativeMotionSpec];
