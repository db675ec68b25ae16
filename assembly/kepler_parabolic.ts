// Barker's equation for the parabola, in closed form.
//
// Normalisation: D = tan(nu / 2) (the parabolic anomaly) and M = D + D^3 / 3, where
// M = sqrt(mu / (2 q^3)) (t - t_p) = 2 sqrt(mu / p^3) (t - t_p), q the periapsis distance, p = 2 q the
// semi-latus rectum, t_p the time of periapsis passage.
//
// Method
//  1. Special cases: NaN or infinite M -> ERR_NONFINITE; M = 0 -> D = M.
//  2. D^3 + 3 D - 3 M = 0 has one real root. With b = 3|M| / 2 and t = cbrt(b + sqrt(b^2 + 1)),
//     D = t - 1 / t = 2 b / (t^2 + 1 + 1 / t^2) (the second form has no cancellation for small M).
//     sqrt(b^2 + 1) is taken as hypot(b, 1) so nothing overflows below 2^1024 / 1.5.
//     For |M| > HUGE_M, D = cbrt(3) cbrt(|M|) (the linear term is below 1e-190 relative there).
//  3. One Newton step on D^3 + 3 D - 3 M polishes the last bits (iterations = 1).
//  4. nu = 2 atan(D).
//
// Source: Barker's equation and its cubic solution in closed form are textbook material (e.g. R. H. Battin,
// "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 4.3; recalled from memory).
// Output slots: 0 = D, 1 = iterations, 2 = nu (radians, in (-pi, pi)).
// Iteration cap: none, a closed form plus exactly one Newton polish (none above HUGE_M).
// Accuracy (release f64 build, vectors/kepler-parabolic.csv: 1,000 cases, 70-digit references; `areal check -v`,
// 2026-12): at most 1 ulp (worst seen: M = 3.022314549036573e+23, got 96787730.26781829, want 96787730.2678183).

import { OK, ERR_NONFINITE } from "./status";
import { put } from "./io";
import { IS_F32 } from "./real";

/** Above this |M| the closed form switches to cbrt(3 M) (f64: 1e300; f32: 1e36). */
const HUGE_M: real = IS_F32 ? <real>1e36 : <real>1e300; // f64 0x7E37E43C8800759C, f32 0x7B4097CE
const CBRT_3: real = <real>1.4422495703074083; // f64 0x3FF7137449123EF6, f32 0x3FB89BA2

/** Solve D + D^3 / 3 = M. */
export function kepler_parabolic(M: real): i32 {
  put(1, 0);
  if (!isFinite(M)) return ERR_NONFINITE;
  if (M == 0) {
    put(0, M);
    put(2, M);
    return OK;
  }
  const m = abs(M);
  let D: real;
  if (m > HUGE_M) {
    D = CBRT_3 * RMath.cbrt(m);
    put(1, 0);
  } else {
    const b = <real>1.5 * m;
    const t = RMath.cbrt(b + RMath.hypot(b, <real>1.0));
    const t2 = t * t;
    D = (<real>2.0 * b) / (t2 + <real>1.0 + <real>1.0 / t2);
    // Newton polish: g = D (D^2 + 3) - 3m, g' = 3 (D^2 + 1).
    const D2 = D * D;
    const g = D * (D2 + <real>3.0) - <real>3.0 * m;
    D -= g / (<real>3.0 * (D2 + <real>1.0));
    put(1, 1);
  }
  const signed = M < 0 ? -D : D;
  put(0, signed);
  put(2, <real>2.0 * RMath.atan(signed));
  return OK;
}
