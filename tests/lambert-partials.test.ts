/**
 * `lambert_partials` (d(v1, v2) / d(r1, r2, tof) through the state transition matrix) against an independent
 * reference: central differences of Lambert's problem re-solved at 50 digits by shooting on the classical-elements
 * propagator (harness/verify/reference/lambert.ts: `shoot`), with steps of 1e-20 of |r1|, |r2| and tof (truncation
 * about 1e-40, rounding about 1e-42 / 1e-20 = 1e-22 of the entries). The shooting starts from the kernel's v1 (a
 * starting guess only: Newton converges to the 50-digit solution of the rounded inputs). Cases: rows of the lambert
 * suite (vectors/lambert.csv) of each tag, away from 180 degrees. Checked in scale-free units (L = |r1|,
 * V = sqrt(mu / L), time L / V), every entry within 1e-9 of the largest (the transition suite's target).
 */
import { describe, it, expect } from "vitest";
import { release, mutant, outputsNow } from "./helpers.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { shoot, vecExact, LambertDecimal as D } from "../harness/verify/reference/lambert.js";
import { exact, type Dec } from "../harness/verify/reference/decimal.js";
import type { Kernels } from "../harness/module/load.js";

type V3 = [Dec, Dec, Dec];
const TAGS = ["ellipse-short", "ellipse-long", "hyperbola-short", "near-parabola-long", "rev1-short", "rev1-long", "rev2-long"];
const STEP = new D(10).pow(-20);

/** The partials (6 x 7, row-major) by central differences of the shooting reference. */
function referencePartials(x: readonly number[], guess: readonly number[]): number[] {
  const mu = exact(D, x[0]!);
  const base = [...vecExact(x.slice(1, 4)), ...vecExact(x.slice(4, 7)), exact(D, x[7]!)];
  const g = vecExact(guess.slice(0, 3));
  const r1n = base[0]!.pow(2).plus(base[1]!.pow(2)).plus(base[2]!.pow(2)).sqrt();
  const r2n = base[3]!.pow(2).plus(base[4]!.pow(2)).plus(base[5]!.pow(2)).sqrt();
  const out: number[] = new Array<number>(42).fill(0);
  for (let j = 0; j < 7; j++) {
    const h = STEP.times(j < 3 ? r1n : j < 6 ? r2n : base[6]!);
    const at = (sign: number): Dec[] => {
      const y = base.slice();
      y[j] = y[j]!.plus(h.times(sign));
      const s = shoot(mu, y.slice(0, 3) as V3, y.slice(3, 6) as V3, y[6]!, g);
      return [...s.v1, ...s.v2];
    };
    const p = at(1);
    const m = at(-1);
    for (let i = 0; i < 6; i++) out[7 * i + j] = p[i]!.minus(m[i]!).div(h.times(2)).toNumber();
  }
  return out;
}

/** Largest entry error over the largest entry, scale-free. */
function scaledError(x: readonly number[], got: readonly number[], want: readonly number[]): number {
  const L = Math.hypot(x[1]!, x[2]!, x[3]!);
  const V = Math.sqrt(x[0]! / L);
  let big = 0;
  let err = 0;
  for (let q = 0; q < 42; q++) {
    // d v / d r times L / V, d v / d tof times (L / V) / V: both dimensionless.
    const s = q % 7 < 6 ? L / V : L / V / V;
    big = Math.max(big, Math.abs(want[q]! * s));
    err = Math.max(err, Math.abs((got[q]! - want[q]!) * s));
  }
  return err / big;
}

const rows = (): number[][] => {
  const v = readVectors(vectorPath("lambert"));
  const ins = ["mu", "r1x", "r1y", "r1z", "r2x", "r2y", "r2z", "tof", "revs", "retrograde", "branch"].map((n) => col(v, n));
  return TAGS.map((t) => {
    const r = v.tags.findIndex((tag) => tag === t);
    return ins.map((c) => v.values[r]![c]!);
  });
};

function check(k: Kernels, x: readonly number[]): number {
  expect(k.call("lambert_partials", x)).toBe(0);
  const out = outputsNow(k, "lambert_partials");
  const lam = release();
  lam.call("lambert", x);
  const v = outputsNow(lam, "lambert").slice(0, 6); // v1, v2
  k.call("lambert_partials", x);
  const got = outputsNow(k, "lambert_partials").slice(6, 48); // the 42 partials
  out.slice(0, 6).forEach((y, i) => expect(Object.is(y, v[i])).toBe(true)); // lambert's bits
  return scaledError(x, got, referencePartials(x, v));
}

describe("lambert_partials against central differences of the shooting reference", () => {
  const cases = rows();
  cases.forEach((x, n) => {
    it(`${TAGS[n]}: every scale-free entry within 1e-9 of the largest`, () => {
      expect(check(release(), x)).toBeLessThan(1e-9);
    });
  });

  it("a mutant with d v2 / d tof lacking the gravity term is rejected", () => {
    const m = mutant(release(), (name, args, out, st) => {
      if (name === "lambert_partials") {
        const r = Math.hypot(args[4]!, args[5]!, args[6]!);
        for (let i = 0; i < 3; i++) out[6 + 7 * (3 + i) + 6]! -= (-args[0]! * args[4 + i]!) / r ** 3;
      }
      return st;
    });
    expect(check(m, cases[0]!)).toBeGreaterThan(1e-9);
  });
});
