// State transition matrix of two-body motion: (mu, r0, v0, dt) -> (r, v) and Phi = d(r, v) / d(r0, v0), every
// conic, dt of either sign, any number of revolutions, from the propagation's own universal-variable solution.
//
// Method (the universal-variable form of the transition matrix: R. H. Battin, "An Introduction to the Mathematics
// and Methods of Astrodynamics", AIAA 1987, 9.7, after W. H. Goodyear, "Completely general closed-form solution
// for coordinates and partial derivatives of the two-body problem", Astron. J. 70 (1965) 189-192; written here by
// differentiating the Lagrange coefficients through chi, as Goodyear does):
//  1. propagate (universal.ts) with the same inputs: same special cases and statuses, the same chi, and the same
//     r, v bits (slots 0..5 are propagate's); its solution (solveUniversal's) is read with universalGet. It is
//     expanded about an anchor state (A, B) with
//     |A| = r0, sigma0 = A . B / sqrt(mu), alpha = 2 / |r0| - |v0|^2 / mu, and chi solving
//     F = r0 U1 + sigma0 U2 + U3 - sqrt(mu) dt' = 0, dt' = dt - k T (k whole revolutions of the ellipse removed,
//     T = 2 pi / (sqrt(mu) alpha^(3/2))). The anchor is (r0, v0), or periapsis on a hairpin hyperbola.
//  2. r = f A + g B, v = fd A + gd B with f = 1 - U2 / r0, g = (r0 U1 + sigma0 U2) / sqrt(mu),
//     fd = -sqrt(mu) U1 / (r r0), gd = 1 - U2 / r; every one a function of (r0, sigma0, alpha, chi).
//  3. Partials of the universal functions U_k = chi^k c_k(alpha chi^2): dU_k / dchi = U_(k-1) (dU0 / dchi =
//     -alpha U1), dU_k / dalpha = (k U_(k+2) - chi U_(k+1)) / 2 = chi^(k+2) (k c_(k+2) - c_(k+1)) / 2 (from
//     c_n'(psi) = (n c_(n+2) - c_(n+1)) / 2, Battin 1987, 4.5); c4, c5 by their series for |psi| <= 4, else
//     from c_n = 1 / n! - psi c_(n+2).
//  4. chi's partials from F = 0 (implicit differentiation, F_chi = r): dchi = -(U1 dr0 + U2 dsigma0 + F_alpha
//     dalpha) / r, F_alpha = r0 dU1/dalpha + sigma0 dU2/dalpha + dU3/dalpha - sqrt(mu) d(dt')/dalpha, the last
//     term -3 pi k / alpha^(5/2): the secular growth of the removed revolutions (their period depends on alpha).
//  5. Each q of f, g, fd, gd gets its partials (q_r0, q_sigma, q_alpha) by the chain rule through step 3 and 4;
//     with dr0 = A . dA / r0, dsigma0 = (B . dA + A . dB) / sqrt(mu), dalpha = -2 A . dA / r0^3 - 2 B . dB / mu,
//     grad_A q = (q_r0 / r0 - 2 q_alpha / r0^3) A + (q_sigma / sqrt(mu)) B and grad_B q = (q_sigma / sqrt(mu)) A
//     - (2 q_alpha / mu) B, so every 3x3 block is q I + A (.)^T + B (.)^T:
//       d r / d A = f I + A grad_A f^T + B grad_A g^T,   d r / d B = g I + A grad_B f^T + B grad_B g^T,
//       d v / d A = fd I + A grad_A fd^T + B grad_A gd^T, d v / d B = gd I + A grad_B fd^T + B grad_B gd^T.
//  6. Anchored at periapsis (hairpin hyperbolas, universal.ts step 7) the map r0 -> periapsis is the inverse of
//     the flow periapsis -> r0 (universal anomaly chi_a): Phi = Phi_p(chi) Phi_p(chi_a)^-1, both from step 5 about
//     periapsis, the inverse exact for a symplectic matrix: [[R, S], [T, U]]^-1 = [[U^T, -S^T], [-T^T, R^T]].
//  7. Guard: every entry of Phi finite, else ERR_OVERFLOW (an ellipse over about 1e300 s: propagate is ok there,
//     but the secular terms of 1e304 revolutions are not representable).
// Domain, special cases, statuses and the iteration cap (UNIVERSAL_MAX_ITER): those of propagate (universal.ts),
// plus step 7.
// Output slots: 0..5 = r, v (propagate's bits); 6..41 = phi_ij = d(final component i) / d(initial component j),
// row-major, components x, y, z, vx, vy, vz; 42 = iterations (propagate's).
// File-private scratch (module-level scalars, no memory): the coefficients of step 5 for one or two solutions.
// Accuracy (release f64 build, vectors/transition.csv: 280 cases, up to 25 revolutions both ways, against central
// differences of the 60-digit propagation reference, harness/verify/reference/transition.ts), as the error of the
// scale-free Phi~ = D^-1 Phi D (D = diag(L, L, L, V, V, V), L = |r0|, V = sqrt(mu / L)) over its largest entry:
// low orbits 4.9e-14, geostationary 7.5e-14, Molniya-like 7.9e-13, transfer 1.8e-13, hyperbolic 2.4e-15, and
// e = 0.999 3.8e-11 (23 revolutions, max |Phi~| 6e7, cond_phi 1.6e-10); near-parabolic 1.0e-4 where cond_phi
// reaches 3.7e-4 (2 - r v^2 / mu cancels, as for propagate). Every case within max(1e-9, 10 cond_phi), the worst at
// 0.076 of it. Hairpin hyperbolas through the periapsis anchor (tests/transition-hairpin.test.ts): 2e-15 to
// 1.1e-13. Symplectic defect |Phi~^T J Phi~ - J| at most 8.5e-16 max |Phi~|^2 on the suite.
// f32 build (the suite's inputs rounded to binary32): 273 of 280 ok, 7 ERR_OVERFLOW, never ok with a non-finite
// output; Phi~ within 2.3e-5 of its largest entry from the f64 result where that entry is at most 100.

import { OK, FIRST_ERROR, ERR_OVERFLOW } from "./status";
import { put, got } from "./io";
import { TRANSITION_PHI_11, TRANSITION_ITERATIONS, PROPAGATE_ITERATIONS } from "./abi";
import { stumpff, stumpffGet, SC0, SC1, SC2, SC3 } from "./stumpff";
import { PI, SIXTH, TWENTYFOURTH } from "./real";
import { F5 } from "./factorials";
import { propagate } from "./universal";
import {
  universalGet, UV_AX, UV_AY, UV_AZ, UV_BX, UV_BY, UV_BZ, UV_R0, UV_SIGMA0, UV_ALPHA, UV_CHI, UV_REVS, UV_CHI_ANCHOR, UV_ANCHORED, UV_SQMU,
} from "./universal";

/** Terms of the series of c4 and c5 for |psi| <= C45_SERIES_MAX: the first omitted is below 4^14 / 32! = 1e-27. */
const C45_TERMS: i32 = 14;
const C45_SERIES_MAX: real = 4.0;
const HALF: real = <real>0.5;

/** Slot of phi_11 and of the iteration count (the ABI table's). */
const PHI_SLOT: i32 = TRANSITION_PHI_11;
const ITER_SLOT: i32 = TRANSITION_ITERATIONS;

// c4 and c5 of psi (step 3), left in sC4, sC5.
let sC4: real = 0;
let sC5: real = 0;
function stumpff45(psi: real, c2: real, c3: real): void {
  if (abs(psi) > C45_SERIES_MAX) {
    sC4 = (HALF - c2) / psi;
    sC5 = (SIXTH - c3) / psi;
    return;
  }
  // c_n = sum_j (-psi)^j / (2j + n)!, each term from the one before.
  let t4: real = TWENTYFOURTH;
  let t5: real = F5;
  let s4: real = 0;
  let s5: real = 0;
  const y = -psi;
  // Largest term first: |psi| <= 4 keeps the sum of |terms| within a factor 2 of the result (a few ulp).
  for (let j = 0; j < C45_TERMS; j++) {
    s4 += t4;
    s5 += t5;
    const n = <real>2.0 * <real>j;
    t4 = t4 * y / ((n + <real>5.0) * (n + <real>6.0));
    t5 = t5 * y / ((n + <real>6.0) * (n + <real>7.0));
  }
  sC4 = s4;
  sC5 = s5;
}

// Step 5's results: the Lagrange coefficients and the gradient coefficients of each: grad_A q = qa A + qb B,
// grad_B q = qb A + qd B.
let cF: real = 0, cFa: real = 0, cFb: real = 0, cFd: real = 0;
let cG: real = 0, cGa: real = 0, cGb: real = 0, cGd: real = 0;
let cFt: real = 0, cFta: real = 0, cFtb: real = 0, cFtd: real = 0;
let cGt: real = 0, cGta: real = 0, cGtb: real = 0, cGtd: real = 0;

// Steps 2-5 for the solution chi about an anchor of radius r0 (sigma0, alpha), with k revolutions removed.
function coefficients(mu: real, sqmu: real, r0: real, sigma0: real, alpha: real, chi: real, revs: real): void {
  const psi = alpha * chi * chi;
  stumpff(psi);
  const c0 = stumpffGet(SC0), c1 = stumpffGet(SC1), c2 = stumpffGet(SC2), c3 = stumpffGet(SC3);
  stumpff45(psi, c2, c3);
  const x2 = chi * chi;
  const u0 = c0;
  const u1 = chi * c1;
  const u2 = x2 * c2;
  const u3 = x2 * chi * c3;
  // dU_k / dalpha = chi^(k+2) (k c_(k+2) - c_(k+1)) / 2.
  const a0 = -HALF * x2 * c1;
  const a1 = HALF * x2 * chi * (c3 - c2);
  const a2 = HALF * x2 * x2 * (<real>2.0 * sC4 - c3);
  const a3 = HALF * x2 * x2 * chi * (<real>3.0 * sC5 - sC4);
  const r = r0 * u0 + sigma0 * u1 + u2;
  // Step 4: chi's partials; the removed revolutions add -sqrt(mu) d(dt')/dalpha = -3 pi k / alpha^(5/2).
  let fAlpha = r0 * a1 + sigma0 * a2 + a3;
  if (revs != 0) fAlpha -= <real>3.0 * PI * revs / (alpha * alpha * RMath.sqrt(alpha));
  const xr = -u1 / r;
  const xs = -u2 / r;
  const xa = -fAlpha / r;
  // Partials of U0..U2 in (r0, sigma0, alpha): dU_k = U_(k-1) dchi + a_k dalpha.
  const du0 = -alpha * u1;
  const U0r = du0 * xr, U0s = du0 * xs, U0a = du0 * xa + a0;
  const U1r = u0 * xr, U1s = u0 * xs, U1a = u0 * xa + a1;
  const U2r = u1 * xr, U2s = u1 * xs, U2a = u1 * xa + a2;
  // r = r0 U0 + sigma0 U1 + U2.
  const rr = u0 + r0 * U0r + sigma0 * U1r + U2r;
  const rs = r0 * U0s + u1 + sigma0 * U1s + U2s;
  const ra = r0 * U0a + sigma0 * U1a + U2a;
  // f = 1 - U2 / r0.
  const fR = (u2 / r0 - U2r) / r0, fS = -U2s / r0, fA = -U2a / r0;
  // g = (r0 U1 + sigma0 U2) / sqrt(mu).
  const gR = (u1 + r0 * U1r + sigma0 * U2r) / sqmu, gS = (r0 * U1s + u2 + sigma0 * U2s) / sqmu, gA = (r0 * U1a + sigma0 * U2a) / sqmu;
  // fd = -sqrt(mu) U1 / (r r0).
  const k = -sqmu / (r * r0);
  const ftR = k * (U1r - u1 * rr / r - u1 / r0), ftS = k * (U1s - u1 * rs / r), ftA = k * (U1a - u1 * ra / r);
  // gd = 1 - U2 / r.
  const gtR = (u2 * rr / r - U2r) / r, gtS = (u2 * rs / r - U2s) / r, gtA = (u2 * ra / r - U2a) / r;
  cF = <real>1.0 - u2 / r0;
  cG = (r0 * u1 + sigma0 * u2) / sqmu;
  cFt = k * u1;
  cGt = (r0 * u0 + sigma0 * u1) / r;
  // Step 5: grad_A q = (q_r0 / r0 - 2 q_alpha / r0^3) A + (q_sigma / sqrt(mu)) B, grad_B q = (q_sigma / sqrt(mu)) A - (2 q_alpha / mu) B.
  const w = <real>2.0 / (r0 * r0 * r0);
  const m2 = <real>2.0 / mu;
  cFa = fR / r0 - w * fA; cFb = fS / sqmu; cFd = -m2 * fA;
  cGa = gR / r0 - w * gA; cGb = gS / sqmu; cGd = -m2 * gA;
  cFta = ftR / r0 - w * ftA; cFtb = ftS / sqmu; cFtd = -m2 * ftA;
  cGta = gtR / r0 - w * gtA; cGtb = gtS / sqmu; cGtd = -m2 * gtA;
}

// The coefficients of step 5 kept for the second matrix of step 6 (Phi_p(chi_a)).
let kF: real = 0, kFa: real = 0, kFb: real = 0, kFd: real = 0;
let kG: real = 0, kGa: real = 0, kGb: real = 0, kGd: real = 0;
let kFt: real = 0, kFta: real = 0, kFtb: real = 0, kFtd: real = 0;
let kGt: real = 0, kGta: real = 0, kGtb: real = 0, kGtd: real = 0;

function keepCoefficients(): void {
  kF = cF; kFa = cFa; kFb = cFb; kFd = cFd;
  kG = cG; kGa = cGa; kGb = cGb; kGd = cGd;
  kFt = cFt; kFta = cFta; kFtb = cFtb; kFtd = cFtd;
  kGt = cGt; kGta = cGta; kGtb = cGtb; kGtd = cGtd;
}

// The anchor (A, B), component i (0..2).
let sAX: real = 0, sAY: real = 0, sAZ: real = 0, sBX: real = 0, sBY: real = 0, sBZ: real = 0;
// @ts-ignore: decorator
@inline function anchorA(i: i32): real {
  return i == 0 ? sAX : i == 1 ? sAY : sAZ;
}
// @ts-ignore: decorator
@inline function anchorB(i: i32): real {
  return i == 0 ? sBX : i == 1 ? sBY : sBZ;
}

// Step 5: entry (i, j) (0..5) of the matrix from the current coefficients (kept: the coefficients of
// keepCoefficients) and the anchor: a row of r or v, a column of A or B.
function entry(kept: bool, i: i32, j: i32): real {
  const ai = anchorA(i % 3), bi = anchorB(i % 3), aj = anchorA(j % 3), bj = anchorB(j % 3);
  const d: real = i % 3 == j % 3 ? 1 : 0;
  // Row block: (f, g) for r, (fd, gd) for v; each with its gradient coefficients (x a + y b, or y a + z b).
  let q1: real, q1a: real, q1b: real, q1d: real, q2: real, q2a: real, q2b: real, q2d: real;
  if (i < 3) {
    q1 = kept ? kF : cF; q1a = kept ? kFa : cFa; q1b = kept ? kFb : cFb; q1d = kept ? kFd : cFd;
    q2 = kept ? kG : cG; q2a = kept ? kGa : cGa; q2b = kept ? kGb : cGb; q2d = kept ? kGd : cGd;
  } else {
    q1 = kept ? kFt : cFt; q1a = kept ? kFta : cFta; q1b = kept ? kFtb : cFtb; q1d = kept ? kFtd : cFtd;
    q2 = kept ? kGt : cGt; q2a = kept ? kGta : cGta; q2b = kept ? kGtb : cGtb; q2d = kept ? kGtd : cGtd;
  }
  if (j < 3) return d * q1 + ai * (q1a * aj + q1b * bj) + bi * (q2a * aj + q2b * bj);
  return d * q2 + ai * (q1b * aj + q1d * bj) + bi * (q2b * aj + q2d * bj);
}

// Step 6: entry (q, j) of M^-1 for the symplectic M = [[R, S], [T, U]] of the kept coefficients:
// M^-1 = [[U^T, -S^T], [-T^T, R^T]].
function inverseEntry(q: i32, j: i32): real {
  const qi = q % 3, jj = j % 3;
  if (q < 3 && j < 3) return entry(true, jj + 3, qi + 3);
  if (q < 3) return -entry(true, jj, qi + 3);
  if (j < 3) return -entry(true, jj + 3, qi);
  return entry(true, jj, qi);
}

/** Matrix size and half size (loop bounds). */
const N6: i32 = 6;

// Step 5 or 6: Phi into slots PHI_SLOT.. (anchored: the current matrix times the inverse of the kept one).
function writePhi(anchored: bool): void {
  for (let i = 0; i < N6; i++) {
    for (let j = 0; j < N6; j++) {
      let v: real;
      if (anchored) {
        v = 0;
        for (let q = 0; q < N6; q++) v += entry(false, i, q) * inverseEntry(q, j);
      } else {
        v = entry(false, i, j);
      }
      put(PHI_SLOT + N6 * i + j, v);
    }
  }
}

/**
 * Propagate (r0, v0) by dt under mu with the state transition matrix. Slots 0..5 = r, v; 6..41 = Phi row-major;
 * 42 = iterations.
 */
export function transition(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, dt: real): i32 {
  // propagate is solveUniversal plus the Lagrange coefficients: its solution is still there to be read.
  const st = propagate(mu, r0x, r0y, r0z, v0x, v0y, v0z, dt);
  const iterations = got(PROPAGATE_ITERATIONS);
  put(ITER_SLOT, iterations);
  if (st >= FIRST_ERROR) return st;
  const sqmu = universalGet(UV_SQMU);
  const ax = universalGet(UV_AX), ay = universalGet(UV_AY), az = universalGet(UV_AZ);
  const bx = universalGet(UV_BX), by = universalGet(UV_BY), bz = universalGet(UV_BZ);
  const r0 = universalGet(UV_R0), sigma0 = universalGet(UV_SIGMA0), alpha = universalGet(UV_ALPHA);
  const chi = universalGet(UV_CHI), revs = universalGet(UV_REVS);
  const anchored = universalGet(UV_ANCHORED) != 0;
  const chiA = universalGet(UV_CHI_ANCHOR);
  sAX = ax; sAY = ay; sAZ = az; sBX = bx; sBY = by; sBZ = bz;
  if (anchored) {
    coefficients(mu, sqmu, r0, sigma0, alpha, chiA, 0);
    keepCoefficients();
  }
  coefficients(mu, sqmu, r0, sigma0, alpha, chi, revs);
  writePhi(anchored);
  for (let k = PHI_SLOT; k < ITER_SLOT; k++) if (!isFinite(got(k))) return ERR_OVERFLOW;
  return OK;
}
