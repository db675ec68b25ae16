// Stumpff functions c0..c3 of psi (K. Stumpff, "Himmelsmechanik", vol. 1, 1959; the universal-variable
// notation of R. H. Battin, "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 4.5):
//   c_k(psi) = sum_{j >= 0} (-psi)^j / (2j + k)!
//   psi > 0, x = sqrt(psi):   c0 = cos x,  c1 = sin x / x,  c2 = (1 - cos x) / x^2,  c3 = (x - sin x) / x^3
//   psi < 0, x = sqrt(-psi):  c0 = cosh x, c1 = sinh x / x, c2 = (cosh x - 1) / x^2, c3 = (sinh x - x) / x^3
//
// Method (all four at once; results in the module variables C0..C3):
//  1. |psi| <= SERIES_MAX (= 4): c1, c2, c3 from the series, 13 terms each in Horner form (c0 from cos or
//     cosh of sqrt(|psi|), which keeps relative accuracy near its zero at psi = 2.47). At |psi| = 4 the first
//     omitted term of c3 is 4^13 / 29! = 7.6e-24, below 1e-22 relative; c1, c2 likewise (the largest omitted ratio is
//     1.4e-20 for c1). The sum of the absolute terms stays within a factor 4 of the sum (c1 at psi = 4), so
//     Horner's rule loses at most about 4 ulp; near psi = 0 the first term rules and the error is 1 ulp.
//  2. psi > 4 (x > 2): c0, c1 from cos and sin; c2 in the half-angle form 2 sin^2(x/2) / psi, which has no
//     cancellation; c3 = (x - sin x) / (psi x), where x - sin x >= 1.09 (one rounding of sin: <= 1 ulp).
//  3. -EXP_FORM_PSI <= psi < -4 (2 < x <= EXP_FORM_X): cosh, sinh; c2 = 2 sinh^2(x/2) / (-psi).
//  4. psi < -EXP_FORM_PSI (x > EXP_FORM_X = 40; 20 for f32): cosh x - 1 = e^x / 2 to within 2 e^-x
//     (4e-18 relative), so with t = exp(x/2): c0 = (t/2) t, c1 = (t/(2x)) t, c2 = (t/(2x)) (t/x),
//     c3 = c2 / x (the x in sinh x - x is below e^-x relative). No intermediate exceeds the result: each c_k
//     overflows only when its true value exceeds the largest real (x above about 710 for c0, 724 for c2),
//     whereas c2 formed from cosh would overflow at x = 710.5 with a true value near 1e300.
//  psi NaN gives NaN (callers check their inputs). Relative accuracy on every branch: a few ulp; the
//  conditioning of c_k in psi (|psi c_k'/c_k|, large near the zeros of c0, c1, c2 at psi > 0) comes on top.

import { IS_F32 } from "./real";

export let C0: real = 1;
export let C1: real = 1;
export let C2: real = 0.5;
export let C3: real = 0.16666666666666666;

/** Largest |psi| for the series (step 1). */
const SERIES_MAX: real = 4.0;
/** Beyond this x = sqrt(-psi) the exponential form (step 4) is used: e^-x is below the format's rounding. */
const EXP_FORM_X: real = IS_F32 ? <real>20.0 : <real>40.0;
const EXP_FORM_PSI: real = EXP_FORM_X * EXP_FORM_X;

// 1/n! rounded to the format, n = 2 .. 27.
const F2: real = <real>0.5;
const F3: real = <real>0.16666666666666666;
const F4: real = <real>0.041666666666666664;
const F5: real = <real>0.008333333333333333;
const F6: real = <real>0.001388888888888889;
const F7: real = <real>0.0001984126984126984;
const F8: real = <real>2.48015873015873e-5;
const F9: real = <real>2.7557319223985893e-6;
const F10: real = <real>2.755731922398589e-7;
const F11: real = <real>2.505210838544172e-8;
const F12: real = <real>2.08767569878681e-9;
const F13: real = <real>1.6059043836821613e-10;
const F14: real = <real>1.1470745597729725e-11;
const F15: real = <real>7.647163731819816e-13;
const F16: real = <real>4.779477332387385e-14;
const F17: real = <real>2.8114572543455206e-15;
const F18: real = <real>1.5619206968586225e-16;
const F19: real = <real>8.22063524662433e-18;
const F20: real = <real>4.110317623312165e-19;
const F21: real = <real>1.9572941063391263e-20;
const F22: real = <real>8.896791392450574e-22;
const F23: real = <real>3.868170170630684e-23;
const F24: real = <real>1.6117375710961184e-24;
const F25: real = <real>6.446950284384474e-26;
const F26: real = <real>2.4795962632247976e-27;
const F27: real = <real>9.183689863795546e-29;

/** Sets C0, C1, C2, C3 to the Stumpff functions of psi. */
export function stumpff(psi: real): void {
  if (abs(psi) <= SERIES_MAX) {
    const y = -psi;
    // c0 = cos x has a zero at psi = 2.47 inside this range: take it from cos/cosh for relative accuracy.
    C0 = psi >= 0 ? RMath.cos(RMath.sqrt(psi)) : RMath.cosh(RMath.sqrt(y));
    C1 = <real>1.0 + y * (F3 + y * (F5 + y * (F7 + y * (F9 + y * (F11 + y * (F13 + y * (F15 + y * (F17 + y * (F19 + y * (F21 + y * (F23 + y * F25)))))))))));
    C2 = F2 + y * (F4 + y * (F6 + y * (F8 + y * (F10 + y * (F12 + y * (F14 + y * (F16 + y * (F18 + y * (F20 + y * (F22 + y * (F24 + y * F26)))))))))));
    C3 = F3 + y * (F5 + y * (F7 + y * (F9 + y * (F11 + y * (F13 + y * (F15 + y * (F17 + y * (F19 + y * (F21 + y * (F23 + y * (F25 + y * F27)))))))))));
    return;
  }
  if (psi > 0) {
    const x = RMath.sqrt(psi);
    const s = RMath.sin(x);
    const h = RMath.sin(<real>0.5 * x);
    C0 = RMath.cos(x);
    C1 = s / x;
    C2 = <real>2.0 * h * h / psi;
    C3 = (x - s) / (psi * x);
    return;
  }
  const x = RMath.sqrt(-psi);
  if (x <= EXP_FORM_X) {
    const s = RMath.sinh(x);
    const h = RMath.sinh(<real>0.5 * x);
    C0 = RMath.cosh(x);
    C1 = s / x;
    C2 = <real>2.0 * h * h / -psi;
    C3 = (s - x) / (-psi * x);
    return;
  }
  const t = RMath.exp(<real>0.5 * x);
  const tx = <real>0.5 * t / x;
  C0 = <real>0.5 * t * t;
  C1 = tx * t;
  C2 = tx * (t / x);
  C3 = C2 / x;
}
