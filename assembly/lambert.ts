// Lambert's problem: the velocities v1 at r1 and v2 at r2 of the two-body orbit that goes from r1 to r2 in the
// time of flight tof, with N complete revolutions on the way, moving prograde (angular momentum with a positive
// z component) or retrograde.
//
// Method: D. Izzo, "Revisiting Lambert's problem", Celest. Mech. Dyn. Astron. 121 (2015) 1-15.
//  1. Special cases, in order: a NaN or infinite input -> ERR_NONFINITE; mu <= 0, tof <= 0, r1 or r2 of zero
//     length, revs < 0, retrograde or branch not 0 or 1 -> ERR_DOMAIN; r1 and r2 collinear to within the rounding
//     (|i1 x i2| = sin of the transfer angle at most PLANE_MIN_SIN: the 0 and 180 degree transfers, whose plane is
//     undefined) -> ERR_DEGENERATE. What "undefined" means: inputs that are collinear before rounding to doubles
//     (r2 = k r1 rounded componentwise, any k) give a computed sin of at most 1.5 u (f32: 2.0 u, u the unit
//     roundoff; measured over 2 million random pairs), so below 8 u the direction of i1 x i2 may be the rounding's
//     and not the inputs' plane. PLANE_MIN_SIN = 8 u = 2^-50 (f32 2^-21): about 5.1e-14 degrees (f32 2.7e-5).
//     Above it the transfer is solved, as accurately as its conditioning allows (near 0 and 360 degrees with
//     r1 != r2 the velocities are nearly radial and the plane barely matters; near 180 degrees it matters a lot).
//  2. Geometry, scale-free and without cancellation at any transfer angle theta: unit vectors i1, i2 along r1, r2,
//     sin theta = |i1 x i2|, cos theta = i1.i2, and 1 + cos theta, 1 - cos theta each from the one that does not
//     cancel and (1 + cos)(1 - cos) = sin^2. Chord c = |r2 - r1| from the differences of the components (each
//     exact to rounding), semi-perimeter s = (r1 + r2 + c) / 2, s - c = r1 r2 (1 + cos theta) / (r1 + r2 + c),
//     lambda^2 = (s - c) / s, 1 - lambda^2 = c / s. lambda < 0 when the motion asked for goes the long way
//     (transfer angle above 180 degrees). Normalized time T = tof sqrt(2 mu / s) / s.
//  3. Time of flight as a function of Izzo's x (x^2 = 1 - s / (2a); -1 < x < 1 ellipses, x = 1 the parabola,
//     x > 1 hyperbolas): T(x) = [(psi + N pi) / sqrt(1 - x^2) - x + lambda y] / (1 - x^2),
//     y = sqrt(1 - lambda^2 (1 - x^2)), psi from atan2 (ellipse) or asinh (hyperbola), each of lambda y - x,
//     y - lambda x, y + lambda x formed without cancellation (y^2 - lambda^2 x^2 = 1 - lambda^2). With N = 0 and
//     |x - 1| < BATTIN_MAX it comes from Battin's hypergeometric series instead (R. H. Battin, "An Introduction
//     to the Mathematics and Methods of Astrodynamics", 1987; the form Izzo 2015 uses), where the closed form
//     cancels: T = (eta^3 Q + 4 lambda eta) / 2, eta = y - lambda x, Q = 4/3 F(3, 1; 5/2; (1 - lambda - x eta) / 2).
//  4. Iteration on x: Householder's fourth-order step with Izzo's recurrences for T', T'', T''' (Newton's step
//     with the series derivative within NEAR_PARABOLA of x = 1), kept inside a bracket that shrinks with the sign
//     of T(x) - T, bisection when a step leaves it. Starters: Izzo's (2015, sec. 3.2). Stop when a step is below
//     STOP_STEP (Householder; the next error is then of the order of its fourth power) or STOP_STEP_NEWTON,
//     relative to the distance to x = -1 (and to x = 1 when N >= 1), where T runs off to infinity.
//     At most LAMBERT_MAX_ITER steps, else ERR_NOT_CONVERGED.
//  5. N >= 1: T(x) has one minimum on (-1, 1), at x_min > 0 (T'(0) = -2). When T < T(0) the minimum is found
//     (Halley's method on T'(x) = 0 from x = 0, at most LAMBERT_MIN_MAX_ITER steps); T < T(x_min) ->
//     ERR_NO_SOLUTION. The two solutions are the two branches (names ours):
//       branch 0, "short-period": x < x_min, the solution with the smaller semi-major axis (Izzo's "left");
//       branch 1, "long-period":  x > x_min, the solution with the larger semi-major axis (Izzo's "right").
//     (With a = s / (2 (1 - x^2)): for T below T(0) both roots are in (0, 1) and the left one is nearer 0;
//     above T(0) the left root x_l < 0 satisfies T(|x_l|) < T(x_l) = T, so the right root lies beyond |x_l|.)
//  6. Velocities from x (Izzo 2015, Algorithm 1): radial and tangential components at both ends, with Izzo's
//     rho = (r1 - r2) / c entering only as 1 + rho = (c + d) / c and 1 - rho = (c - d) / c, d = r1 - r2, the
//     smaller of c + d, c - d from (c + d)(c - d) = c^2 - d^2 = 2 r1 r2 (1 - cos theta): as theta goes to 0 or 360
//     degrees the chord turns radial, rho goes to -1 or 1, and sigma = sqrt(1 - rho^2) = sqrt((1 + rho)(1 - rho))
//     (the transverse speed's factor) keeps full relative accuracy. Directions: i1, i2 and n x i1, n x i2 with
//     n = +-(i1 x i2) / sin theta, the normal of the motion.
//
// Domain: finite inputs with |r1|, |r2| between about 1e-150 and 1e150 (the squares of their components must not
// underflow or overflow; else ERR_DOMAIN or ERR_OVERFLOW; f32 about 1e-18 to 1e18), any mu > 0, tof > 0, revs >= 0,
// transfer angles down to PLANE_MIN_SIN from 0 and 180 degrees. When r1 x r2 has a zero z component the transfer
// plane contains the z axis and "prograde" is taken to mean the short way (motion about r1 x r2).
// Status ERR_OVERFLOW when a result is not finite.
//
// Output slots: 0-2 = v1, 3-5 = v2, 6 = iterations (steps on x plus the Halley steps spent finding x_min).
// Accuracy (release f64 build, vectors/lambert.csv: 1144 cases, 0 to 5 revolutions, ellipses, hyperbolas, the
// near-parabolic band, and the edges of the transfer angle: 1e-9 to 0.1 degree from 0 and 360 degrees, 1e-7 to 0.1
// degree from 180, revs 0 to 3, both branches, both senses, random frames; 50-digit references by the p-iteration
// and shooting, harness/reference/lambert.ts): |v - v_ref| / |v_ref| at most 1.3e-14 (v1) and 7.6e-14 (v2, of a
// one-revolution transfer 0.1 degree short of 360 whose v2 conditioning is 1.6e-13) away from 180 degrees, and at
// most 5.6 times the problem's own conditioning everywhere (next to 180 degrees 5.1e-8 at a conditioning of 1.0e-7,
// 1e-7 degree off). Worst seen against the conditioning: v1 of a hyperbola, mu = 398600.4418, r1 =
// (-6552.095814906167, -19896.847225730493, 26983.55043029272), r2 = (12159.391809338778, 1020.1495826615759,
// -575.3802157971982), tof = 5996.052341872337, prograde: 2.2e-15 at a conditioning of 3.9e-16. At most 8
// iterations (mean 2.8). Before the rewrite for the edges, sigma came from 1 - rho^2 formed by subtraction, of the order of theta^2
// near 0 and 360 degrees: v lost about 1e-17 / theta relative (6.7e-10 at 1e-6 degree); tests/lambert-edges.test.ts.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_NOT_CONVERGED, ERR_DEGENERATE, ERR_NO_SOLUTION, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { IS_F32, EPS, PI } from "./real";
import { BRANCH_SHORT_PERIOD, BRANCH_LONG_PERIOD, LAMBERT_V1X, LAMBERT_V1Y, LAMBERT_V1Z, LAMBERT_V2X, LAMBERT_V2Y, LAMBERT_V2Z, LAMBERT_ITERATIONS } from "./abi";

/** Cap on the steps solving T(x) = T. */
export const LAMBERT_MAX_ITER: i32 = 30;
/** Cap on the Halley steps locating the minimum time of a multi-revolution transfer. */
export const LAMBERT_MIN_MAX_ITER: i32 = 20;
/** Cap on the terms of the hypergeometric series (|S1| <= 0.25 in its region: 2^-53 after 30 terms). */
const SERIES_MAX_TERMS: i32 = 60;

/** At or below this sin(transfer angle) the plane of r1 and r2 is undefined: 8 unit roundoffs (header, step 1). */
const PLANE_MIN_SIN: real = IS_F32 ? <real>4.76837158203125e-7 : <real>8.881784197001252e-16; // 2^-21, 2^-50
/** With N = 0, T(x) comes from Battin's series for |x - 1| below this (the closed form cancels there). */
const BATTIN_MAX: real = <real>0.125;
/** Within this |1 - x^2| of the parabola Izzo's derivative recurrences divide a cancelled numerator: Newton only. */
const NEAR_PARABOLA: real = <real>6.103515625e-5; // 2^-14
/** Stop after a Householder step below this (relative to max(1, |x|)): the next error is about its 4th power. */
const STOP_STEP: real = IS_F32 ? <real>2.44140625e-4 : <real>5.960464477539063e-8; // 2^-12, 2^-24
/** Stop after a Newton step below this: the next error is about its square. */
const STOP_STEP_NEWTON: real = IS_F32 ? <real>6.103515625e-5 : <real>9.094947017729282e-13; // 2^-14, 2^-40
/** Stop the Halley search for x_min after a step below this (its error is then about the cube). */
const STOP_MIN: real = IS_F32 ? <real>2.44140625e-4 : <real>1.4901161193847656e-8; // 2^-12, 2^-26
const LN2: real = <real>0.6931471805599453;
const TWO_THIRDS: real = <real>0.6666666666666666;
const FOUR_THIRDS: real = <real>1.3333333333333333;

// File-private scratch (nothing here is exported; a WebAssembly instance runs one call at a time). Scalars only,
// so that the kernel allocates nothing:
//  - the problem of the current call, set once by lambert() before any iteration;
//  - timeAt's outputs besides its return value: T'(x), T''(x), T'''(x) at the x it was last given, read by its
//    caller right after the call (dT2 = dT3 = 0 means "Newton only": the higher derivatives are not usable there);
//  - steps: the iteration count reported in slot 6; xSol: the root solveForX found (its return value is a status).
let lam: real = 0; // lambda
let lam2: real = 0; // lambda^2
let oml2: real = 0; // 1 - lambda^2 = c / s
let npi: real = 0; // N pi
let zeroRev: bool = true;
let dT1: real = 0;
let dT2: real = 0;
let dT3: real = 0;
let steps: i32 = 0;
let xSol: real = 0; // the root found by solveForX

/** lambda y - x, with no cancellation when lambda x > 0 (y^2 = 1 - lambda^2 + lambda^2 x^2). */
function lamYMinusX(x: real, y: real): real {
  if (lam * x > 0) return (oml2 * (lam2 - x * x * (<real>1.0 + lam2))) / (lam * y + x);
  return lam * y - x;
}

/** 1 - lambda, exact to rounding for lambda near 1. */
function oneMinusLam(): real {
  return lam > 0 ? oml2 / (<real>1.0 + lam) : <real>1.0 - lam;
}

/**
 * T(x) from Battin's series (N = 0, x near 1): eta = y - lambda x, S1 = (1 - lambda - x eta) / 2,
 * Q = 4/3 F(3, 1; 5/2; S1), T = (eta^3 Q + 4 lambda eta) / 2. Sets dT1 = T'(x) from the same series.
 */
function battinTime(x: real, y: real, eta: real): real {
  const S1 = (oneMinusLam() - x * eta) * <real>0.5;
  let F: real = 1; // sum c_k S1^k, c_0 = 1, c_k = c_(k-1) (2 + k) / (1.5 + k)
  let dF: real = 0; // sum k c_k S1^(k-1)
  let c: real = 1;
  let zk1: real = 1; // S1^(k-1)
  for (let k = 1; k <= SERIES_MAX_TERMS; k++) {
    const kr = <real>k;
    c = (c * (<real>2.0 + kr)) / (<real>1.5 + kr);
    const dterm = kr * c * zk1;
    const term = c * zk1 * S1;
    F += term;
    dF += dterm;
    zk1 *= S1;
    if (abs(dterm) <= EPS * <real>0.125 * abs(dF) && abs(term) <= EPS * <real>0.125 * F) break;
  }
  const Q = FOUR_THIRDS * F;
  const dQ = FOUR_THIRDS * dF;
  const e2 = eta * eta;
  const deta = (-lam * eta) / y;
  const dS1 = -(eta + x * deta) * <real>0.5;
  dT1 = (<real>3.0 * e2 * deta * Q + e2 * eta * dQ * dS1 + <real>4.0 * lam * deta) * <real>0.5;
  return (e2 * eta * Q + <real>4.0 * lam * eta) * <real>0.5;
}

/** Normalized time of flight T(x) for the current problem; sets dT1, dT2, dT3 (dT2 = dT3 = 0 means Newton only). */
function timeAt(x: real): real {
  const omx2 = (<real>1.0 - x) * (<real>1.0 + x);
  const y = RMath.sqrt(oml2 + lam2 * x * x);
  const eta = lam * x > 0 ? oml2 / (y + lam * x) : y - lam * x; // y - lambda x
  let T: real;
  let series = false;
  if (zeroRev && abs(x - <real>1.0) < BATTIN_MAX) {
    T = battinTime(x, y, eta);
    series = true;
  } else if (omx2 > 0) {
    const sq = RMath.sqrt(omx2);
    const psi = RMath.atan2(sq * eta, x * y + lam * omx2);
    T = ((psi + npi) / sq + lamYMinusX(x, y)) / omx2;
  } else {
    const rho = -omx2;
    const sq = RMath.sqrt(rho);
    const psi = RMath.asinh(sq * eta);
    T = (-lamYMinusX(x, y) - psi / sq) / rho;
  }
  if (series && abs(omx2) < NEAR_PARABOLA) {
    dT2 = 0;
    dT3 = 0;
    return T;
  }
  // Izzo (2015), eq. 22.
  const y2 = y * y;
  const l3 = lam2 * lam;
  if (!series) dT1 = (<real>3.0 * T * x - <real>2.0 + (<real>2.0 * l3 * x) / y) / omx2;
  dT2 = (<real>3.0 * T + <real>5.0 * x * dT1 + (<real>2.0 * oml2 * l3) / (y2 * y)) / omx2;
  dT3 = (<real>7.0 * x * dT2 + <real>8.0 * dT1 - (<real>6.0 * oml2 * l3 * lam2 * x) / (y2 * y2 * y)) / omx2;
  return T;
}

/**
 * Root of T(x) = Tt in (lo, hi) from x0, T decreasing there (increasing when `increasing`) apart from a part of
 * the bracket that lies beyond the minimum. Returns NaN when the step cap is reached.
 */
function solveX(Tt: real, x0: real, lo0: real, hi0: real, increasing: bool): real {
  let x = x0;
  let lo = lo0;
  let hi = hi0;
  for (let it = 0; it < LAMBERT_MAX_ITER; it++) {
    const f = timeAt(x) - Tt;
    steps++;
    if (f == 0) return x;
    if (f > 0 != increasing) lo = x;
    else hi = x;
    let dx: real;
    const newton = dT2 == 0 && dT3 == 0;
    if (newton) {
      dx = -f / dT1;
    } else {
      dx = (-f * (dT1 * dT1 - <real>0.5 * f * dT2)) / (dT1 * (dT1 * dT1 - f * dT2) + dT3 * f * f * <real>0.16666666666666666);
    }
    // The step is measured against the distance to the end where T runs off to infinity (x = -1, and x = 1
    // with N >= 1: there T grows like (1 - x^2)^-3/2 and 1 -+ x is what carries the orbit), else against max(1, |x|).
    let scale: real = abs(x) > 1 ? abs(x) : 1;
    if (x < 0 && <real>1.0 + x < scale) scale = <real>1.0 + x;
    if (!zeroRev && x > 0 && <real>1.0 - x < scale) scale = <real>1.0 - x;
    if (abs(dx) <= (newton ? STOP_STEP_NEWTON : STOP_STEP) * scale) return x + dx;
    let xn = x + dx;
    // A step that leaves the bracket (or fails to move) is replaced by bisection.
    if (!(xn > lo && xn < hi)) xn = isFinite(hi) ? <real>0.5 * (lo + hi) : x + abs(x) + <real>1.0;
    x = xn;
  }
  return NaN;
}

/** x at the minimum of T for N >= 1 (root of T' in (0, 1), T'(0) = -2): Halley's method, bracketed. NaN if capped. */
function findXMin(): real {
  let x: real = 0;
  let lo: real = 0;
  let hi: real = 1;
  for (let it = 0; it < LAMBERT_MIN_MAX_ITER; it++) {
    timeAt(x);
    steps++;
    if (dT1 == 0) return x;
    if (dT1 < 0) lo = x;
    else hi = x;
    const dx = (<real>-2.0 * dT1 * dT2) / (<real>2.0 * dT2 * dT2 - dT1 * dT3);
    if (abs(dx) <= STOP_MIN) return x + dx;
    const xn = x + dx;
    x = xn > lo && xn < hi ? xn : <real>0.5 * (lo + hi);
  }
  return NaN;
}

/**
 * Solve T(x) = T for the problem set in the scratch (revolution count from zeroRev / npi): x to xSol. Returns OK,
 * ERR_NO_SOLUTION (N >= 1 and T below the minimum time) or ERR_NOT_CONVERGED (a step cap reached).
 */
function solveForX(T: real, branch: i32): i32 {
  // Times at x = 0 (N = 0) and at the parabola x = 1.
  const sqo = RMath.sqrt(oml2);
  const T00 = RMath.atan2(sqo, lam) + lam * sqo;
  if (zeroRev) {
    const oml = oneMinusLam();
    const T1 = TWO_THIRDS * oml * (<real>1.0 + lam + lam2);
    let x0: real;
    if (T >= T00) x0 = RMath.pow(T00 / T, TWO_THIRDS) - <real>1.0;
    else if (T <= T1) x0 = (<real>2.5 * T1 * (T1 - T)) / (T * oml * (<real>1.0 + lam + lam2 + lam2 * lam + lam2 * lam2)) + <real>1.0;
    else x0 = RMath.pow(T00 / T, LN2 / RMath.log(T00 / T1)) - <real>1.0;
    xSol = solveX(T, x0, <real>-1.0, <real>Infinity, false);
    return isNaN(xSol) ? ERR_NOT_CONVERGED : OK;
  }
  const T0 = T00 + npi;
  const left = branch == BRANCH_SHORT_PERIOD;
  // Izzo's starters for the two branches (2015, eq. 31).
  const tl = RMath.pow((npi + PI) / (<real>8.0 * T), TWO_THIRDS);
  const tr = RMath.pow((<real>8.0 * T) / npi, TWO_THIRDS);
  let x0 = left ? (tl - <real>1.0) / (tl + <real>1.0) : (tr - <real>1.0) / (tr + <real>1.0);
  let lo: real;
  let hi: real;
  if (T >= T0) {
    lo = left ? <real>-1.0 : 0;
    hi = left ? 0 : <real>1.0;
  } else {
    const xm = findXMin();
    if (isNaN(xm)) return ERR_NOT_CONVERGED;
    const Tmin = timeAt(xm);
    if (T < Tmin) return ERR_NO_SOLUTION;
    lo = left ? 0 : xm;
    hi = left ? xm : <real>1.0;
    // Near the minimum T is about Tmin + T''(xm) (x - xm)^2 / 2: start from that parabola's root.
    const dq = dT2 > 0 ? RMath.sqrt((<real>2.0 * (T - Tmin)) / dT2) : 0;
    const xq = left ? xm - dq : xm + dq;
    if (!(x0 > lo && x0 < hi) || T - Tmin < <real>0.1 * (T0 - Tmin)) x0 = xq > lo && xq < hi ? xq : <real>0.5 * (lo + hi);
  }
  xSol = solveX(T, x0, lo, hi, !left);
  return isNaN(xSol) ? ERR_NOT_CONVERGED : OK;
}

/**
 * Solve Lambert's problem. Inputs: gravitational parameter mu, positions r1 and r2, time of flight tof,
 * complete revolutions revs, retrograde (0 prograde, 1 retrograde), branch (0 short-period, 1 long-period;
 * ignored when revs = 0). Writes v1 to slots 0-2, v2 to 3-5, the step count to 6.
 */
export function lambert(mu: real, r1x: real, r1y: real, r1z: real, r2x: real, r2y: real, r2z: real, tof: real, revs: i32, retrograde: i32, branch: i32): i32 {
  put(LAMBERT_ITERATIONS, 0);
  steps = 0;
  if (!isFinite(mu) || !isFinite(r1x) || !isFinite(r1y) || !isFinite(r1z) || !isFinite(r2x) || !isFinite(r2y) || !isFinite(r2z) || !isFinite(tof)) {
    return ERR_NONFINITE;
  }
  if (!(mu > 0) || !(tof > 0) || revs < 0 || (retrograde != 0 && retrograde != 1) || (branch != BRANCH_SHORT_PERIOD && branch != BRANCH_LONG_PERIOD)) return ERR_DOMAIN;
  const r1n = RMath.sqrt(r1x * r1x + r1y * r1y + r1z * r1z);
  const r2n = RMath.sqrt(r2x * r2x + r2y * r2y + r2z * r2z);
  if (!(r1n > 0) || !(r2n > 0)) return ERR_DOMAIN;
  if (!isFinite(r1n) || !isFinite(r2n)) return ERR_OVERFLOW;
  // Step 2. Unit vectors i1, i2 along r1, r2; h = i1 x i2 (|h| = sin theta), cos theta = i1.i2: scale-free, so
  // nothing underflows or overflows whatever the size of r1 and r2.
  const i1x = r1x / r1n;
  const i1y = r1y / r1n;
  const i1z = r1z / r1n;
  const i2x = r2x / r2n;
  const i2y = r2y / r2n;
  const i2z = r2z / r2n;
  const hx = i1y * i2z - i1z * i2y;
  const hy = i1z * i2x - i1x * i2z;
  const hz = i1x * i2y - i1y * i2x;
  const sn = RMath.sqrt(hx * hx + hy * hy + hz * hz);
  if (!(sn > PLANE_MIN_SIN)) return ERR_DEGENERATE;
  const cs = i1x * i2x + i1y * i2y + i1z * i2z;
  // 1 + cos theta and 1 - cos theta, each without cancellation: (1 + cos)(1 - cos) = sin^2.
  const opc = cs >= 0 ? <real>1.0 + cs : (sn * sn) / (<real>1.0 - cs);
  const omc = cs <= 0 ? <real>1.0 - cs : (sn * sn) / (<real>1.0 + cs);
  // Chord from the differences of the components (each exact to rounding), semi-perimeter s.
  const cx = r2x - r1x;
  const cy = r2y - r1y;
  const cz = r2z - r1z;
  const c = RMath.sqrt(cx * cx + cy * cy + cz * cz);
  const per = r1n + r2n + c;
  const s = <real>0.5 * per;
  // s - c = (r1 + r2 - c) / 2 = r1 r2 (1 + cos theta) / (r1 + r2 + c).
  const smc = r1n * (r2n / per) * opc;
  // c + d and c - d with d = r1 - r2, the smaller from (c + d)(c - d) = c^2 - d^2 = 2 r1 r2 (1 - cos theta): the
  // chord's radial and transverse parts, 1 + rho = (c + d) / c, 1 - rho = (c - d) / c (rho = d / c, Izzo's notation).
  const d = r1n - r2n;
  let cpd = c + d;
  let cmd = c - d;
  if (d >= 0) cmd = r1n * (r2n / cpd) * (<real>2.0 * omc);
  else cpd = r1n * (r2n / cmd) * (<real>2.0 * omc);
  // Direction: +1 when the motion asked for turns about r1 x r2 (lambda >= 0), -1 when it turns the long way.
  let sgn: real = hz >= 0 ? 1 : -1;
  if (retrograde == 1) sgn = -sgn;
  lam2 = smc / s;
  oml2 = c / s;
  lam = sgn * RMath.sqrt(lam2);
  zeroRev = revs == 0;
  npi = <real>revs * PI;
  const T = (tof * RMath.sqrt((<real>2.0 * mu) / s)) / s;
  if (!isFinite(T)) return ERR_OVERFLOW;

  const st = solveForX(T, branch);
  put(LAMBERT_ITERATIONS, <real>steps);
  if (st != OK) return st;
  const x = xSol;

  // Step 6. Velocities (Izzo 2015, Algorithm 1), with (lambda y - x) - rho (lambda y + x) written as
  // lambda y (1 - rho) - x (1 + rho), and sigma = sqrt(1 - rho^2) = sqrt((1 + rho)(1 - rho)): no cancellation as
  // rho goes to -1 or 1 (transfer angle near 0 or 360 degrees, where the chord becomes radial).
  const y = RMath.sqrt(oml2 + lam2 * x * x);
  const yplx = lam * x < 0 ? oml2 / (y - lam * x) : y + lam * x; // y + lambda x, without cancellation
  const ly = lam * y;
  const opr = cpd / c;
  const omr = cmd / c;
  const gamma = RMath.sqrt(<real>0.5 * mu * s);
  const vr1 = (gamma * (ly * omr - x * opr)) / r1n;
  const vr2 = (-gamma * (ly * opr - x * omr)) / r2n;
  const vt = gamma * RMath.sqrt(opr * omr) * yplx;
  const vt1 = vt / r1n;
  const vt2 = vt / r2n;
  // Tangential unit vectors n x i1, n x i2, n = sgn h / |h| the normal of the motion.
  const k = sgn / sn;
  const nx = hx * k;
  const ny = hy * k;
  const nz = hz * k;
  const v1x = vr1 * i1x + vt1 * (ny * i1z - nz * i1y);
  const v1y = vr1 * i1y + vt1 * (nz * i1x - nx * i1z);
  const v1z = vr1 * i1z + vt1 * (nx * i1y - ny * i1x);
  const v2x = vr2 * i2x + vt2 * (ny * i2z - nz * i2y);
  const v2y = vr2 * i2y + vt2 * (nz * i2x - nx * i2z);
  const v2z = vr2 * i2z + vt2 * (nx * i2y - ny * i2x);
  if (!isFinite(v1x + v1y + v1z + v2x + v2y + v2z)) return ERR_OVERFLOW;
  put(LAMBERT_V1X, v1x);
  put(LAMBERT_V1Y, v1y);
  put(LAMBERT_V1Z, v1z);
  put(LAMBERT_V2X, v2x);
  put(LAMBERT_V2Y, v2y);
  put(LAMBERT_V2Z, v2z);
  return OK;
}
