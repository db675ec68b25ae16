// Kepler's equation for the ellipse: find E with E - e sin E = M, 0 <= e < 1, M any finite real.
//
// Method
//  1. Special cases, in order: NaN or infinite input -> ERR_NONFINITE; e outside [0, 1) -> ERR_DOMAIN;
//     e = 0 or M = 0 -> E = M (keeps the sign of a zero); |M| >= 2^53 -> E = M (every real there is an even integer and |E - M| <= e < 1,
//     so M is the correctly rounded root).
//  2. Remove whole turns exactly: M = 2 pi k + m, m a double-real (reduce.ts). By symmetry solve for |m|.
//  3. Starter: F. L. Markley, "Kepler equation solver", Celest. Mech. Dyn. Astron. 63 (1995) 101-111:
//     sin E is replaced by a Pade approximant whose parameter alpha depends on M, and the resulting cubic is
//     solved in closed form (one sqrt, one cbrt).
//  4. Correction: one fifth-order step, the series reversion of f(E + d) = 0 in u = f/f' (Householder's
//     method of order five; J. M. A. Danby and T. M. Burkardt, "The solution of Kepler's equation, I",
//     Celest. Mech. 31 (1983) 95-107, give the same order as nested denominators; the reversion needs one
//     division instead of four): d = -u (1 + A u + (2A^2 - B) u^2 + (5A^3 - 5AB + C) u^3), A = f''/2f',
//     B = f'''/6f', C = f''''/24f'. Repeated until the step is below ELLIPTIC_STOP_REL * E (in practice once: see
//     ELLIPTIC_STOP_REL); at most ELLIPTIC_MAX_ITER steps, else ERR_NOT_CONVERGED. sin E and cos E come from one
//     sincos call (one argument reduction).
//     The residual is written f = (1 - e) E + e (E - sin E) - m, with 1 - e exact for e >= 1/2 (Sterbenz),
//     E - sin E from its series for E <= 1 (series.ts), and f' = (1 - e) + e (1 - cos E) with
//     1 - cos E = sin^2 E / (1 + cos E) while cos E > 0: no term cancels near the e -> 1, M -> 0 corner,
//     which a naive E - e sin E - M would limit to eps * sqrt(2 / (1 - e)) (see the numerics notes).
//     Below KEPLER_LINEAR_MAX (real.ts) the root is (m / (1 - e)) itself, one correctly rounded division.
//  5. k = 0: E is the solution itself. k != 0: E = M + (E_m - m), so no rounding of 2 pi k enters.
//
// Output slots: 0 = E, 1 = iterations (correction steps applied).
// Accuracy (release f64 build, vectors/kepler-elliptic.csv: 20,000 cases, 8,000 of them in the e -> 1,
// |M| <= 0.0045 corner, 60-digit references): at most 2 ulp from the correctly rounded root (worst seen:
// e = 0.9942203547418457, M = 8.564242880876716e-8, got 1.4817938548876369e-5, want ...372e-5), one
// correction step on every case; limits in vectors/limits.json. Error budget: ~1.5 ulp from the residual,
// ~1 ulp from sin for E > 1, 0.5 ulp from the last addition.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_NOT_CONVERGED } from "./status";
import { put, got } from "./io";
import { IS_F32, INTEGER_LIMIT, PI, EPS, SIXTH, TWENTYFOURTH, KEPLER_LINEAR_MAX } from "./real";
import { reduceTurns, reducedLo, reducedTurns } from "./reduce";
import { ODD_SERIES_MAX, xMinusSinSeries } from "./series";

/** Iteration cap of the correction loop. */
export const ELLIPTIC_MAX_ITER: i32 = 6;
/**
 * Stop once a step is below this fraction of E. The step is of fifth order, so a step of 2^-11 E leaves an
 * error of about (2^-11)^5 = 2^-55 relative, below half an ulp (f32: 2^-9 leaves 2^-45). Markley's starter is
 * within 2^-11 of the root on every case measured (3e6 random cases, every vector case), so one step is the rule
 * and a second step happens only for a starter worse than any seen.
 */
const ELLIPTIC_STOP_REL: real = IS_F32 ? <real>0.001953125 : <real>0.00048828125; // 2^-9, 2^-11; f64 0x3F40000000000000, f32 0x3B000000
// Markley's constants: 3 pi^2, 1.6 pi, pi^2 - 6 (the first and last one ulp from the correctly rounded values,
// tests/kernels-constants.test.ts; they only shape the starter, which the correction step polishes).
const THREE_PI_SQ: real = <real>29.608813203268074; // f64 0x403D9BDB2E9D68CD, f32 0x41ECDED9
const PI_1_6: real = <real>5.026548245743669; // f64 0x40141B2F769CF0E0, f32 0x40A0D97C
const PI_SQ_MINUS_6: real = <real>3.869604401089358; // f64 0x400EF4F326F91778, f32 0x4077A799

/** Solve E - e sin E = M. Writes E to slot 0 and the step count to slot 1. */
export function kepler_elliptic(e: real, M: real): i32 {
  put(1, 0);
  if (!isFinite(e) || !isFinite(M)) return ERR_NONFINITE;
  if (!(e >= 0 && e < 1)) return ERR_DOMAIN;
  if (e == 0 || M == 0 || abs(M) >= INTEGER_LIMIT) {
    put(0, M);
    return OK;
  }
  const mh0 = reduceTurns(M);
  const ml0 = reducedLo();
  const k = reducedTurns();
  const neg = mh0 < 0;
  const mh = neg ? -mh0 : mh0;
  const ml = neg ? -ml0 : ml0;
  let E: real = 0;
  let iterations: real = 0;
  if (mh != 0) {
    if (solveReduced(e, mh, ml) != OK) {
      put(1, <real>ELLIPTIC_MAX_ITER);
      return ERR_NOT_CONVERGED;
    }
    E = got(0);
    iterations = got(1);
  }
  let out: real;
  if (k == 0) {
    out = neg ? -E : E;
  } else {
    const d = (E - mh) - ml; // = e sin E_m, exact subtraction when E and mh are within a factor 2
    out = M + (neg ? -d : d);
  }
  // Cannot trigger for finite inputs (|E - M| <= e); kept so that no path returns OK with a non-finite value.
  if (!isFinite(out)) return ERR_NOT_CONVERGED;
  assert(abs(out - M) <= e + abs(M) * EPS, "root outside |E - M| <= e"); // debug build only
  put(0, out);
  put(1, iterations);
  return OK;
}

// Root of (1 - e) E + e (E - sin E) = mh + ml for 0 < mh <= ~pi, 0 < e < 1: OK with E in slot 0 and the step
// count in slot 1, or ERR_NOT_CONVERGED (nothing written) when the cap is reached.
function solveReduced(e: real, mh: real, ml: real): i32 {
  const q: real = <real>1.0 - e;
  if (mh < KEPLER_LINEAR_MAX) {
    put(0, (mh + ml) / q);
    put(1, 0);
    return OK;
  }
  // Markley (1995) starter.
  const ope = <real>1.0 + e;
  const alpha = (THREE_PI_SQ * ope + PI_1_6 * (PI - mh)) / (PI_SQ_MINUS_6 * ope); // one division
  const d = <real>3.0 * q + alpha * e;
  const qq = <real>2.0 * alpha * d * q - mh * mh;
  const r = <real>3.0 * alpha * d * (d - q) * mh + mh * mh * mh;
  const w0 = RMath.cbrt(abs(r) + RMath.sqrt(qq * qq * qq + r * r));
  const w = w0 * w0;
  const den = w * w + w * qq + qq * qq;
  let E = (<real>2.0 * r * w + mh * den) / (d * den); // one division
  if (!(E > 0 && E <= <real>4.0)) E = mh + <real>0.85 * e; // Danby-Burkardt fallback; not expected
  for (let it = 1; it <= ELLIPTIC_MAX_ITER; it++) {
    RMath.sincos(E); // one argument reduction for both
    const s = RMath.sincos_sin;
    const c = RMath.sincos_cos;
    const es = E <= ODD_SERIES_MAX ? xMinusSinSeries(E) : E - s;
    const f0 = (q * E + e * es - mh) - ml;
    const omc = c > 0 ? s * s / (<real>1.0 + c) : <real>1.0 - c;
    const f1 = q + e * omc;
    const f2 = e * s;
    const f3 = e * c;
    // Series reversion of f(E + d) = 0 to fifth order: one division instead of a chain of four.
    const r1 = <real>1.0 / f1;
    const u = f0 * r1;
    const A = <real>0.5 * f2 * r1;
    const B = SIXTH * f3 * r1;
    const C = -TWENTYFOURTH * f2 * r1; // f'''' = -e sin E
    const d4 = -u * (<real>1.0 + u * (A + u * ((<real>2.0 * A * A - B) + u * (A * (<real>5.0 * A * A - <real>5.0 * B) + C))));
    E += d4;
    if (abs(d4) <= ELLIPTIC_STOP_REL * E) {
      put(0, E);
      put(1, <real>it);
      return OK;
    }
  }
  return ERR_NOT_CONVERGED;
}
