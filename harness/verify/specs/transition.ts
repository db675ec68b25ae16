/**
 * Vector suite for the state transition matrix (`transition`): seeded states of named classes (low orbits,
 * geostationary, Molniya-like e = 0.74, geostationary transfer, e = 0.999, hyperbolic escape, near-parabolic on
 * both sides of e = 1), each propagated over up to 25 revolutions (ellipses) forwards or backwards. The reference
 * (harness/reference/transition.ts) is the high-precision propagation of harness/reference/twobody.ts,
 * differentiated by central differences at 60 digits; it shares nothing with the kernel's closed form.
 * Earth's GM is the WGS 84 value (NIMA TR8350.2), km and s.
 */
import { Rng } from "../../core/rng.js";
import { referenceTransition } from "../reference/transition.js";
import { orbitOf, stateOf, type Orbit, type OrbitClass } from "./twobody.js";
import type { Case, Comparison, VectorSpec } from "./types.js";
import { GM_EARTH, GM_EARTH_NOTE } from "../../core/constants.js";

const TWO_PI = 2 * Math.PI;
/** Largest arc of an ellipse in the suite, in revolutions. */
export const MAX_REVS = 25;

export const TRANSITION_CLASSES = ["leo", "geo", "molniya", "gto", "e0999", "hyperbolic", "near-parabolic"] as const;
export type TransitionClass = (typeof TRANSITION_CLASSES)[number];

/** A seeded orbit of a transition class (the two-body suite's classes where they fit). */
function orbitFor(rng: Rng, cls: TransitionClass): Orbit {
  const base = (c: OrbitClass): Orbit => ({ ...orbitOf(rng, c), cls: c });
  switch (cls) {
    case "leo":
    case "geo":
    case "hyperbolic":
      return base(cls);
    case "molniya":
      return base("e074");
    case "gto": {
      const o = base("e095");
      const rp = rng.between(6578, 6700);
      const ra = 42164 * (1 + rng.between(-1e-3, 1e-3));
      o.e = (ra - rp) / (ra + rp);
      o.p = rp * (1 + o.e);
      o.i = rng.between(0, 0.5);
      return o;
    }
    case "e0999": {
      const o = base("e095");
      o.e = 0.999;
      o.p = rng.between(6600, 12000) * (1 + o.e);
      return o;
    }
    case "near-parabolic":
      return base(rng.uniform() < 0.5 ? "near-parabolic-e" : "near-parabolic-h");
  }
}

/** |dt|: log-uniform from 1e-3 to MAX_REVS periods (ellipses), from 10 s to 100 periapsis-circle periods otherwise. */
function stepFor(rng: Rng, o: Orbit): number {
  let lo: number;
  let hi: number;
  if (o.e < 1) {
    const a = o.p / (1 - o.e * o.e);
    const T = TWO_PI * Math.sqrt((a * a * a) / o.mu);
    lo = 1e-3 * T;
    hi = MAX_REVS * T;
  } else {
    const rp = o.p / (1 + o.e);
    lo = 10;
    hi = 100 * TWO_PI * Math.sqrt((rp * rp * rp) / o.mu);
  }
  const dt = rng.logUniform(Math.log10(lo), Math.log10(hi));
  return rng.uniform() < 0.4 ? -dt : dt;
}

const vec = (prefix: string, suffix = ""): string[] => ["x", "y", "z"].map((c) => `${prefix}${c}${suffix}`);
/** phi_ij, i = row (final component), j = column (initial component), 1-based, row-major. */
export const PHI_NAMES: readonly string[] = Array.from({ length: 36 }, (_, k) => `phi_${Math.floor(k / 6) + 1}${(k % 6) + 1}`);
const block = (i0: number, j0: number): string[] => [0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => PHI_NAMES[6 * (i0 + i) + j0 + j]!));
const BLOCKS: readonly { name: string; i0: number; j0: number; scale: string }[] = [
  { name: "rr", i0: 0, j0: 0, scale: "scale_rr" },
  { name: "rv", i0: 0, j0: 3, scale: "scale_rv" },
  { name: "vr", i0: 3, j0: 0, scale: "scale_vr" },
  { name: "vv", i0: 3, j0: 3, scale: "scale_rr" },
];

export const transitionSpec: VectorSpec = {
  suite: "transition",
  routine: "transition",
  inputs: ["mu", "r0x", "r0y", "r0z", "v0x", "v0y", "v0z", "dt"],
  refs: [...vec("r", "_ref"), ...vec("v", "_ref"), ...PHI_NAMES.map((n) => `${n}_ref`), "cond_r", "cond_v", "cond_phi", "scale_rr", "scale_rv", "scale_vr", "revs"],
  compare: [
    { output: "rx", ref: "rx_ref", metric: "rel", group: vec("r"), refGroup: vec("r", "_ref"), cond: "cond_r", revs: "revs" },
    { output: "vx", ref: "vx_ref", metric: "rel", group: vec("v"), refGroup: vec("v", "_ref"), cond: "cond_v", revs: "revs" },
    // Each 3x3 block of Phi as one vector: |block - block_ref|_F / (max |Phi~_ij| x its unit factor), that is the
    // error of the scale-free Phi~ relative to its largest entry (Frobenius over the block, so at least the
    // largest entry's error).
    ...BLOCKS.map((b): Comparison => {
      const names = block(b.i0, b.j0);
      return { output: names[0]!, ref: `${names[0]!}_ref`, metric: "abs", group: names, refGroup: names.map((n) => `${n}_ref`), cond: "cond_phi", scale: b.scale };
    }),
  ],
  iterations: "iterations",
  generator: "areal vectors: harness/reference/transition.ts (decimal.js: the propagation reference of twobody.ts, Phi by central differences, step 1e-25 L or V at 60+ digits, exact input doubles)",
  precision: "60 significant digits (more near e = 1) for r, v and Phi, rounded to nearest double; conditioning at 40 (forward differences)",
  notes: [
    "phi_ij = d(final component i) / d(initial component j), components x, y, z, vx, vy, vz",
    "Phi~ = D^-1 Phi D, D = diag(L, L, L, V, V, V), L = |r0|, V = sqrt(mu / L); scale_rr = max |Phi~_ij|, scale_rv = scale_rr L / V, scale_vr = scale_rr V / L",
    "blocks compared as vectors: |block - block_ref|_F / scale <= max(max_abs, cond_factor cond_phi); r, v as in the propagate suite",
    "cond_r, cond_v: largest relative change of r, v when one input double moves up by one ulp; cond_phi: largest |delta Phi~|_F / max |Phi~_ij| then",
    "revs: |dt| / period for the ellipse, 0 otherwise",
    `mu = ${GM_EARTH_NOTE}, km, km/s, s`,
    `tags: ${TRANSITION_CLASSES.join(", ")}; seed 20261220; |dt| up to ${MAX_REVS} periods (ellipses), 40% negative`,
  ],
  cases(): Case[] {
    const rng = new Rng(20261220);
    const out: Case[] = [];
    const count = 280;
    for (let n = 0; out.length < count; n++) {
      const cls = TRANSITION_CLASSES[n % TRANSITION_CLASSES.length]!;
      const o = orbitFor(rng, cls);
      out.push({ inputs: [GM_EARTH, ...stateOf(o), stepFor(rng, o)], tag: cls });
    }
    return out;
  },
  reference: (x) => referenceTransition(x),
};

export const TRANSITION_SPECS: readonly VectorSpec[] = [transitionSpec];
