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
//     error target, which grows with the revolutions). When one ulp of dt exceeds PHASE_ULP_MAX T the angle is
//     lost: ERR_OVERFLOW.
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
//     bisection. Stop when a step is below UNIVERSAL_STOP_REL |chi| (the method is cubic: the next step would be below
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
import { IS_F32, EPS, MIN_NORMAL, MAX_REAL, TWO_PI, THIRD } from "./real";
import { checkState, twoBodyGet, TB_R, TB_V2, TB_RV, TB_H } from "./invariants";
import { stumpff, stumpffGet, SC0, SC1, SC2, SC3 } from "./stumpff";
import { diffProd } from "./exact";
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
const UNIVERSAL_STOP_REL: real = IS_F32 ? <real>0.000244140625 : <real>1.4901161193847656e-8; // f64 0x3E50000000000000, f32 0x39800000
/** Below this |1 - e| the starter comes from Barker's equation, where E- and H-based forms lose digits. */
const PARABOLIC_BAND: real = 0.01; // f64 0x3F847AE147AE147B, f32 0x3C23D70A
/** |delta E| bound after the reduction of whole revolutions: pi + 2 = 5.14, rounded up. */
const CHI_TURN: real = 5.25;
/** The periapsis distance in the bracket is taken this much smaller (covers the rounding of e and p). */
const RP_SAFETY: real = 0.99; // f64 0x3FEFAE147AE147AE, f32 0x3F7D70A4
/** Largest relative residual of the universal Kepler equation accepted at the final chi (2^-20). */
const RESIDUAL_REL: real = <real>9.5367431640625e-7; // f64 0x3EB0000000000000, f32 0x35800000
/**
 * Step 3 guard: the reduction dt - k T keeps a usable angle only while one ulp of dt (bounded by |dt| EPS) is at
 * most this fraction of the period, 2^-10 (an angle of 2 pi / 1024, about 0.006 rad); beyond it the time no longer
 * says where on the orbit the body is (a circular orbit with T = 2 pi and dt >= 1e17 returned the initial state
 * with status ok): ERR_OVERFLOW, "too large to keep its precision". The fraction is common practice, not measured.
 */
const PHASE_ULP_MAX: real = <real>0.0009765625; // 2^-10: f64 0x3F50000000000000, f32 0x3A800000


// ---- the universal-variable solution, for propagate and for other kernels ------------------------------
// solveUniversal(mu, r0, v0, dt) runs steps 1-7 and 9 and returns a status; the solution is kept in this file's
// scratch (the wasm globals below: no linear memory, nothing exported but the accessor) and read right after
// the call with universalGet(UV_...). Every quantity is that of the ANCHOR state (a, b) the solution is
// expanded about: (r0, v0) itself, or, after step 7 (UV_ANCHORED = 1), the periapsis state (r_p P, v_p Q), with
// the time counted from periapsis. With U_k = chi^k c_k(alpha chi^2):
//   r_end = f a + g b,  v_end = fdot a + gdot b,  f = 1 - U2 / r0,  g = (r0 U1 + sigma0 U2) / sqrt(mu),
//   fdot = -sqrt(mu) U1 / (r r0),  gdot = (r0 U0 + sigma0 U1) / r,  r0 U1 + sigma0 U2 + U3 = sqrt(mu) dt'.
/** chi, the universal anomaly from the anchor to the end of the arc. */
export const UV_CHI: i32 = 0;
/** alpha = 2 / |r0| - v0^2 / mu = 1 / a (the same for the anchor: it is an invariant of the orbit). */
export const UV_ALPHA: i32 = 1;
/** |a|, the anchor's distance: |r0|, or r_p when anchored at periapsis. */
export const UV_R0: i32 = 2;
/** sigma0 = a . b / sqrt(mu): r0 . v0 / sqrt(mu), or 0 at periapsis. */
export const UV_SIGMA0: i32 = 3;
/** sqrt(mu). */
export const UV_SQMU: i32 = 4;
/** dt', the time from the anchor to the end: dt less whole revolutions of an ellipse (plus tau when anchored). */
export const UV_DT: i32 = 5;
/** U0 .. U3 at chi. */
export const UV_U0: i32 = 6;
export const UV_U1: i32 = 7;
export const UV_U2: i32 = 8;
export const UV_U3: i32 = 9;
/** r = r0 U0 + sigma0 U1 + U2, the distance at the end of the arc. */
export const UV_R: i32 = 10;
/** Steps taken (Laguerre or bisection; UNIVERSAL_MAX_ITER when the cap was reached), an integer-valued real. */
export const UV_ITER: i32 = 11;
/** 1 when the solution is anchored at periapsis (step 7), else 0. */
export const UV_ANCHORED: i32 = 12;
/** The anchor state: position a = (UV_AX, UV_AY, UV_AZ), velocity b = (UV_BX, UV_BY, UV_BZ). */
export const UV_AX: i32 = 13;
export const UV_AY: i32 = 14;
export const UV_AZ: i32 = 15;
export const UV_BX: i32 = 16;
export const UV_BY: i32 = 17;
export const UV_BZ: i32 = 18;
/** p = |h|^2 / mu, the semi-latus rectum. */
export const UV_P: i32 = 19;
/** k, the whole revolutions of an ellipse removed in step 3 (dt' = dt - k T before any anchoring), a real. */
export const UV_REVS: i32 = 20;
/** After step 7 (UV_ANCHORED = 1): chi_a, the universal anomaly from periapsis to r0 (else 0). */
export const UV_CHI_ANCHOR: i32 = 21;

// The file-private scratch behind universalGet (names as the UV_ constants).
let uvChi: real = 0;
let uvAlpha: real = 0;
let uvR0: real = 0;
let uvSigma0: real = 0;
let uvSqmu: real = 0;
let uvDt: real = 0;
let uvU0: real = 0;
let uvU1: real = 0;
let uvU2: real = 0;
let uvU3: real = 0;
let uvR: real = 0;
let uvIter: real = 0;
let uvAnchored: real = 0;
let uvAx: real = 0;
let uvAy: real = 0;
let uvAz: real = 0;
let uvBx: real = 0;
let uvBy: real = 0;
let uvBz: real = 0;
let uvP: real = 0;
let uvRevs: real = 0;
let uvChiAnchor: real = 0;

/** Value i (UV_CHI .. UV_CHI_ANCHOR) of the last solveUniversal call (meaningful when it returned OK; see there). */
export function universalGet(i: i32): real {
  switch (i) {
    case UV_CHI: return uvChi;
    case UV_ALPHA: return uvAlpha;
    case UV_R0: return uvR0;
    case UV_SIGMA0: return uvSigma0;
    case UV_SQMU: return uvSqmu;
    case UV_DT: return uvDt;
    case UV_U0: return uvU0;
    case UV_U1: return uvU1;
    case UV_U2: return uvU2;
    case UV_U3: return uvU3;
    case UV_R: return uvR;
    case UV_ITER: return uvIter;
    case UV_ANCHORED: return uvAnchored;
    case UV_AX: return uvAx;
    case UV_AY: return uvAy;
    case UV_AZ: return uvAz;
    case UV_BX: return uvBx;
    case UV_BY: return uvBy;
    case UV_BZ: return uvBz;
    case UV_P: return uvP;
    case UV_REVS: return uvRevs;
    default: return uvChiAnchor;
  }
}

/** solveChi's outcome when step 7's test asks for the periapsis anchor (file-internal; never a kernel status). */
const NEEDS_ANCHOR: i32 = -1;

/**
 * Solve the universal Kepler equation for (r0, v0) under mu over dt: steps 1-7 and 9 of the header. Returns a
 * status: OK, or ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE, ERR_OVERFLOW, ERR_NOT_CONVERGED as propagate
 * documents. The solution is read afterwards with universalGet(UV_...): all of it after OK; after
 * ERR_NOT_CONVERGED only UV_ITER (the steps taken) is meaningful, after any other failure nothing.
 */
export function solveUniversal(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real): i32 {
  uvIter = 0;
  uvRevs = 0;
  uvChiAnchor = 0;
  if (!isFinite(dt)) return ERR_NONFINITE;
  const st = checkState(mu, r0x, r0y, r0z, v0x, v0y, v0z);
  if (st != OK) return st;
  // A subnormal mu has lost its relative precision (sqrt(mu) and mu alpha follow it): refused, not guessed.
  if (mu < MIN_NORMAL) return ERR_OVERFLOW;
  const sqmu = RMath.sqrt(mu);
  const r0 = twoBodyGet(TB_R);
  const v2 = twoBodyGet(TB_V2);
  const rv = twoBodyGet(TB_RV);
  const hn = twoBodyGet(TB_H);
  const alpha = <real>2.0 / r0 - v2 / mu;
  const p = hn * hn / mu;
  const sigma0 = rv / sqmu;
  const T = periodOf(sqmu, alpha);
  if (phaseLost(T, dt)) return ERR_OVERFLOW;
  const dtr = withoutRevolutions(T, dt);
  putAnchor(r0x, r0y, r0z, v0x, v0y, v0z, r0, sigma0, p, dtr, 0);
  uvAlpha = alpha;
  uvSqmu = sqmu;
  uvChi = 0;
  if (dtr != 0) {
    let s = solveChi(sqmu, r0, sigma0, alpha, p, dtr, v2, true);
    if (s == NEEDS_ANCHOR) {
      // Step 7: re-anchor at periapsis, then solve again from there.
      if (!periapsisAnchor(mu, sqmu, alpha, r0x, r0y, r0z, v0x, v0y, v0z, r0, rv, dtr)) return ERR_OVERFLOW;
      uvChi = 0;
      const dta = uvDt;
      s = dta != 0 ? solveChi(sqmu, uvR0, 0, alpha, uvP, dta, v2, false) : OK;
    }
    if (s != OK) return s;
  }
  return universalFunctions();
}

// The period of an ellipse (alpha > 0) from alpha; Infinity for the other conics (no whole revolutions).
function periodOf(sqmu: real, alpha: real): real {
  return alpha > 0 ? TWO_PI / (sqmu * alpha * RMath.sqrt(alpha)) : <real>Infinity;
}

// Step 3 guard: true when dt spans more than half a period and one ulp of it exceeds PHASE_ULP_MAX of the period
// (no usable angle left: the caller returns ERR_OVERFLOW).
function phaseLost(T: real, dt: real): bool {
  return isFinite(T) && abs(dt) > <real>0.5 * T && abs(dt) * EPS > PHASE_ULP_MAX * T;
}

// Step 3: dt less the nearest whole number of periods T of an ellipse (recorded in uvRevs); dt itself otherwise.
function withoutRevolutions(T: real, dt: real): real {
  if (isFinite(T) && abs(dt) > <real>0.5 * T) {
    uvRevs = nearest(dt / T);
    return dt - uvRevs * T;
  }
  return dt;
}

// The anchor part of the solution: state (a, b), |a|, sigma0, p, dt' and the anchored flag.
function putAnchor(ax: real, ay: real, az: real, bx: real, by: real, bz: real, r0: real, sigma0: real, p: real, dtr: real, anchored: i32): void {
  uvAx = ax;
  uvAy = ay;
  uvAz = az;
  uvBx = bx;
  uvBy = by;
  uvBz = bz;
  uvR0 = r0;
  uvSigma0 = sigma0;
  uvP = p;
  uvDt = dtr;
  uvAnchored = <real>anchored;
}

// Step 8's universal functions at the solution's chi, and step 9 (guard): where dt' != 0 the final chi must satisfy
// the universal Kepler equation to RESIDUAL_REL of its largest term, so that no overflow or stalled bracket can
// pass for a solution.
function universalFunctions(): i32 {
  const chi = uvChi;
  const r0 = uvR0;
  const sigma0 = uvSigma0;
  const dtr = uvDt;
  stumpff(uvAlpha * chi * chi);
  const u0 = stumpffGet(SC0);
  const u1 = chi * stumpffGet(SC1);
  const u2 = chi * chi * stumpffGet(SC2);
  const u3 = chi * chi * chi * stumpffGet(SC3);
  const r = r0 * u0 + sigma0 * u1 + u2;
  uvU0 = u0;
  uvU1 = u1;
  uvU2 = u2;
  uvU3 = u3;
  uvR = r;
  if (dtr == 0) return OK;
  const sdt = uvSqmu * dtr;
  const t1 = r0 * u1;
  const t2 = sigma0 * u2;
  const res = t1 + t2 + u3 - sdt;
  if (!isFinite(res) || !isFinite(r)) return ERR_OVERFLOW;
  if (!(abs(res) <= RESIDUAL_REL * (abs(t1) + abs(t2) + abs(u3) + abs(sdt)))) return ERR_NOT_CONVERGED;
  return OK;
}

/** Propagate (r0, v0) by dt under mu. Slots 0..5 = r, v; slot 6 = iterations. */
export function propagate(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real): i32 {
  put(6, 0);
  const st = solveUniversal(mu, r0x, r0y, r0z, v0x, v0y, v0z, dt);
  if (st == ERR_NOT_CONVERGED) put(6, uvIter);
  if (st != OK) return st;
  // Step 8: Lagrange coefficients. g is taken from chi (not dt - U3 / sqrt(mu)), so (f, g) describe exactly
  // the point chi reaches.
  const sqmu = uvSqmu;
  const r0 = uvR0;
  const sigma0 = uvSigma0;
  const u0 = uvU0;
  const u1 = uvU1;
  const u2 = uvU2;
  const r = uvR;
  const f = <real>1.0 - u2 / r0;
  const g = (r0 * u1 + sigma0 * u2) / sqmu;
  const fd = -sqmu * (u1 / r) / r0;
  const gd = (r0 * u0 + sigma0 * u1) / r; // = 1 - U2 / r, without the cancellation near apoapsis
  const ax = uvAx, ay = uvAy, az = uvAz;
  const bx = uvBx, by = uvBy, bz = uvBz;
  const rx = f * ax + g * bx;
  const ry = f * ay + g * by;
  const rz = f * az + g * bz;
  const vx = fd * ax + gd * bx;
  const vy = fd * ay + gd * by;
  const vz = fd * az + gd * bz;
  if (!(r > 0) || !isFinite(rx) || !isFinite(ry) || !isFinite(rz) || !isFinite(vx) || !isFinite(vy) || !isFinite(vz)) return ERR_OVERFLOW;
  put(0, rx);
  put(1, ry);
  put(2, rz);
  put(3, vx);
  put(4, vy);
  put(5, vz);
  put(6, uvIter);
  return OK;
}

// Step 7 for alpha <= 0 (hyperbola or parabola, e >= 1): the periapsis state, r_p, p and dt' = tau + dtr (tau the
// time from periapsis to r0, negative before periapsis) to the scratch as the new anchor. False when an
// intermediate is not finite. r0 = |r|, rv = r . v.
function periapsisAnchor(mu: real, sqmu: real, alpha: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real,
  r0: real, rv: real, dtr: real): bool {
  // h = r0 x v0 with every product's rounding error recovered: r0 and v0 are nearly parallel far out on a
  // hairpin, and a plain cross product would lose about log10(r0 v0 / |h|) digits of h, hence of P and e.
  const hx = diffProd(ry, vz, rz, vy);
  const hy = diffProd(rz, vx, rx, vz);
  const hz = diffProd(rx, vy, ry, vx);
  const h = RMath.sqrt(hx * hx + hy * hy + hz * hz);
  const p = h * (h / mu);
  // Eccentricity vector (v0 x h) / mu - r0 / |r0|: both terms are of order 1, so nothing cancels.
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
  const tau = timeFromPeriapsis(sqmu, alpha, rp, (rv / sqmu) / e);
  putAnchor(rp * px, rp * py, rp * pz, vp * qx, vp * qy, vp * qz, rp, 0, p, tau + dtr, 1);
  return isFinite(tau) && isFinite(vp) && isFinite(qx + qy + qz) && rp > 0;
}

// Step 7's time from periapsis to r0 for alpha <= 0, given U1 at r0 (r . v / sqrt(mu) = e U1 there, so
// U1 = sigma0 / e): chi = asinh(U1 sqrt(-alpha)) / sqrt(-alpha) (= U1 on the parabola), and sqrt(mu) tau =
// r_p U1 + U3 (the universal Kepler equation from periapsis): two terms of the sign of chi, no cancellation.
function timeFromPeriapsis(sqmu: real, alpha: real, rp: real, u1: real): real {
  let chi = u1;
  if (alpha < 0) {
    const sa = RMath.sqrt(-alpha);
    chi = RMath.asinh(u1 * sa) / sa;
  }
  uvChiAnchor = chi;
  let u3: real;
  const psi = alpha * chi * chi;
  if (psi < -U3_DIFF_PSI) {
    // U3 = (chi - U1) / alpha with U1 taken from sigma0, not from exp(|H0|): the rounding of chi (about
    // |H0| ulps of H0 = chi sqrt(-alpha)) would otherwise be amplified |H0| times in U3, and once more by
    // the cancellation tau + dt when the arc ends near periapsis.
    u3 = (chi - u1) / alpha;
  } else {
    stumpff(psi);
    u3 = chi * chi * chi * stumpffGet(SC3);
  }
  return (rp * u1 + u3) / sqmu;
}

// Steps 4-6: the root chi of the universal Kepler equation for dtr != 0 about the anchor (r0, sigma0), written
// with the step count to the scratch (uvChi, uvIter). Returns OK, ERR_OVERFLOW (sqrt(mu) dt' not finite),
// ERR_NOT_CONVERGED (cap reached) or, with hairpinTest, NEEDS_ANCHOR (step 7's test). v2 = |v0|^2.
function solveChi(sqmu: real, r0: real, sigma0: real, alpha: real, p: real, dtr: real, v2: real, hairpinTest: bool): i32 {
  const sdt = sqmu * dtr;
  if (!isFinite(sdt)) return ERR_OVERFLOW;
  // Eccentricity, for the bracket and the starter only.
  const ecos: real = <real>1.0 - r0 * alpha;
  const esin: real = alpha > 0 ? sigma0 * RMath.sqrt(alpha) : <real>0.0;
  const e = alpha > 0 ? RMath.sqrt(ecos * ecos + esin * esin) : RMath.sqrt(<real>1.0 - p * alpha);
  let bound = abs(sdt) / (RP_SAFETY * p / (<real>1.0 + e));
  if (alpha > 0) bound = min(bound, CHI_TURN / RMath.sqrt(alpha));
  if (!(bound <= MAX_REAL)) bound = MAX_REAL;
  const lo: real = dtr > 0 ? 0 : -bound;
  const hi: real = dtr > 0 ? bound : 0;
  let chi = chiStarter(sqmu, sigma0, alpha, p, e, ecos, esin, sdt, dtr);
  let test = hairpinTest && alpha <= 0;
  if (!(chi > lo && chi < hi)) {
    chi = <real>0.5 * (lo + hi);
    test = false;
  }
  return laguerreConway(sqmu, r0, sigma0, alpha, sdt, v2, chi, lo, hi, test);
}

// Step 5: the starter from the project's Kepler solvers, NaN when none applies or a solver fails.
// e cos E0 = ecos, e sin E0 = esin (ellipse).
function chiStarter(sqmu: real, sigma0: real, alpha: real, p: real, e: real, ecos: real, esin: real, sdt: real, dtr: real): real {
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
  return chi;
}

// Step 6: Laguerre-Conway from chi inside the bracket [lo, hi]; with `test`, step 7's test at the starter.
function laguerreConway(sqmu: real, r0: real, sigma0: real, alpha: real, sdt: real, v2: real, chi: real, lo: real, hi: real, test: bool): i32 {
  const q = <real>1.0 - alpha * r0;
  for (let it = 1; it <= UNIVERSAL_MAX_ITER; it++) {
    stumpff(alpha * chi * chi);
    const u0 = stumpffGet(SC0);
    const u1 = chi * stumpffGet(SC1);
    const u2 = chi * chi * stumpffGet(SC2);
    const u3 = chi * chi * chi * stumpffGet(SC3);
    const F = r0 * u1 + sigma0 * u2 + u3 - sdt;
    if (test && it == 1 && hairpinCancels(sqmu, r0, sigma0, sdt, v2, u0, u1, u2, u3)) return NEEDS_ANCHOR;
    if (F == 0) return putChi(chi, it);
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
    if (step <= UNIVERSAL_STOP_REL * abs(chi)) return putChi(chi, it);
  }
  uvChi = chi;
  uvIter = <real>UNIVERSAL_MAX_ITER;
  return ERR_NOT_CONVERGED;
}

// A converged chi and its step count, to the scratch.
function putChi(chi: real, it: i32): i32 {
  uvChi = chi;
  uvIter = <real>it;
  return OK;
}

// Step 7's test, at the starter: cancellation in the universal Kepler equation, and in r = f r0 + g v0.
function hairpinCancels(sqmu: real, r0: real, sigma0: real, sdt: real, v2: real, u0: real, u1: real, u2: real, u3: real): bool {
  const kCancel = (abs(r0 * u1) + abs(sigma0 * u2) + abs(u3)) / abs(sdt);
  const r = r0 * u0 + sigma0 * u1 + u2;
  const fgCancel = (abs(r0 - u2) + abs(r0 * u1 + sigma0 * u2) * RMath.sqrt(v2) / sqmu) / r;
  return !(kCancel <= HAIRPIN_CANCEL && fgCancel <= HAIRPIN_CANCEL);
}
