/**
 * The transition matrix carried by the fixed-step integrators (integrate_transition, integrate_transition_begin,
 * integrate_phi; assembly/variational.ts) and the symplectic defect in the invariant monitor.
 * Checks against something outside the code under test:
 *  1. Phi is the Jacobian of the DISCRETE map, for every method, two-body and J2 + J3: against central differences
 *     of that map run at 100 digits in decimal.js with the acceleration as the numerical gradient of the zonal
 *     potential (harness/verify/reference/variational.ts; the kernel's analytic gradient is not used there).
 *  2. Two-body: Phi converges to the true flow's transition matrix at each method's order, against the closed-form-
 *     independent decimal.js reference of the transition suite (harness/verify/reference/transition.ts: central
 *     differences of the 60-digit Kepler propagation).
 *  3. J2: central differences of the integrator's own final state. CONSISTENCY CHECK ONLY (it uses the kernel's
 *     own map, so it is not independent): it would show a Phi that is not the derivative of the state it comes with.
 *  4. Symplectic defect: verlet and yoshida4 are symplectic maps (Hairer, Lubich, Wanner, "Geometric Numerical
 *     Integration", 2nd ed. 2006, VI.3, recalled from memory), so the defect of their exact tangent stays at
 *     round-off (a few eps max|Phi~|^2); rk4 and butcher6 are not symplectic and the defect grows.
 *  5. The monitor's symp_dev / symp_step against the defect recomputed here, in the test, from the Phi read after
 *     every step (the rk4 run is the deliberately non-symplectic case): the first step over the budget is the one
 *     the recount finds.
 * Constants: GM 398600.4418 km^3/s^2, R = 6378.137 km (WGS 84, NIMA TR8350.2); J2 = 1.0826266836e-3 (EGM96 C20);
 * J3 = -2.5326564853e-6 (EGM96 C30, recalled from memory), as tests/integrate-gravity.test.ts.
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import { METHODS, type Method } from "./integrate-helpers.js";
import { slotsOf } from "../harness/module/routines.js";
import { statusCode } from "../harness/module/status.js";
import { discreteMapJacobian } from "../harness/verify/reference/variational.js";
import { transitionDec, STEP_EXP, WORK_DIGITS } from "../harness/verify/reference/transition.js";
import { decimalAt, exact, toDouble } from "../harness/verify/reference/decimal.js";
import type { Kernels } from "../harness/module/load.js";

const MU = 398600.4418;
const RE = 6378.137;
const J2 = 1.0826266836e-3;
const J3 = -2.5326564853e-6;
const NAMES = Object.keys(METHODS) as Method[];
const PHI = Array.from({ length: 36 }, (_, q) => `phi_${Math.floor(q / 6) + 1}${(q % 6) + 1}`);
const SLOTS: Readonly<Record<string, number>> = slotsOf("integrate_transition", "rx", "ry", "rz", "vx", "vy", "vz", "symp_dev",
  "symp_step", "symp_dev_now", "k", ...PHI);
/** The slot of a named integration_transition output. */
const slot = (n: string): number => SLOTS[n]!;

/** An inclined eccentric orbit (a about 9,000 km, e about 0.3), a plain test state. */
const ECC: readonly number[] = [5200, 3100, 2400, -3.1, 6.2, 3.9];
/** A low orbit: 6,778 km circular, 51.6 deg inclination; period about 5,553 s. */
const LEO_A = 6778;
const LEO_I = (51.6 * Math.PI) / 180;
const LEO: readonly number[] = [LEO_A, 0, 0, 0, Math.sqrt(MU / LEO_A) * Math.cos(LEO_I), Math.sqrt(MU / LEO_A) * Math.sin(LEO_I)];
const LEO_T = 2 * Math.PI * Math.sqrt(LEO_A ** 3 / MU);

interface PhiRun {
  status: number;
  state: number[];
  phi: number[];
  sympDev: number;
  sympStep: number;
}

function runPhi(k: Kernels, y0: readonly number[], step: number, steps: number, m: Method, j2 = 0, j3 = 0, symp = 0): PhiRun {
  const status = k.call("integrate_transition", [MU, ...y0, step, steps, METHODS[m], j2, j3, RE, 0, 0, 0, 0, symp]);
  return {
    status,
    state: ["rx", "ry", "rz", "vx", "vy", "vz"].map((n) => k.out[slot(n)]!),
    phi: PHI.map((n) => k.out[slot(n)]!),
    sympDev: k.out[slot("symp_dev")]!,
    sympStep: k.out[slot("symp_step")]!,
  };
}

/** D_i of D = diag(L, L, L, V, V, V), L = |r0|, V = sqrt(mu / L). */
const scales = (y0: readonly number[]): ((i: number) => number) => {
  const L = Math.hypot(y0[0]!, y0[1]!, y0[2]!);
  const V = Math.sqrt(MU / L);
  return (i) => (i < 3 ? L : V);
};

/** max |Phi~ - Ref~| / max |Ref~|, Phi~ = D^-1 Phi D. */
function scaleFreeError(y0: readonly number[], phi: readonly number[], ref: readonly number[]): number {
  const d = scales(y0);
  let err = 0;
  let big = 0;
  for (let q = 0; q < 36; q++) {
    const f = d(q % 6) / d(Math.floor(q / 6));
    err = Math.max(err, Math.abs((phi[q]! - ref[q]!) * f));
    big = Math.max(big, Math.abs(ref[q]! * f));
  }
  return err / big;
}

/** The symplectic defect max |Phi~^T J Phi~ - J| and max |Phi~|, computed here from a row-major Phi. */
function defectHere(y0: readonly number[], phi: readonly number[]): { defect: number; big: number } {
  const d = scales(y0);
  const P = (i: number, j: number): number => (phi[6 * i + j]! * d(j)) / d(i);
  let defect = 0;
  let big = 0;
  for (let a = 0; a < 6; a++) {
    for (let b = 0; b < 6; b++) {
      big = Math.max(big, Math.abs(P(a, b)));
      let s = 0;
      for (let i = 0; i < 3; i++) s += P(i, a) * P(i + 3, b) - P(i + 3, a) * P(i, b);
      const j = a < 3 && b === a + 3 ? 1 : a >= 3 && b === a - 3 ? -1 : 0;
      defect = Math.max(defect, Math.abs(s - j));
    }
  }
  return { defect, big };
}

/** Phi against the 100-digit Jacobian of the discrete map: measured worst 9.4e-16 (yoshida4, two-body), 2026-12. */
const MAP_TOL = 1e-13;
const MAP_STEP = 60;
const MAP_STEPS = 12;

describe("integrate_transition: Phi is the Jacobian of the discrete map (100-digit reference)", () => {
  for (const m of NAMES) {
    for (const [label, j2, j3] of [["two-body", 0, 0], ["J2 + J3", J2, J3]] as const) {
      it(`${m}, ${label}: every entry within ${MAP_TOL} of the largest (scale-free)`, () => {
        const k = release();
        const got = runPhi(k, ECC, MAP_STEP, MAP_STEPS, m, j2, j3);
        expect(got.status).toBe(0);
        const ref = discreteMapJacobian(m, { mu: MU, j2, j3, radius: RE }, ECC, MAP_STEP, MAP_STEPS);
        expect(scaleFreeError(ECC, got.phi, ref.phi)).toBeLessThan(MAP_TOL);
        // and the state the reference differentiates is the kernel's (the map is the same map)
        const d = scales(ECC);
        got.state.forEach((x, i) => expect(Math.abs(x - ref.state[i]!) / d(i)).toBeLessThan(1e-14));
      }, 60_000);
    }
  }
});

/**
 * Two-body, 3,000 s (about 0.35 of a period) with 50, 100, 200 steps, against the transition suite's reference.
 * Measured (2026-12) scale-free error / observed order per halving:
 *  rk4 1.66e-6, 9.49e-8, 5.65e-9 (4.13, 4.07); verlet 4.61e-3, 1.16e-3, 2.89e-4 (2.00, 2.00);
 *  yoshida4 6.98e-5, 4.36e-6, 2.72e-7 (4.00, 4.00); butcher6 4.62e-9, 7.10e-11, 1.09e-12 (6.02, 6.02).
 */
const ORDER: Record<Method, number> = { rk4: 4, verlet: 2, yoshida4: 4, butcher6: 6 };
const ORDER_SLACK = 0.3;
const CONV_DT = 3000;

describe("integrate_transition, two-body: converges to the true transition matrix at the method's order", () => {
  it("against the decimal.js transition reference, steps 50, 100, 200", () => {
    const P = decimalAt(WORK_DIGITS);
    const ref = transitionDec(P, [MU, ...ECC, CONV_DT].map((x) => exact(P, x)), STEP_EXP).phi.map(toDouble);
    const k = release();
    for (const m of NAMES) {
      const errs = [50, 100, 200].map((n) => {
        const r = runPhi(k, ECC, CONV_DT / n, n, m);
        expect(r.status).toBe(0);
        return scaleFreeError(ECC, r.phi, ref);
      });
      for (let i = 1; i < errs.length; i++) {
        const order = Math.log2(errs[i - 1]! / errs[i]!);
        expect(Math.abs(order - ORDER[m]), `${m}: errors ${errs.join(", ")}`).toBeLessThan(ORDER_SLACK);
      }
    }
    // the finest butcher6 run is the flow's Phi to 1.1e-12 (measured)
    expect(scaleFreeError(ECC, runPhi(k, ECC, CONV_DT / 200, 200, "butcher6").phi, ref)).toBeLessThan(1e-11);
  }, 60_000);
});

describe("integrate_transition, J2 + J3: CONSISTENCY CHECK (not independent) against its own final state", () => {
  // Central differences of the kernel's own map in doubles, offset 1e-5 of L or V (rounding of the state, about
  // 1e-16 of it over 1e-5, and truncation): measured agreement 7.7e-9 to 7.8e-9 for the four methods, 2026-12.
  it("Phi matches central differences of integrate_transition's final state, every method", () => {
    const k = release();
    const d = scales(ECC);
    for (const m of NAMES) {
      const base = runPhi(k, ECC, 60, 60, m, J2, J3);
      const fd: number[] = new Array<number>(36).fill(0);
      for (let j = 0; j < 6; j++) {
        const h = 1e-5 * d(j);
        const at = (s: number): number[] => runPhi(k, ECC.map((x, i) => (i === j ? x + s * h : x)), 60, 60, m, J2, J3).state;
        const p = at(1);
        const q = at(-1);
        for (let i = 0; i < 6; i++) fd[6 * i + j] = (p[i]! - q[i]!) / (2 * h);
      }
      const err = scaleFreeError(ECC, base.phi, fd);
      expect(err, `${m}: ${err}`).toBeLessThan(5e-8);
    }
  });
});

/**
 * Low orbit, 10 revolutions at 60 s steps (926 steps, about 93 an orbit), measured 2026-12 (release build):
 *  symp_dev two-body / J2 + J3: rk4 1.09e-4 / 1.10e-4, verlet 3.37e-11 / 3.82e-11, yoshida4 4.32e-11 / 5.47e-11,
 *  butcher6 2.70e-7 / 2.71e-7; max |Phi~| is about 180 there, so eps max|Phi~|^2 is about 7e-12: the symplectic
 *  methods sit at a few times round-off. (`areal eval integrate-transition --input examples/variational/leo-10rev.csv`.)
 */
const LEO_STEP = 60;
const LEO_STEPS = Math.round((10 * LEO_T) / LEO_STEP);
/** Symplectic methods: defect / (eps max|Phi~|^2) at most this (measured about 5). */
const ROUNDOFF_FACTOR = 50;

describe("symplectic defect over 10 low-orbit revolutions", () => {
  it("verlet and yoshida4 stay at round-off, rk4 and butcher6 drift (growing with the revolutions)", () => {
    const k = release();
    for (const [j2, j3] of [[0, 0], [J2, J3]] as const) {
      for (const m of NAMES) {
        const one = runPhi(k, LEO, LEO_STEP, Math.round(LEO_T / LEO_STEP), m, j2, j3);
        const ten = runPhi(k, LEO, LEO_STEP, LEO_STEPS, m, j2, j3);
        expect(ten.status).toBe(0);
        const { big } = defectHere(LEO, ten.phi);
        if (m === "verlet" || m === "yoshida4") {
          expect(ten.sympDev, m).toBeLessThan(ROUNDOFF_FACTOR * Number.EPSILON * big * big);
        } else {
          expect(ten.sympDev, m).toBeGreaterThan(1e3 * Number.EPSILON * big * big);
          expect(ten.sympDev, `${m} grows`).toBeGreaterThan(5 * one.sympDev);
        }
      }
    }
  });
});

describe("the monitor's symplectic budget: the first step over it", () => {
  /** The defect recomputed here after every step of a stepwise run (integrate_transition_begin, integrate_step, integrate_phi). */
  function stepwise(k: Kernels, m: Method, steps: number, budget: number): { now: number[]; last: PhiRun; sympNow: number[] } {
    expect(k.call("integrate_transition_begin", [MU, ...LEO, LEO_STEP, METHODS[m], J2, J3, RE, 0, 0, 0, 0, budget])).toBe(0);
    const now: number[] = [0];
    const sympNow: number[] = [0];
    let phi: number[] = [];
    for (let i = 1; i <= steps; i++) {
      expect(k.call("integrate_step", [1])).toBe(0);
      expect(k.call("integrate_phi", [])).toBe(0);
      expect(k.out[slot("k")]).toBe(i);
      phi = PHI.map((n) => k.out[slot(n)]!);
      now.push(defectHere(LEO, phi).defect);
      sympNow.push(k.out[slot("symp_dev_now")]!);
    }
    return { now, sympNow, last: { status: 0, state: [], phi, sympDev: k.out[slot("symp_dev")]!, sympStep: k.out[slot("symp_step")]! } };
  }

  it("rk4 (not symplectic): symp_step is the first step whose recomputed defect exceeds the budget", () => {
    const k = release();
    const budget = 1e-6;
    const steps = 300;
    const { now, sympNow, last } = stepwise(k, "rk4", steps, budget);
    const first = now.findIndex((d, i) => i >= 1 && d > budget);
    expect(first).toBeGreaterThan(1); // the budget is crossed during the run, not at once
    expect(last.sympStep).toBe(first);
    // the monitor's values are the recomputed ones to rounding (the test sums in another order)
    // (rounding: relative 1e-12, plus an absolute floor of a few eps max|Phi~|^2 with max|Phi~| below 20 here)
    now.forEach((d, i) => expect(Math.abs(sympNow[i]! - d)).toBeLessThanOrEqual(1e-12 * d + 1e-13));
    expect(Math.abs(last.sympDev - Math.max(...now))).toBeLessThanOrEqual(1e-12 * last.sympDev);
    // the one-shot call says the same, with the same Phi bits
    const one = runPhi(k, LEO, LEO_STEP, steps, "rk4", J2, J3, budget);
    expect(one.sympStep).toBe(first);
    expect(one.phi).toEqual(last.phi);
  });

  it("verlet: a budget just above round-off never fires (-1); 0 means no budget", () => {
    const k = release();
    expect(runPhi(k, LEO, LEO_STEP, LEO_STEPS, "verlet", J2, J3, 1e-9).sympStep).toBe(-1);
    expect(runPhi(k, LEO, LEO_STEP, LEO_STEPS, "rk4", J2, J3, 0).sympStep).toBe(-1);
  });
});

describe("integrate_transition: the state is integrate's, statuses", () => {
  it("the state bits are those of integrate (carrying Phi changes nothing in the state)", () => {
    const k = release();
    const I = slotsOf("integrate", "rx", "ry", "rz", "vx", "vy", "vz");
    for (const m of NAMES) {
      const withPhi = runPhi(k, ECC, 60, 100, m, J2, J3).state;
      expect(k.call("integrate", [MU, ...ECC, 60, 100, METHODS[m], J2, J3, RE, 0, 0, 0, 0])).toBe(0);
      expect([I.rx, I.ry, I.rz, I.vx, I.vy, I.vz].map((i) => k.out[i])).toEqual(withPhi);
    }
  });

  it("symplectic budget NaN -> nonfinite-input, negative -> out-of-domain; integrate_phi needs a run with Phi", () => {
    const k = release();
    expect(runPhi(k, ECC, 60, 10, "rk4", 0, 0, NaN).status).toBe(statusCode("nonfinite-input"));
    expect(runPhi(k, ECC, 60, 10, "rk4", 0, 0, -1).status).toBe(statusCode("out-of-domain"));
    expect(k.call("integrate_begin", [MU, ...ECC, 60, METHODS.rk4, 0, 0, RE, 0, 0, 0, 0])).toBe(0);
    expect(k.call("integrate_phi", [])).toBe(statusCode("out-of-domain"));
    expect(runPhi(k, ECC, 60, 0, "rk4").phi).toEqual(PHI.map((_, q) => (q % 7 === 0 ? 1 : 0))); // step 0: identity
  });
});

describe("integrate_transition, single-precision build", () => {
  // Low orbit, one revolution with yoshida4 at 60 s, J2 + J3, against the f64 build. Measured 2026-12: position
  // 35 m, velocity 4.4e-5 km/s, Phi~ 4.8e-6 of its largest entry (the (r, v0) block 0.068 s, the (v, r0) block
  // 8.9e-8 1/s); f32 symplectic defect 4.5e-5 (round-off of single precision).
  it("runs, and its Phi~ is within 1e-4 of the f64 one", () => {
    const k32 = single();
    const k64 = release();
    const steps = Math.round(LEO_T / LEO_STEP);
    const a = runPhi(k32, LEO, LEO_STEP, steps, "yoshida4", J2, J3);
    const b = runPhi(k64, LEO, LEO_STEP, steps, "yoshida4", J2, J3);
    expect(a.status).toBe(0);
    const dr = Math.hypot(a.state[0]! - b.state[0]!, a.state[1]! - b.state[1]!, a.state[2]! - b.state[2]!);
    const dphi = scaleFreeError(LEO, a.phi, b.phi);
    expect(dr, `position ${dr} km`).toBeLessThan(0.5);
    expect(dphi, `Phi~ ${dphi}`).toBeLessThan(1e-4);
  });
});
