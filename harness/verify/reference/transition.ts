/**
 * High-precision reference for the two-body state transition matrix Phi = d(r, v)(t) / d(r0, v0), independent
 * of the kernel (which differentiates the universal-variable solution in closed form): the final state comes from
 * the propagation reference of harness/reference/twobody.ts (classical elements and Kepler's equation by bracketed
 * Newton, decimal.js), and Phi from central differences of that same propagation, one column per initial
 * component, with a tiny step at many digits.
 *
 * Why central differences, and why they are accurate far beyond 1e-16 (common practice: the error terms of a
 * central difference): column j is (x(x0 + h e_j) - x(x0 - h e_j)) / (2 h). Its truncation error is
 * h^2 / 6 |x'''|, its rounding error about 10^-(W - G) |x| / h for W working digits with G lost (the Newton stop
 * and the digits lost near e = 1, which `digitsFor` adds back). With h = 10^-STEP_EXP times the scale of the
 * component (L = |r0| for positions, V = sqrt(mu / L) for velocities) and W = WORK_DIGITS plus the near-parabolic
 * extra, the truncation error is about 10^-50 times the third derivative in scale-free units (below 1e12 even
 * for e = 0.999 over 25 revolutions, so 1e-38) and the rounding error about 10^-(60 - 6 - 25) = 1e-29 relative to
 * the largest entry: some 12 digits beyond the 1e-16 of a double. tests/transition-reference.test.ts checks it,
 * at these settings, against the monodromy matrix over whole periods (a closed form) and checks that halving the
 * step changes nothing at 1e-25.
 *
 * The conditioning figures are computed as in the other two-body suites: each input double moved one ulp up in
 * turn, everything recomputed (at COND_DIGITS, forward differences with a step of 10^-COND_STEP_EXP: rounding
 * about 1e-22 of the largest entry, far below the 1e-16 changes measured), and the largest change kept: cond_r, cond_v relative;
 * cond_phi = max |delta Phi~|_F / max |Phi~_ij| for the scale-free Phi~ = D^-1 Phi D, D = diag(L, L, L, V, V, V).
 */
import { Dec, decimalAt, exact, toDouble } from "./decimal.js";
import { digitsFor, propagateDec, ulpUp, type PropagationResult } from "./twobody.js";
import { sub, norm, type V3 } from "./vec3.js";

type D = typeof Dec;

/** Working digits of the reference Phi (plus those lost near e = 1, as for the propagation reference). */
export const WORK_DIGITS = 60;
/** Central-difference step: 10^-STEP_EXP of L for positions, of V for velocities. */
export const STEP_EXP = 25;
/**
 * Digits and step of the conditioning figures (a one-ulp change moves Phi~ by about 1e-16 of its largest entry):
 * forward differences, whose truncation error (about 1e-12 of Phi) is the same at x and at x + 1 ulp to 1e-28,
 * so it drops out of the change; rounding about 1e-34 / 1e-12 = 1e-22.
 */
const COND_DIGITS = 40;
const COND_STEP_EXP = 12;

/** A state after dt and its transition matrix (row-major, 36 entries), at the precision of the clone. */
export interface TransitionDec {
  r: V3;
  v: V3;
  phi: Dec[];
  /** L = |r0| and V = sqrt(mu / L), the scales of D. */
  L: Dec;
  V: Dec;
  base: PropagationResult;
}

/**
 * Phi by central differences of the propagation reference: column j from x0 +- 10^-stepExp (L or V) e_j (forward
 * differences, x0 + h e_j against x0, when `forward`: for the conditioning figures).
 */
export function transitionDec(P: D, ins: readonly Dec[], stepExp: number, guess?: Dec, forward = false): TransitionDec {
  const base = propagateDec(P, ins, guess);
  const L = norm([ins[1]!, ins[2]!, ins[3]!]);
  const V = ins[0]!.div(L).sqrt();
  const tiny = new P(10).pow(-stepExp);
  const phi: Dec[] = new Array<Dec>(36);
  for (let j = 0; j < 6; j++) {
    const h = tiny.times(j < 3 ? L : V);
    const at = (sign: number): Dec[] => {
      const x = ins.slice();
      x[1 + j] = x[1 + j]!.plus(h.times(sign));
      const q = propagateDec(P, x, base.anomaly);
      return [...q.r, ...q.v];
    };
    const plus = at(1);
    const minus = forward ? [...base.r, ...base.v] : at(-1);
    const span = forward ? h : h.times(2);
    for (let i = 0; i < 6; i++) phi[6 * i + j] = plus[i]!.minus(minus[i]!).div(span);
  }
  return { r: base.r, v: base.v, phi, L, V, base };
}

/** The scale-free matrix D^-1 Phi D (entry (i, j) times D_j / D_i). */
export function scaleFree(t: TransitionDec): Dec[] {
  return t.phi.map((x, k) => {
    const i = Math.floor(k / 6);
    const j = k % 6;
    const di = i < 3 ? t.L : t.V;
    const dj = j < 3 ? t.L : t.V;
    return x.times(dj).div(di);
  });
}

const maxAbs = (xs: readonly Dec[]): Dec => xs.reduce((m, x) => (x.abs().gt(m) ? x.abs() : m), xs[0]!.abs());
const relChange = (a: V3, b: V3): Dec => norm(sub(a, b)).div(norm(b));

/**
 * Reference for one case (mu, r0x, r0y, r0z, v0x, v0y, v0z, dt): [rx, ry, rz, vx, vy, vz, phi_11 .. phi_66,
 * cond_r, cond_v, cond_phi, scale_rr, scale_rv, scale_vr, revs]. scale_rr = max |Phi~_ij|, scale_rv = scale_rr
 * L / V, scale_vr = scale_rr V / L: an error in block (r, v0) divided by scale_rv is the error of Phi~ relative to
 * its largest entry (and likewise for the other blocks; the (v, v0) block takes scale_rr).
 */
export function referenceTransition(x: readonly number[]): number[] {
  const [mu, rx, ry, rz, vx, vy, vz] = x as [number, number, number, number, number, number, number];
  const P = decimalAt(digitsFor(mu, [rx, ry, rz], [vx, vy, vz], WORK_DIGITS));
  const t = transitionDec(P, x.map((v) => exact(P, v)), STEP_EXP);
  const big = maxAbs(scaleFree(t));
  const cond = conditionTransition(x, t.base.anomaly);
  return [
    ...t.r.map(toDouble),
    ...t.v.map(toDouble),
    ...t.phi.map(toDouble),
    ...cond.map(toDouble),
    toDouble(big),
    toDouble(big.times(t.L).div(t.V)),
    toDouble(big.times(t.V).div(t.L)),
    t.base.revs,
  ];
}

/** [cond_r, cond_v, cond_phi]: the largest changes when one input double moves one ulp up. */
function conditionTransition(x: readonly number[], anomaly: Dec): Dec[] {
  const C = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7), COND_DIGITS));
  const ins = x.map((v) => exact(C, v));
  const guess = new C(anomaly);
  const low = transitionDec(C, ins, COND_STEP_EXP, guess, true);
  const lowTilde = scaleFree(low);
  const big = maxAbs(lowTilde);
  let cond = [new C(0), new C(0), new C(0)];
  for (let j = 0; j < x.length; j++) {
    const pert = ins.slice();
    pert[j] = exact(C, ulpUp(x[j]!));
    const q = transitionDec(C, pert, COND_STEP_EXP, low.base.anomaly, true);
    const qt = scaleFree(q);
    const dPhi = qt.reduce((s, e, k) => s.plus(e.minus(lowTilde[k]!).pow(2)), new C(0)).sqrt().div(big);
    const d = [relChange(q.r, low.r), relChange(q.v, low.v), dPhi];
    cond = cond.map((c, m) => Dec.max(c, d[m]!));
  }
  return cond;
}
