// Kepler's equation for the hyperbola: find H with e sinh H - H = M, e > 1, M any finite real.
// H has the sign of M; the kernel solves for |M| and restores the sign.
//
// Method
//  1. Special cases, in order: NaN or infinite input -> ERR_NONFINITE; e <= 1 -> ERR_DOMAIN; M = 0 -> H = M.
//     |M| < KEPLER_LINEAR_MAX (real.ts): H = M / (e - 1), one correctly rounded division.
//  2. Starter. The cubic (e - 1) H + (e / 6) H^3 = M (sinh H - H >= H^3 / 6, so its root is an upper
//     bound) solved in Cardano's form H = 2b / (t^2 + p + p^2 / t^2), t^3 = b + sqrt(b^2 + p^3), which has
//     no cancellation, written 2b t^2 / (t^2 (t^2 + p) + p^2) (one division) with t^2 = X^(2/3) from the short
//     power of kepler_elliptic.ts (invCbrt2: a bit-trick seed and a binomial series, 1.5e-6 relative, no cube
//     root call); used when that root is below CUBIC_MAX. Otherwise the lower bound
//     h2 = asinh((M + asinh(M / e)) / e) (from e sinh H = M + H >= M + asinh(M / e)), each asinh as
//     ln(y + sqrt(y^2 + 1)) (ln y + ln 2 for y >= 2^27): one log and one sqrt, no library asinh.
//     The cubic starter is the one in the numerics notes; compare A. W. Odell and R. H. Gooding,
//     "Procedures for solving Kepler's equation", Celest. Mech. 38 (1986) 307-334.
//  3. Small H (<= LOG_FORM_H), on f = (e - 1) H + e (sinh H - H) - M (series for sinh H - H when H <= 1; e - 1
//     exact for e <= 2), f' = (e - 1) + e (cosh H - 1), cosh H - 1 = sinh^2 H / (cosh H + 1): the first step is
//     the quartic step of Danby and Burkardt (1983) (nested denominators: bounded however far the starter is);
//     later steps are the fifth-order series reversion of f(H + d) = 0 with one division (Householder's method
//     of order five, as in kepler_elliptic.ts): d = -u (1 + A u + (2A^2 - B) u^2 + (5A^3 - 5AB + C) u^3),
//     u = f / f', A = f''/2f', B = f'''/6f', C = f''''/24f'.
//     Large H: Newton on g = ln(e sinh H) - ln(M + H), nearly linear in H, with
//     ln(e sinh H) = ln e + H - ln 2 + log1p(-exp(-2H)): no sinh or cosh is formed, so nothing overflows for
//     any finite M and e (M up to 1.8e308 gives H about 710); ln e - ln(M + H) is taken as ln(e / (M + H))
//     while that ratio is normal, so huge e and M do not leave an ulp of ln e (~600) in H.
//     e > HUGE_E: the small-H residual and its derivatives are divided through by e (no e cosh H overflow).
//  4. Stop when the step is below HYPERBOLIC_STOP_REL * H (2^-14 after a quartic or Newton step: the error left is
//     about its fourth power) or HYPERBOLIC_STOP_REL_5 * H (2^-11 after a fifth-order step: (2^-11)^5 = 2^-55);
//     at most HYPERBOLIC_MAX_ITER steps, else ERR_NOT_CONVERGED.
//
// Output slots: 0 = H, 1 = iterations.
// Iteration cap: HYPERBOLIC_MAX_ITER (8) steps, else ERR_NOT_CONVERGED (never reached on the vectors or in fuzzing).
// Accuracy (release f64 build, vectors/kepler-hyperbolic.csv: 5,000 cases, e from 1 + 2^-52 to 1e6, |M| to
// 1.8e308, 60-digit references; `areal check -v`, 2026-12): at most 2 ulp from the correctly rounded root (worst
// seen: e = 1.1, M = 0.5, got 1.2386528267356203, want ...198); at most 3 steps (histogram 0:470 1:3579 2:950
// 3:103 over the 5,102 rows). f32 build: 2 ulp on kepler-hyperbolic-f32in. Limits in vectors/limits.json.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_NOT_CONVERGED } from "./status";
import { put, got } from "./io";
import { IS_F32, MIN_NORMAL, SIXTH, TWENTYFOURTH, LN2, KEPLER_LINEAR_MAX } from "./real";
import { ODD_SERIES_MAX, sinhMinusXSeries, reversionStep5 } from "./series";
import { invCbrt2 } from "./kepler_elliptic";

export const HYPERBOLIC_MAX_ITER: i32 = 8;
/** Stop rule after a quartic (or Newton) step: a step of 2^-14 H leaves about (2^-14)^4 = 2^-56 relative. */
const HYPERBOLIC_STOP_REL: real = IS_F32 ? <real>0.001953125 : <real>0.00006103515625; // 2^-9, 2^-14; f64 0x3F10000000000000, f32 0x3B000000
/**
 * Stop rule after a fifth-order step: a step of 2^-11 H leaves about (2^-11)^5 = 2^-55 relative (f32: 2^-9).
 */
const HYPERBOLIC_STOP_REL_5: real = IS_F32 ? <real>0.001953125 : <real>0.00048828125; // 2^-9, 2^-11; f64 0x3F40000000000000, f32 0x3B000000
/** Newton on the logarithmic form beyond this H (there exp(-2H) < 1e-17 and sinh H > 2e8). */
const LOG_FORM_H: real = 20.0;
/** The cubic starter is used below this H (there it is within 9% of the root; beyond, the asinh bound is closer). */
const CUBIC_MAX: real = 2.2; // f64 0x400199999999999A, f32 0x400CCCCD
/** asinhRough's switch to ln y + ln 2: 2^27 (f64), 2^13 (f32), where y^2 + 1 rounds to y^2. */
const ASINH_LOG_FORM: real = IS_F32 ? <real>8192.0 : <real>134217728.0; // 2^13, 2^27; f64 0x41A0000000000000, f32 0x46000000
/** Above this e the small-H residual is evaluated divided through by e (2^1000, 2^120). */
const HUGE_E: real = IS_F32 ? <real>1.329227995784916e36 : <real>1.0715086071862673e301; // f64 0x7E70000000000000, f32 0x7B800000

/** Solve e sinh H - H = M. Writes H to slot 0 and the step count to slot 1. */
export function kepler_hyperbolic(e: real, M: real): i32 {
  put(1, 0);
  if (!isFinite(e) || !isFinite(M)) return ERR_NONFINITE;
  if (!(e > 1)) return ERR_DOMAIN;
  if (M == 0) {
    put(0, M);
    return OK;
  }
  const m = abs(M);
  if (solvePositive(e, m) != OK) {
    put(1, <real>HYPERBOLIC_MAX_ITER);
    return ERR_NOT_CONVERGED;
  }
  const H = got(0); // the step count is in slot 1
  if (!isFinite(H)) return ERR_NOT_CONVERGED; // not reachable for finite inputs (H <= ~711); no OK with non-finite
  put(0, M < 0 ? -H : H);
  return OK;
}

function starter(e: real, em1: real, m: real): real {
  // Cubic: H^3 + 3p H - 2b = 0 with 3p = 6 (e - 1) / e, 2b = 6 m / e.
  const p = <real>2.0 * em1 / e;
  const b = <real>3.0 * m / e;
  if (b < <real>1.0) {
    const X = b + RMath.sqrt(b * b + p * p * p);
    if (X >= MIN_NORMAL) {
      // t^2 = X^(2/3) is all the formula needs: the short power of kepler_elliptic.ts (1.5e-6 relative, no cube
      // root call; a starter within 9% needs no more), and 2b / (t^2 + p + p^2 / t^2) with one division.
      const t2 = invCbrt2(X);
      const Hc = (<real>2.0 * b * t2) / (t2 * (t2 + p) + p * p);
      if (Hc < CUBIC_MAX && Hc > 0) return Hc;
    }
  }
  const h1 = asinhRough(m / e);
  return asinhRough((m + h1) / e);
}

// asinh y for y >= 0, to a few ulp, for the starter: ln(y + sqrt(y^2 + 1)) (one log, one sqrt, no division),
// ln y + ln 2 beyond ASINH_LOG_FORM (there y^2 + 1 rounds to y^2; also keeps y^2 from overflowing).
function asinhRough(y: real): real {
  let h: real;
  if (y < ASINH_LOG_FORM) {
    h = RMath.log(y + RMath.sqrt(y * y + <real>1.0));
  } else {
    h = RMath.log(y) + LN2;
  }
  return h;
}

// Root H > 0 of e sinh H - H = m for m > 0: OK with H in slot 0 and the step count in slot 1, or
// ERR_NOT_CONVERGED (nothing written) when the cap is reached.
function solvePositive(e: real, m: real): i32 {
  const em1 = e - <real>1.0;
  if (m < KEPLER_LINEAR_MAX) {
    put(0, m / em1);
    put(1, 0);
    return OK;
  }
  let H = starter(e, em1, m);
  if (!(H > 0)) H = m / em1 < <real>1.0 ? m / em1 : <real>1.0; // underflowed starter: linear regime
  // For e near the top of the range, e cosh H overflows although the root is moderate: the equation is then
  // divided through by e (the steps are ratios, unchanged); below HUGE_E nothing is scaled, bit for bit.
  const scaled = e > HUGE_E;
  const es: real = scaled ? <real>1.0 : e;
  const ems: real = scaled ? em1 / e : em1;
  const ms: real = scaled ? m / e : m;
  for (let it = 1; it <= HYPERBOLIC_MAX_ITER; it++) {
    let step: real;
    let stopRel = HYPERBOLIC_STOP_REL; // HYPERBOLIC_STOP_REL_5 after a fifth-order step
    if (H > LOG_FORM_H) {
      // g = ln e - ln(M + H) + H - ln 2 + log1p(-exp(-2H)). With e and M both huge the two logarithms are
      // large and nearly equal; take them as one logarithm of the ratio while the ratio is a normal real.
      const ratio = e / (m + H);
      const lnRatio = ratio >= MIN_NORMAL ? RMath.log(ratio) : RMath.log(e) - RMath.log(m + H); // ln e only here
      const g = (H - LN2 + RMath.log1p(-RMath.exp(<real>-2.0 * H))) + lnRatio;
      const g1 = <real>1.0 / RMath.tanh(H) - <real>1.0 / (m + H);
      step = -g / g1;
    } else {
      const sh = RMath.sinh(H);
      const ch = RMath.sqrt(<real>1.0 + sh * sh);
      const shm = H <= ODD_SERIES_MAX ? sinhMinusXSeries(H) : sh - H;
      const f0 = (ems * H + es * shm) - ms;
      const f2 = es * sh;
      const f3 = es * ch;
      if (it == 1) {
        // First step from the starter (within about 9% of the root): Danby and Burkardt's quartic, whose nested
        // denominators stay bounded however far the starter is.
        const f1 = ems + es * (sh * sh / (ch + <real>1.0));
        const d1 = -f0 / f1;
        const d2 = -f0 / (f1 + <real>0.5 * d1 * f2);
        step = -f0 / (f1 + <real>0.5 * d2 * f2 + d2 * d2 * f3 * SIXTH);
      } else {
        // Later steps (|u| small): the fifth-order series reversion of f(H + d) = 0 with one division,
        // d = -u (1 + A u + (2A^2 - B) u^2 + (5A^3 - 5AB + C) u^3), u = f / f', A = f''/2f', B = f'''/6f',
        // C = f''''/24f' (f'''' = e sinh H), as in kepler_elliptic.ts; 1 / f' = (cosh H + 1) / ((e - 1)(cosh H + 1)
        // + e sinh^2 H).
        const chp = ch + <real>1.0;
        const r = chp / (ems * chp + es * (sh * sh));
        const u = f0 * r;
        const A = <real>0.5 * f2 * r;
        const B = SIXTH * f3 * r;
        const C = TWENTYFOURTH * f2 * r;
        step = reversionStep5(u, A, B, C);
        stopRel = HYPERBOLIC_STOP_REL_5;
      }
    }
    let Hn = H + step;
    if (!(Hn > 0)) Hn = H * <real>0.25; // stay on the positive branch (the root is positive)
    const moved = abs(Hn - H);
    H = Hn;
    if (moved <= stopRel * H) {
      put(0, H);
      put(1, <real>it);
      return OK;
    }
  }
  return ERR_NOT_CONVERGED;
}
