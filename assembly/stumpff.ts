// Stumpff functions c0..c3 of psi (K. Stumpff, "Himmelsmechanik", vol. 1, 1959; the universal-variable
// notation of R. H. Battin, "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 4.5):
//   c_k(psi) = sum_{j >= 0} (-psi)^j / (2j + k)!
//   psi > 0, x = sqrt(psi):   c0 = cos x,  c1 = sin x / x,  c2 = (1 - cos x) / x^2,  c3 = (x - sin x) / x^3
//   psi < 0, x = sqrt(-psi):  c0 = cosh x, c1 = sinh x / x, c2 = (cosh x - 1) / x^2, c3 = (sinh x - x) / x^3
//
// Method (all four at once; results kept in this file's scratch and read through stumpffGet):
//  1. |psi| <= STUMPFF_SERIES_MAX (= 4): c1, c2, c3 from the series, 13 terms each in Horner form (c0 from cos or
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
//  Not measured on its own (no export): measured through propagate (universal.ts) and the ends of the range in
//  tests/twobody-conservation.test.ts.
// Iteration cap: none (fixed 13-term Horner sums, no loop).

import { IS_F32 } from "./real";
import { F2, F3, F4, F5, F6, F7, F8, F9, F10, F11, F12, F13, F14, F15, F16, F17, F18, F19, F20, F21, F22, F23, F24, F25, F26, F27 } from "./factorials";

/** Largest |psi| for the series (step 1). */
const STUMPFF_SERIES_MAX: real = 4.0;
/** Beyond this x = sqrt(-psi) the exponential form (step 4) is used: e^-x is below the format's rounding. */
const EXP_FORM_X: real = IS_F32 ? <real>20.0 : <real>40.0; // f64 0x4044000000000000, f32 0x41A00000
const EXP_FORM_PSI: real = EXP_FORM_X * EXP_FORM_X;


/** Indices for stumpffGet: c0 .. c3. */
export const SC0: i32 = 0;
export const SC1: i32 = 1;
export const SC2: i32 = 2;
export const SC3: i32 = 3;

// File-private scratch: the four values of the last `stumpff` call (wasm globals, no linear memory), read by the
// caller right after the call through stumpffGet.
let c0v: real = 1;
let c1v: real = 1;
let c2v: real = 0.5;
let c3v: real = 0.16666666666666666;

/** c_i of the last `stumpff` call, i = SC0 .. SC3. */
export function stumpffGet(i: i32): real {
  return i == SC0 ? c0v : i == SC1 ? c1v : i == SC2 ? c2v : c3v;
}

// The four results, to the scratch.
function store4(c0: real, c1: real, c2: real, c3: real): void {
  c0v = c0;
  c1v = c1;
  c2v = c2;
  c3v = c3;
}

/** Computes c0(psi) .. c3(psi), read afterwards with stumpffGet(SC0 .. SC3). */
export function stumpff(psi: real): void {
  if (abs(psi) <= STUMPFF_SERIES_MAX) {
    const y = -psi;
    // c0 = cos x has a zero at psi = 2.47 inside this range: take it from cos/cosh for relative accuracy.
    const c0 = psi >= 0 ? RMath.cos(RMath.sqrt(psi)) : RMath.cosh(RMath.sqrt(y));
    const c1 = <real>1.0 + y * (F3 + y * (F5 + y * (F7 + y * (F9 + y * (F11 + y * (F13 + y * (F15 + y * (F17 + y * (F19 + y * (F21 + y * (F23 + y * F25)))))))))));
    const c2 = F2 + y * (F4 + y * (F6 + y * (F8 + y * (F10 + y * (F12 + y * (F14 + y * (F16 + y * (F18 + y * (F20 + y * (F22 + y * (F24 + y * F26)))))))))));
    const c3 = F3 + y * (F5 + y * (F7 + y * (F9 + y * (F11 + y * (F13 + y * (F15 + y * (F17 + y * (F19 + y * (F21 + y * (F23 + y * (F25 + y * F27)))))))))));
    store4(c0, c1, c2, c3);
    return;
  }
  if (psi > 0) {
    const x = RMath.sqrt(psi);
    const s = RMath.sin(x);
    const h = RMath.sin(<real>0.5 * x);
    store4(RMath.cos(x), s / x, <real>2.0 * h * h / psi, (x - s) / (psi * x));
    return;
  }
  const x = RMath.sqrt(-psi);
  if (x <= EXP_FORM_X) {
    const s = RMath.sinh(x);
    const h = RMath.sinh(<real>0.5 * x);
    store4(RMath.cosh(x), s / x, <real>2.0 * h * h / -psi, (s - x) / (-psi * x));
    return;
  }
  const t = RMath.exp(<real>0.5 * x);
  const tx = <real>0.5 * t / x;
  const c2 = tx * (t / x);
  store4(<real>0.5 * t * t, tx * t, c2, c2 / x);
}
