/**
 * Properties of the `transition` kernel that hold for the true two-body flow, checked on the vector cases:
 *  - it shares propagate's solution: the same status, r, v bits and iteration count for the same inputs;
 *  - symplecticity, Phi^T J Phi = J with J = [[0, I], [-I, 0]] (the flow of a Hamiltonian system is symplectic:
 *    R. H. Battin, "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 9.7; any
 *    Hamiltonian mechanics text), checked on the scale-free Phi~ = D^-1 Phi D (symplectic as well, since
 *    D^-1 J D^-1 = J / (L V)), and det Phi = 1;
 *  - whole periods of an ellipse: the flow over k periods is the identity on the orbit, and its derivative is the
 *    monodromy matrix Phi(k T) = I - k [v0; a0] grad T^T, grad T = (3 T / alpha) (r0 / r0^3, v0 / mu) (the only
 *    change after whole periods is the shift in time from the period's dependence on the energy: common practice,
 *    derived from T = 2 pi / (sqrt(mu) alpha^(3/2)), alpha = 2 / r0 - v0^2 / mu);
 *  - dt = 0 gives the identity;
 *  - the single-precision build never returns ok with a non-finite output, and where it returns ok its Phi~ is
 *    close to the f64 one.
 */
import { describe, it, expect } from "vitest";
import { release, single, outputsNow } from "./helpers.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { transitionSpec } from "../harness/verify/specs/transition.js";
import { sameBits } from "../harness/core/float.js";
import { isOk, statusCode } from "../harness/module/status.js";
import type { Kernels } from "../harness/module/load.js";

const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)

interface Run {
  status: number;
  r: number[];
  v: number[];
  /** Phi row-major. */
  phi: number[];
  iterations: number;
}

function transition(k: Kernels, x: readonly number[]): Run {
  const status = k.call("transition", x);
  const out = outputsNow(k, "transition");
  return { status, r: out.slice(0, 3), v: out.slice(3, 6), phi: out.slice(6, 42), iterations: out[42]! };
}

/** Phi~ = D^-1 Phi D for the inputs x. */
function scaleFree(x: readonly number[], phi: readonly number[]): number[] {
  const L = Math.hypot(x[1]!, x[2]!, x[3]!);
  const V = Math.sqrt(x[0]! / L);
  const d = (i: number): number => (i < 3 ? L : V);
  return phi.map((p, q) => (p * d(q % 6)) / d(Math.floor(q / 6)));
}

/** max |Phi^T J Phi - J| for a row-major 6x6 Phi. */
function symplecticDefect(phi: readonly number[]): number {
  const P = (i: number, j: number): number => phi[6 * i + j]!;
  let worst = 0;
  for (let a = 0; a < 6; a++) {
    for (let b = 0; b < 6; b++) {
      let s = 0;
      for (let k = 0; k < 3; k++) s += P(k, a) * P(k + 3, b) - P(k + 3, a) * P(k, b);
      const j = a < 3 && b === a + 3 ? 1 : a >= 3 && b === a - 3 ? -1 : 0;
      worst = Math.max(worst, Math.abs(s - j));
    }
  }
  return worst;
}

/** Determinant by Gaussian elimination with partial pivoting. */
function det6(phi: readonly number[]): number {
  const m = [0, 1, 2, 3, 4, 5].map((i) => phi.slice(6 * i, 6 * i + 6));
  let d = 1;
  for (let c = 0; c < 6; c++) {
    let p = c;
    for (let i = c + 1; i < 6; i++) if (Math.abs(m[i]![c]!) > Math.abs(m[p]![c]!)) p = i;
    if (p !== c) {
      [m[p], m[c]] = [m[c]!, m[p]!];
      d = -d;
    }
    d *= m[c]![c]!;
    for (let i = c + 1; i < 6; i++) {
      const f = m[i]![c]! / m[c]![c]!;
      for (let j = c; j < 6; j++) m[i]![j]! -= f * m[c]![j]!;
    }
  }
  return d;
}

const cases = (): number[][] => {
  const v = readVectors(vectorPath("transition"));
  const ins = transitionSpec.inputs.map((n) => col(v, n));
  return v.values.map((row) => ins.map((c) => row[c]!));
};

/**
 * Largest symplectic defect accepted, relative to max |Phi~_ij|^2 (the size of the products in Phi^T J Phi):
 * measured 8.5e-16 at worst on the suite; a wrong term shows at the size of that term.
 */
const SYMPLECTIC_REL = 1e-13;
/** det Phi = 1 within this where max |Phi~_ij| <= DET_MAX_ENTRY (beyond, elimination in doubles is too noisy). */
const DET_TOL = 1e-9;
const DET_MAX_ENTRY = 20;

describe("transition: properties of the flow on the vector cases", () => {
  it("same status, r, v bits and iterations as propagate for the same inputs", () => {
    const k = release();
    for (const x of cases()) {
      const t = transition(k, x);
      const st = k.call("propagate", x);
      expect(t.status).toBe(st);
      const p = outputsNow(k, "propagate");
      [...t.r, ...t.v].forEach((y, i) => expect(sameBits(y, p[i]!), `slot ${i} of ${x.join(",")}`).toBe(true));
      expect(t.iterations).toBe(p[6]);
    }
  });

  it("Phi is symplectic (Phi^T J Phi = J) and det Phi = 1", () => {
    const k = release();
    let worst = 0;
    let detChecked = 0;
    for (const x of cases()) {
      const t = transition(k, x);
      expect(t.status).toBe(0);
      const pt = scaleFree(x, t.phi);
      const big = Math.max(...pt.map(Math.abs));
      const rel = symplecticDefect(pt) / (big * big);
      worst = Math.max(worst, rel);
      if (big <= DET_MAX_ENTRY) {
        expect(Math.abs(det6(pt) - 1)).toBeLessThan(DET_TOL);
        detChecked++;
      }
    }
    expect(worst).toBeLessThan(SYMPLECTIC_REL);
    expect(detChecked).toBeGreaterThan(50);
  });

  it("over whole periods of an ellipse Phi is the monodromy matrix I - k [v0; a0] grad T^T", () => {
    const k = release();
    // A Molniya-like and a low orbit (invented states), 1 and 25 periods, both directions.
    for (const s of [[7000, 100, 50, -0.1, 7.5, 1.0], [-2000, 6800, 1200, -9.2, -2.1, 2.4]]) {
      const r0 = Math.hypot(s[0]!, s[1]!, s[2]!);
      const v2 = s[3]! ** 2 + s[4]! ** 2 + s[5]! ** 2;
      const alpha = 2 / r0 - v2 / MU;
      const T = (2 * Math.PI) / (Math.sqrt(MU) * alpha ** 1.5);
      for (const n of [1, 25, -25]) {
        const x = [MU, ...s, n * T];
        const t = transition(k, x);
        expect(t.status).toBe(0);
        const a0 = [0, 1, 2].map((i) => (-MU * s[i]!) / r0 ** 3);
        const col6 = [s[3]!, s[4]!, s[5]!, ...a0];
        const gradT = [...[0, 1, 2].map((i) => s[i]! / r0 ** 3), ...[3, 4, 5].map((i) => s[i]! / MU)].map((g) => ((3 * T) / alpha) * g);
        const want = Array.from({ length: 36 }, (_, q) => (Math.floor(q / 6) === q % 6 ? 1 : 0) - n * col6[Math.floor(q / 6)]! * gradT[q % 6]!);
        const got = scaleFree(x, t.phi);
        const exp = scaleFree(x, want);
        const big = Math.max(...exp.map(Math.abs));
        const err = Math.max(...got.map((g, q) => Math.abs(g - exp[q]!)));
        // T in doubles and n T carry a few ulp; the monodromy form itself is exact.
        expect(err / big, `${n} periods`).toBeLessThan(1e-11);
      }
    }
  });

  it("dt = 0 gives the identity", () => {
    const t = transition(release(), [MU, 7000, 100, 50, -0.1, 7.5, 1.0, 0]);
    expect(t.status).toBe(0);
    t.phi.forEach((p, q) => expect(p).toBe(Math.floor(q / 6) === q % 6 ? 1 : 0));
  });
});

describe("transition: statuses as propagate's, and the f32 build", () => {
  it("bad inputs give propagate's failure status", () => {
    const k = release();
    const LEO = [7000, 0, 0, 0, 7.5, 1];
    const bad: number[][] = [
      [NaN, ...LEO, 60],
      [MU, ...LEO, Infinity],
      [MU, Infinity, 0, 0, 0, 7.5, 1, 60],
      [0, ...LEO, 60],
      [-MU, ...LEO, 60],
      [MU, 0, 0, 0, 1, 2, 3, 60],
      [MU, 7000, 0, 0, 3, 0, 0, 60],
      [MU, 7000, -2000, 500, 0, 0, 0, 60],
      [1e-310, ...LEO, 60],
    ];
    for (const x of bad) {
      const st = k.call("transition", x);
      expect(st).toBe(k.call("propagate", x));
      expect(isOk(st)).toBe(false);
    }
  });

  it("an ellipse over 1e308 s: no usable angle is left (one ulp of dt is many periods), both return overflow", () => {
    const k = release();
    const x = [MU, 7000, 0, 0, 0, 7.5, 1, 1e308];
    expect(k.call("propagate", x)).toBe(statusCode("overflow"));
    expect(k.call("transition", x)).toBe(statusCode("overflow"));
  });

  it("an ellipse over 1e13 s (about 2e9 revolutions): propagate is ok, Phi's secular terms stay finite", () => {
    const k = release();
    const x = [MU, 7000, 0, 0, 0, 7.5, 1, 1e13];
    expect(k.call("propagate", x)).toBe(0);
    expect(k.call("transition", x)).toBe(0);
  });

  // Measured: 273 of the 280 rounded cases ok (7 overflow), 179 compared, worst 2.3e-5.
  it("f32: ok only with finite outputs, and then Phi~ within 1e-3 of the f64 one on the rounded cases", () => {
    const k32 = single();
    const k64 = release();
    let compared = 0;
    for (const x0 of cases()) {
      const x = x0.map((v) => Math.fround(v));
      const t = transition(k32, x);
      const all = [...t.r, ...t.v, ...t.phi, t.iterations];
      if (isOk(t.status)) {
        expect(all.every(Number.isFinite)).toBe(true);
        const ref = transition(k64, x);
        if (!isOk(ref.status)) continue;
        const a = scaleFree(x, t.phi);
        const b = scaleFree(x, ref.phi);
        const big = Math.max(...b.map(Math.abs));
        // Only well-conditioned cases are compared (f32 carries 7 digits, and Phi~ amplifies input changes by
        // about big x revolutions).
        if (big > 100) continue;
        expect(Math.max(...a.map((p, q) => Math.abs(p - b[q]!))) / big).toBeLessThan(1e-3);
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(150);
  });
});
