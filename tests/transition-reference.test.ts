/**
 * The transition-matrix reference (harness/reference/transition.ts: central differences of the decimal.js
 * propagation) checked against facts that do not come from it, at a precision far beyond doubles:
 *  - over whole periods of an ellipse the exact Phi is the monodromy matrix I - k [v0; a0] grad T^T with
 *    grad T = (3 T / alpha) (r0 / r0^3, v0 / mu) (common practice: the flow over k periods is the identity on the
 *    orbit, and only the period's dependence on the energy, T = 2 pi / (sqrt(mu) alpha^(3/2)), is left);
 *  - the result is symplectic, Phi^T J Phi = J (Battin 1987, 9.7; any Hamiltonian mechanics text);
 *  - halving the difference step changes nothing at 1e-25 (truncation and rounding are both below it).
 * The comparisons are made in decimal at the reference's own precision and step (those of the vector file),
 * before rounding to doubles.
 */
import { describe, it, expect } from "vitest";
import { decimalAt, exact, type Dec } from "../harness/verify/reference/decimal.js";
import { transitionDec, scaleFree, WORK_DIGITS, STEP_EXP } from "../harness/verify/reference/transition.js";

const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)
const P = decimalAt(WORK_DIGITS);
type D = typeof P;

/** max |x_q - y_q| / max |y_q|. */
function relMax(C: D, x: readonly Dec[], y: readonly Dec[]): number {
  let big = new C(0);
  let err = new C(0);
  y.forEach((v, q) => {
    if (v.abs().gt(big)) big = v.abs();
    const d = x[q]!.minus(v).abs();
    if (d.gt(err)) err = d;
  });
  return err.div(big).toNumber();
}

describe("transition reference", () => {
  it("over 3 periods of an eccentric orbit it is the monodromy matrix, and symplectic, to 1e-25", () => {
    // An invented Molniya-like state; dt = 3 T exactly at the working digits (so the input dt is that decimal value).
    const s = [7000, 100, 50, -0.1, 9.9, 1.0].map((v) => exact(P, v));
    const mu = exact(P, MU);
    const r0 = s[0]!.pow(2).plus(s[1]!.pow(2)).plus(s[2]!.pow(2)).sqrt();
    const v2 = s[3]!.pow(2).plus(s[4]!.pow(2)).plus(s[5]!.pow(2));
    const alpha = new P(2).div(r0).minus(v2.div(mu));
    const T = P.acos(-1).times(2).div(mu.sqrt().times(alpha.pow(1.5)));
    const n = 3;
    const t = transitionDec(P, [mu, ...s, T.times(n)], STEP_EXP);
    const col: Dec[] = [s[3]!, s[4]!, s[5]!, ...[0, 1, 2].map((i) => mu.times(s[i]!).div(r0.pow(3)).neg())];
    const k = T.times(3).div(alpha);
    const grad: Dec[] = [...[0, 1, 2].map((i) => s[i]!.div(r0.pow(3))), ...[3, 4, 5].map((i) => s[i]!.div(mu))].map((g) => g.times(k));
    const want = Array.from({ length: 36 }, (_, q) => new P(Math.floor(q / 6) === q % 6 ? 1 : 0).minus(col[Math.floor(q / 6)]!.times(grad[q % 6]!).times(n)));
    const wantT = scaleFree({ ...t, phi: want });
    expect(relMax(P, scaleFree(t), wantT)).toBeLessThan(1e-25);
    // Symplectic: Phi^T J Phi - J.
    const phi = t.phi;
    let worst = 0;
    for (let a = 0; a < 6; a++) {
      for (let b = 0; b < 6; b++) {
        let sum = new P(a < 3 && b === a + 3 ? -1 : a >= 3 && b === a - 3 ? 1 : 0);
        for (let i = 0; i < 3; i++) sum = sum.plus(phi[6 * i + a]!.times(phi[6 * (i + 3) + b]!)).minus(phi[6 * (i + 3) + a]!.times(phi[6 * i + b]!));
        worst = Math.max(worst, sum.abs().toNumber());
      }
    }
    expect(worst).toBeLessThan(1e-20); // entries up to about 1e5 (s, 1/s): relative far below 1e-25
  });

  it("a hyperbolic arc: halving the step changes Phi~ by less than 1e-25 of its largest entry", () => {
    const x = [MU, 8000, -3000, 1200, 3.1, 9.8, -2.2, -20000].map((v) => exact(P, v));
    const a = scaleFree(transitionDec(P, x, STEP_EXP));
    const b = scaleFree(transitionDec(P, x, STEP_EXP + 0.30103)); // step / 2
    expect(relMax(P, a, b)).toBeLessThan(1e-25);
  });
});
