// Two-body propagation by universal variables: (mu, r0, v0, dt) -> (r, v), one code path for every conic
// (circle, ellipse, parabola, hyperbola, the near-parabolic band included), dt of either sign.
//
// Method (R. H. Battin, "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 4.5-4.6;
// the same formulation as D. A. Vallado, "Fundamentals of Astrodynamics and Applications", 4th ed. 2013,
// Algorithm 8, written with the universal functions U_k = chi^k c_k(alpha chi^2), Stumpff c_k in stumpff.ts):
//  1. Special cases, in order: a NaN or infinite input -> ERR_NONFINITE; mu <= 0 or r0 = 0 -> ERR_DOMAIN;
//     a subnormal mu -> ERR_OVERFLOW (outside the normal range);
//     rectilinear motion (|r0 x v0| <= RECTILINEAR_REL |r0| |v0|, invariants.ts) -> ERR_DEGENERATE;
//     dt = 0 -> (r0, v0).
//  2. alpha = 2 / r0 - v0^2 / mu (= 1 / a), sigma0 = r0 . v0 / sqrt(mu), p = |h|^2 / mu.
//  3. Ellipse (alpha > 0): whole revolutions are removed first, dt' = dt - k T with T = 2 pi / n,
//     n = sqrt(mu alpha^3), k = nearest(dt / T), so |dt'| <= T / 2 and the eccentric-anomaly change is below
//     pi + 2 (the reduction adds about one ulp of dt; the rounding of T adds k ulp of T, both far below the
//     error target, which grows with the revolutions).
//  4. Bracket: the universal Kepler function F(chi) = r0 U1 + sigma0 U2 + U3 - sqrt(mu) dt' is increasing with
//     F' = r >= r_p, so the root lies between 0 and sqrt(mu) dt' / r_p (r_p = p / (1 + e), taken RP_SAFETY
//     smaller); for the ellipse also |chi| <= CHI_TURN / sqrt(alpha) (|delta E| <= pi + 2).
//  5. Starter, exact for the conic when evaluated exactly (Battin 1987, 4.5: chi = sqrt(a) delta E,
//     sqrt(-a) delta H, sqrt(p) delta D):
//     |1 - e| >= PARABOLIC_BAND: the project's Kepler solvers (kepler_elliptic.ts, kepler_hyperbolic.ts) from
//     the initial anomaly (e cos E0 = 1 - r0 alpha, e sin E0 = sigma0 sqrt(alpha); hyperbolic alike) and
//     M = M0 + n dt'; chi0 = (E - E0) / sqrt(alpha) or (H - H0) / sqrt(-alpha).
//     |1 - e| < PARABOLIC_BAND: Barker's equation (kepler_parabolic.ts) with D0 = sigma0 / sqrt(p) and
//     D + D^3/3 = D0 + D0^3/3 + 2 sqrt(mu) dt' / p^(3/2); chi0 = sqrt(p) (D - D0). A hyperbola in the band
//     takes the hyperbolic starter instead where the parabola is a poor model of the arc: |sinh H0| > 1, or
//     Barker's chi0 reaching -alpha chi0^2 > BARKER_PSI_MAX (without this, long arcs in the band ran into the
//     iteration cap).
//     A starter outside the bracket (or a solver failure) is replaced by the bracket's midpoint.
//  6. Iteration: Laguerre's method with n = 5 as applied to Kepler's equation by B. A. Conway, "An improved
//     algorithm due to Laguerre for the solution of Kepler's equation", Celest. Mech. 39 (1986) 199-211:
//     chi -= 5 F / (F' + sqrt|16 F'^2 - 20 F F''|) (evaluated divided through by F' = r0 U0 + sigma0 U1 + U2
//     = r > 0, so no square overflows),
//     F'' = sigma0 U0 + (1 - alpha r0) U1. Every F narrows the bracket; a step that leaves it is replaced by
//     bisection. Stop when a step is below STOP_REL |chi| (the method is cubic: the next step would be below
//     2^-78 |chi|); at most UNIVERSAL_MAX_ITER steps, else ERR_NOT_CONVERGED.
//  7. Hairpin (alpha <= 0 only): on an arc that swings past periapsis from far out, the expansion about r0
//     cancels: the terms of F grow like e^|delta H| while sqrt(mu) dt and r grow like e^|H0| + e^|H1|, and
//     r = f r0 + g v0 combines nearly parallel r0, v0 ((|f| r0 + |g| |v0|) / r reached 6e7 in the sweeps
//     below). Both factors,
//     K = (|r0 U1| + |sigma0 U2| + |U3|) / (sqrt(mu) |dt'|) and (|f| r0 + |g| |v0|) / r, are evaluated at the
//     starter (before any step); when either exceeds HAIRPIN_CANCEL the solution is anchored at periapsis
//     instead, where nothing cancels (f r_p P and g v_p Q are orthogonal):
//       h = r0 x v0 with each product's rounding error recovered (T. J. Dekker, "A floating-point technique for
//       extending the available precision", Numer. Math. 18 (1971) 224-242: two-product by Veltkamp's
//       splitting), since r0 and v0 are nearly parallel; p = h^2 / mu;
//       eccentricity vector e = (v0 x h) / mu - r0 / |r0| (the Laplace vector over mu, as in invariants.ts, in
//       the form without cancellation: both terms are of order 1, whereas (v0^2 - mu / r0) r0 - (r0 . v0) v0
//       cancels by r0 / |a|), P = e / |e|, Q = h x P / |h|, r_p = p / (1 + |e|), v_p = |h| / r_p;
//       time since periapsis from the universal Kepler equation about periapsis (Battin 1987, 4.5, with
//       sigma = 0): at r0, e U1 = sigma0, so U1 = sigma0 / e, chi_a = asinh(U1 sqrt(-alpha)) / sqrt(-alpha)
//       (U1 on the parabola), sqrt(mu) tau = r_p U1 + U3 with U3 = (chi_a - U1) / alpha beyond
//       |alpha| chi_a^2 = U3_DIFF_PSI (U3 from exp(|H0|) would carry |H0| times the rounding of chi_a, and the
//       sum tau + dt' cancels when the arc ends near periapsis);
//       then steps 4-6, 8 and 9 with (r0, v0, sigma0, dt') = (r_p P, v_p Q, 0, tau + dt'). In perifocal terms the
//       result is x = r_p - U2, y = sqrt(p) U1, x' = -sqrt(mu) U1 / r, y' = |h| U0 / r (perifocal position and
//       velocity written with the universal functions; on the hyperbola x = |a| (e - cosh H),
//       y = |a| sqrt(e^2 - 1) sinh H, as in Vallado 2013).
//     Ellipses keep the direct path: |delta E| <= pi + 2 after step 3 bounds the U_k by a few a, and 60 seeded
//     arcs of eccentric ellipses (e from 0.5 to 1 - 1e-6, from r0 = 0.3 to 1 times r_a through periapsis)
//     stayed within 0.22 of the limit below.
//  8. Lagrange coefficients from the final chi: f = 1 - U2 / r0, g = (r0 U1 + sigma0 U2) / sqrt(mu),
//     fdot = -sqrt(mu) U1 / (r r0), gdot = 1 - U2 / r = (r0 U0 + sigma0 U1) / r (the second form: no
//     cancellation where U2 is close to r, at apoapsis of an eccentric orbit); r = f r0 + g v0, v = fdot r0 + gdot v0.
//     g is taken from chi (not dt - U3 / sqrt(mu)), so (f, g) describe exactly the point chi reaches.
//  9. Guard: the residual of the universal Kepler equation at the final chi must be finite and below
//     RESIDUAL_REL of its largest term, else ERR_NOT_CONVERGED (ERR_OVERFLOW when not finite).
//  A non-finite output or intermediate (a hyperbola leaving the floating-point range, sqrt(mu) |dt| above the
//  largest real) -> ERR_OVERFLOW; results within a factor of about sqrt(mu) r0 of the largest real can take
//  this path although they would be representable.
//
// Output slots: 0..2 = r, 3..5 = v, 6 = iterations (Laguerre or bisection steps; the starter's own Kepler
// solve is not counted; on the periapsis anchor, the steps of the solve about periapsis).
// Accuracy (release f64 build, vectors/propagate.csv: 3100 cases, 50-digit references by an independent
// method, harness/reference/twobody.ts): relative error of r and of v within max(1e-13 (1 + revolutions),
// 10 cond) on every case, the worst case at 0.27 of that limit (e = 0.74, 46 revolutions: got 11799.536947239902
// km, want 11799.53694718775 in |r|, cond-limited). Where 10 cond is below the flat target the error is at
// most 1.1e-14 (1 + revolutions). Largest errors per conic: elliptic 5.7e-12 (r) and 6.5e-12 (v), hyperbolic
// 2.9e-15 and 2.5e-15 (17 of the 664 hyperbolic and near-parabolic cases take the periapsis anchor),
// near-parabolic 2.5e-4 and 5.9e-3 (cond up to 3.6e-2 there: 2 - r v^2 / mu cancels). Iterations: at most 3,
// mean 1.10.
// Hyperbolas far out (tests/twobody-hairpin.test.ts: 40 seeded arcs through periapsis, worst at 0.23 of the
// limit; 300 further seeded arcs, 70% through periapsis, r0 / r_p and r1 / r_p from 1 to 1e8, e from 1 + 1e-6
// to 10, 199 of them anchored at periapsis): every case within the same limit, the worst at 0.50 of it; at most 3 iterations when anchored,
// 7 on the direct path (e - 1 below 1e-5 with Barker's starter). Before the anchor 151 of the 300 were over
// the limit (the worst 1.7 |r| off), 6 returned ERR_NOT_CONVERGED and 1 ERR_OVERFLOW, and up to 40 iterations
// were taken: the noise of F (e^|delta H| ulps) keeps Laguerre's steps from settling, so the bisection fallback
// halves the bracket until the step test passes or the cap is reached. The case r_p = 0.7 m, r0 = 7071 km,
// dt = 1 s was 8.6e-3 off after 15 iterations; it is now 8.0e-16 off (cond 1.4e-10) after 1.

import { OK, ERR_NOT_CONVERGED, ERR_NONFINITE, ERR_OVERFLOW, FIRST_ERROR } from "./status";
import { put, got } from "./io";
import { IS_F32 } from "./real";
import { MIN_NORMAL, checkState, sR, sV2, sRV, sH } from "./invariants";
import { stumpff, C0, C1, C2, C3 } from "./stumpff";
import { kepler_elliptic } from "./kepler_elliptic";
import { kepler_hyperbolic } from "./kepler_hyperbolic";
import { kepler_parabolic } from "./kepler_parabolic";

/**
 * Step 7: above this cancellation factor (of the universal Kepler equation, or of r = f r0 + g v0), evaluated
 * at the starter, a hyperbola or parabola is re-anchored at periapsis. 2^3: on 300 seeded hyperbolas the direct
 * path's error grew about in proportion to the factor (up to 0.3 of the limit at 15, 2.9 times it at 65,
 * 11 times at 450), the re-anchored path's stayed below 0.5 of it at every factor; below 8 the two agree.
 */
const HAIRPIN_CANCEL: real = 8.0;
/** In the near-parabolic band a hyperbola takes the hyperbolic starter beyond this |alpha| chi^2 (|delta H| > 1). */
const BARKER_PSI_MAX: real = 1.0;
/** Beyond |psi| = |alpha| chi^2 = 4 (|H0| > 2) step 7 takes U3 = (chi - U1) / alpha (cancels at most 1.2 bits). */
const U3_DIFF_PSI: real = 4.0;
/** Iteration cap (Laguerre steps plus bisection fallbacks). */
export const UNIVERSAL_MAX_ITER: i32 = 40;
/** Stop once a step is below this fraction of chi: 2^-26 (f64), 2^-12 (f32); cubic convergence does the rest. */
const STOP_REL: real = IS_F32 ? <real>0.000244140625 : <real>1.4901161193847656e-8;
/** Below this |1 - e| the starter comes from Barker's equation, where E- and H-based forms lose digits. */
const PARABOLIC_BAND: real = 0.01;
/** |delta E| bound after the reduction of whole revolutions: pi + 2 = 5.14, rounded up. */
const CHI_TURN: real = 5.25;
/** The periapsis distance in the bracket is taken this much smaller (covers the rounding of e and p). */
const RP_SAFETY: real = 0.99;
const TWO_PI: real = IS_F32 ? <real>6.2831854820251465 : <real>6.283185307179586;
const THIRD: real = <real>0.3333333333333333;
/** Largest relative residual of the universal Kepler equation accepted at the final chi (2^-20). */
const RESIDUAL_REL: real = <real>9.5367431640625e-7;
const MAX_REAL: real = IS_F32 ? <real>3.4028234663852886e38 : <real>1.7976931348623157e308;

/** Propagate (r0, v0) by dt under mu. Slots 0..5 = r, v; slot 6 = iterations. */
export function propagate(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real): i32 {
  return solve(mu, r0x, r0y, r0z, v0x, v0y, v0z, dt, false);
}

/**
 * Where propagateSolved leaves the solution (past every kernel's outputs), and its fields: the anchor state
 * (A, B) the solution is expanded about ((r0, v0), or periapsis after step 7), its radius r0 and sigma0 = A . B /
 * sqrt(mu), alpha, the final chi, the whole revolutions removed in step 3 (k, as a real), and after step 7 the
 * universal anomaly chi_a from periapsis to r0 and ANCHORED = 1 (else both 0).
 */
export const SOL_SLOT: i32 = 48;
export const SOL_AX: i32 = 0;
export const SOL_AY: i32 = 1;
export const SOL_AZ: i32 = 2;
export const SOL_BX: i32 = 3;
export const SOL_BY: i32 = 4;
export const SOL_BZ: i32 = 5;
export const SOL_R0: i32 = 6;
export const SOL_SIGMA0: i32 = 7;
export const SOL_ALPHA: i32 = 8;
export const SOL_CHI: i32 = 9;
export const SOL_REVS: i32 = 10;
export const SOL_CHI_ANCHOR: i32 = 11;
export const SOL_ANCHORED: i32 = 12;

/** propagate, and on success its solution in slots SOL_SLOT + SOL_* as well (same bits in slots 0..6). */
export function propagateSolved(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real): i32 {
  return solve(mu, r0x, r0y, r0z, v0x, v0y, v0z, dt, true);
}

function solve(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real, withSolution: bool): i32 {
  put(6, 0);
  if (!isFinite(dt)) return ERR_NONFINITE;
  const st = checkState(mu, r0x, r0y, r0z, v0x, v0y, v0z);
  if (st != OK) return st;
  // A subnormal mu has lost its relative precision (sqrt(mu) and mu alpha follow it): refused, not guessed.
  if (mu < MIN_NORMAL) return ERR_OVERFLOW;
  const sqmu = RMath.sqrt(mu);
  const alpha = <real>2.0 / sR - sV2 / mu;
  const p = sH * sH / mu;

  // Step 3: whole revolutions of the ellipse.
  let dtr = dt;
  let revs: real = 0;
  let anchored = false;
  if (alpha > 0) {
    const T = TWO_PI / (sqmu * alpha * RMath.sqrt(alpha));
    if (isFinite(T) && abs(dt) > <real>0.5 * T) {
      revs = nearest(dt / T);
      dtr = dt - revs * T;
    }
  }
  // The anchor state (a, b) the solution is expanded about: (r0, v0), or periapsis after step 7.
  let ax = r0x, ay = r0y, az = r0z, bx = v0x, by = v0y, bz = v0z;
  let r0 = sR;
  let sigma0 = sRV / sqmu;
  let chi: real = 0;
  let iterations: i32 = 0;
  if (dtr != 0) {
    chi = solveChi(sqmu, r0, sigma0, alpha, p, dtr, true);
    if (lastIterations == HAIRPIN) {
      // Step 7: re-anchor at periapsis.
      if (!periapsisAnchor(mu, sqmu, alpha, r0x, r0y, r0z, v0x, v0y, v0z)) return ERR_OVERFLOW;
      ax = pAX;
      ay = pAY;
      az = pAZ;
      bx = pBX;
      by = pBY;
      bz = pBZ;
      r0 = pRP;
      sigma0 = 0;
      anchored = true;
      dtr = pTau + dtr;
      chi = 0;
      lastIterations = 0;
      if (dtr != 0) chi = solveChi(sqmu, r0, sigma0, alpha, pP, dtr, false);
    }
    iterations = lastIterations;
    if (iterations == -2) return ERR_OVERFLOW;
    if (iterations < 0) {
      put(6, <real>UNIVERSAL_MAX_ITER);
      return ERR_NOT_CONVERGED;
    }
  }
  // Step 8.
  stumpff(alpha * chi * chi);
  const u0 = C0;
  const u1 = chi * C1;
  const u2 = chi * chi * C2;
  const r = r0 * u0 + sigma0 * u1 + u2;
  if (dtr != 0) {
    // Step 9 (guard): the final chi must satisfy the universal Kepler equation (to 2^-20 of its largest term),
    // so that no overflow or stalled bracket can pass for a solution.
    const u3 = chi * chi * chi * C3;
    const sdt = sqmu * dtr;
    const t1 = r0 * u1;
    const t2 = sigma0 * u2;
    const res = t1 + t2 + u3 - sdt;
    if (!isFinite(res) || !isFinite(r)) return ERR_OVERFLOW;
    if (!(abs(res) <= RESIDUAL_REL * (abs(t1) + abs(t2) + abs(u3) + abs(sdt)))) {
      put(6, <real>iterations);
      return ERR_NOT_CONVERGED;
    }
  }
  const f = <real>1.0 - u2 / r0;
  const g = (r0 * u1 + sigma0 * u2) / sqmu;
  const fd = -sqmu * (u1 / r) / r0;
  const gd = (r0 * u0 + sigma0 * u1) / r; // = 1 - U2 / r, without the cancellation near apoapsis
  const rx = f * ax + g * bx;
  const ry = f * ay + g * by;
  const rz = f * az + g * bz;
  const vx = fd * ax + gd * bx;
  const vy = fd * ay + gd * by;
  const vz = fd * az + gd * bz;
  if (!(r > 0) || !isFinite(rx) || !isFinite(ry) || !isFinite(rz) || !isFinite(vx) || !isFinite(vy) || !isFinite(vz)) return ERR_OVERFLOW;
  if (withSolution) {
    // The solution itself, for kernels that differentiate it (transition.ts): slots SOL_SLOT + SOL_*.
    put(SOL_SLOT + SOL_AX, ax);
    put(SOL_SLOT + SOL_AY, ay);
    put(SOL_SLOT + SOL_AZ, az);
    put(SOL_SLOT + SOL_BX, bx);
    put(SOL_SLOT + SOL_BY, by);
    put(SOL_SLOT + SOL_BZ, bz);
    put(SOL_SLOT + SOL_R0, r0);
    put(SOL_SLOT + SOL_SIGMA0, sigma0);
    put(SOL_SLOT + SOL_ALPHA, alpha);
    put(SOL_SLOT + SOL_CHI, chi);
    put(SOL_SLOT + SOL_REVS, revs);
    put(SOL_SLOT + SOL_CHI_ANCHOR, anchored ? pChiA : <real>0);
    put(SOL_SLOT + SOL_ANCHORED, anchored ? <real>1 : <real>0);
  }
  put(0, rx);
  put(1, ry);
  put(2, rz);
  put(3, vx);
  put(4, vy);
  put(5, vz);
  put(6, <real>iterations);
  return OK;
}

// Left by periapsisAnchor: the periapsis state (pA = r_p P, pB = v_p Q), r_p, p, and the time from periapsis
// to r0 (negative before periapsis).
let pAX: real = 0;
let pAY: real = 0;
let pAZ: real = 0;
let pBX: real = 0;
let pBY: real = 0;
let pBZ: real = 0;
let pRP: real = 0;
let pP: real = 0;
let pTau: real = 0;
let pChiA: real = 0;

// Step 7 for alpha <= 0 (hyperbola or parabola, e >= 1): the periapsis state and the time since periapsis.
// False when an intermediate is not finite.
function periapsisAnchor(mu: real, sqmu: real, alpha: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real): bool {
  // h = r0 x v0 with every product's rounding error recovered: r0 and v0 are nearly parallel far out on a
  // hairpin, and a plain cross product would lose about log10(r0 v0 / |h|) digits of h, hence of P and e.
  const hx = diffProd(ry, vz, rz, vy);
  const hy = diffProd(rz, vx, rx, vz);
  const hz = diffProd(rx, vy, ry, vx);
  const h = RMath.sqrt(hx * hx + hy * hy + hz * hz);
  const p = h * (h / mu);
  // Eccentricity vector (v0 x h) / mu - r0 / |r0|: both terms are of order 1, so nothing cancels.
  const r0 = sR;
  const ex = (vy * hz - vz * hy) / mu - rx / r0;
  const ey = (vz * hx - vx * hz) / mu - ry / r0;
  const ez = (vx * hy - vy * hx) / mu - rz / r0;
  const e = RMath.sqrt(ex * ex + ey * ey + ez * ez);
  const px = ex / e;
  const py = ey / e;
  const pz = ez / e;
  const qx = (hy * pz - hz * py) / h;
  const qy = (hz * px - hx * pz) / h;
  const qz = (hx * py - hy * px) / h;
  const rp = p / (<real>1.0 + e);
  const vp = h / rp;
  // Universal anomaly from periapsis to r0: r . v / sqrt(mu) = e U1 there, so U1 = sigma0 / e and
  // chi = asinh(U1 sqrt(-alpha)) / sqrt(-alpha) (= U1 on the parabola). sqrt(mu) tau = r_p U1 + U3 (the
  // universal Kepler equation from periapsis): two terms of the sign of chi, no cancellation.
  const u1 = (sRV / sqmu) / e;
  let chi = u1;
  if (alpha < 0) {
    const sa = RMath.sqrt(-alpha);
    chi = RMath.asinh(u1 * sa) / sa;
  }
  let u3: real;
  const psi = alpha * chi * chi;
  if (psi < -U3_DIFF_PSI) {
    // U3 = (chi - U1) / alpha with U1 taken from sigma0, not from exp(|H0|): the rounding of chi (about
    // |H0| ulps of H0 = chi sqrt(-alpha)) would otherwise be amplified |H0| times in U3, and once more by
    // the cancellation tau + dt when the arc ends near periapsis.
    u3 = (chi - u1) / alpha;
  } else {
    stumpff(psi);
    u3 = chi * chi * chi * C3;
  }
  pTau = (rp * u1 + u3) / sqmu;
  pChiA = chi;
  pAX = rp * px;
  pAY = rp * py;
  pAZ = rp * pz;
  pBX = vp * qx;
  pBY = vp * qy;
  pBZ = vp * qz;
  pRP = rp;
  pP = p;
  return isFinite(pTau) && isFinite(vp) && isFinite(qx + qy + qz) && rp > 0;
}

/** Veltkamp's splitting constant 2^s + 1 (s = 27 for f64, 12 for f32): splits a real into two halves. */
const SPLIT: real = IS_F32 ? <real>4097.0 : <real>134217729.0;

// The rounding error of ab = fl(a b), exactly (Dekker 1971, two-product by Veltkamp's splitting; needs
// |a|, |b| below the largest real / SPLIT, else the result is not finite and the caller drops it).
function twoProductError(a: real, b: real, ab: real): real {
  const ta = SPLIT * a;
  const ah = ta - (ta - a);
  const al = a - ah;
  const tb = SPLIT * b;
  const bh = tb - (tb - b);
  const bl = b - bh;
  return ah * bh - ab + ah * bl + al * bh + al * bl;
}

// a b - c d to within a few ulps of the result, whatever the cancellation; the plain difference when the
// splitting overflows.
function diffProd(a: real, b: real, c: real, d: real): real {
  const ab = a * b;
  const cd = c * d;
  const s = ab - cd + (twoProductError(a, b, ab) - twoProductError(c, d, cd));
  return isFinite(s) ? s : ab - cd;
}

// Steps taken by the last solveChi; -1 when the cap was reached, -2 when sqrt(mu) dt overflows, HAIRPIN when
// the test of step 7 asks for the periapsis anchor.
let lastIterations: i32 = 0;
const HAIRPIN: i32 = -3;

// Steps 4-6: the root chi of the universal Kepler equation for dtr != 0; with hairpinTest, step 7's test.
function solveChi(sqmu: real, r0: real, sigma0: real, alpha: real, p: real, dtr: real, hairpinTest: bool): real {
  const sdt = sqmu * dtr;
  if (!isFinite(sdt)) {
    lastIterations = -2;
    return 0;
  }
  // Eccentricity, for the bracket and the starter only.
  let e: real;
  let ecos: real = <real>1.0 - r0 * alpha;
  let esin: real = 0;
  if (alpha > 0) {
    esin = sigma0 * RMath.sqrt(alpha);
    e = RMath.sqrt(ecos * ecos + esin * esin);
  } else {
    e = RMath.sqrt(<real>1.0 - p * alpha);
  }
  let bound = abs(sdt) / (RP_SAFETY * p / (<real>1.0 + e));
  if (alpha > 0) bound = min(bound, CHI_TURN / RMath.sqrt(alpha));
  if (!(bound <= MAX_REAL)) bound = MAX_REAL;
  let lo: real = dtr > 0 ? 0 : -bound;
  let hi: real = dtr > 0 ? bound : 0;

  // Step 5: starter.
  let chi: real = NaN;
  const band = abs(<real>1.0 - e) < PARABOLIC_BAND;
  if (band) {
    const sp = RMath.sqrt(p);
    const d0 = sigma0 / sp;
    const mp = d0 + d0 * d0 * d0 * THIRD + <real>2.0 * sdt / (p * sp);
    if (kepler_parabolic(mp) < FIRST_ERROR) chi = sp * (got(0) - d0);
  }
  if (alpha > 0 && !band) {
    const sa = RMath.sqrt(alpha);
    const e0 = RMath.atan2(esin, ecos);
    const m = (e0 - esin) + sqmu * alpha * sa * dtr;
    if (kepler_elliptic(e, m) < FIRST_ERROR) chi = (got(0) - e0) / sa;
  } else if (alpha < 0) {
    const sa = RMath.sqrt(-alpha);
    const eshH0 = sigma0 * sa;
    // In the band, the hyperbolic form replaces Barker's where the parabola is a poor model of the arc:
    // |H0| > asinh(1) or Barker's chi reaching |alpha| chi^2 > BARKER_PSI_MAX (or Barker failing).
    if (!band || abs(eshH0) > e || !(-alpha * chi * chi <= BARKER_PSI_MAX)) {
      const h0 = RMath.asinh(eshH0 / e);
      const m = (eshH0 - h0) + sqmu * -alpha * sa * dtr;
      if (kepler_hyperbolic(e, m) < FIRST_ERROR) chi = (got(0) - h0) / sa; // else Barker's chi stays
    }
  }
  let test = hairpinTest && alpha <= 0;
  if (!(chi > lo && chi < hi)) {
    chi = <real>0.5 * (lo + hi);
    test = false;
  }

  // Step 6: Laguerre-Conway with the bracket.
  const q = <real>1.0 - alpha * r0;
  for (let it = 1; it <= UNIVERSAL_MAX_ITER; it++) {
    stumpff(alpha * chi * chi);
    const u0 = C0;
    const u1 = chi * C1;
    const u2 = chi * chi * C2;
    const u3 = chi * chi * chi * C3;
    const F = r0 * u1 + sigma0 * u2 + u3 - sdt;
    if (test && it == 1) {
      // Step 7's test, at the starter: cancellation in the universal Kepler equation, and in r = f r0 + g v0.
      const kCancel = (abs(r0 * u1) + abs(sigma0 * u2) + abs(u3)) / abs(sdt);
      const r = r0 * u0 + sigma0 * u1 + u2;
      const fgCancel = (abs(r0 - u2) + abs(r0 * u1 + sigma0 * u2) * RMath.sqrt(sV2) / sqmu) / r;
      if (!(kCancel <= HAIRPIN_CANCEL && fgCancel <= HAIRPIN_CANCEL)) {
        lastIterations = HAIRPIN;
        return chi;
      }
    }
    if (F == 0) {
      lastIterations = it;
      return chi;
    }
    if (F < 0) lo = chi;
    else hi = chi; // NaN (an overflowing trial) also counts as beyond the root
    const d1 = r0 * u0 + sigma0 * u1 + u2;
    const d2 = sigma0 * u0 + q * u1;
    // Scaled by d1 (= r > 0) so that no square overflows when r is near the top of the range.
    const fr = F / d1;
    let next = chi - <real>5.0 * fr / (<real>1.0 + RMath.sqrt(abs(<real>16.0 - <real>20.0 * fr * (d2 / d1))));
    if (!(next >= lo && next <= hi)) next = <real>0.5 * (lo + hi); // closed: chi itself may be an end
    const step = abs(next - chi);
    chi = next;
    if (step <= STOP_REL * abs(chi)) {
      lastIterations = it;
      return chi;
    }
  }
  lastIterations = -1;
  return chi;
}
