// Gravity of an axisymmetric body: point mass plus the zonal harmonics J2 and J3.
//
// Model (body-fixed axes with z along the symmetry axis; for zonal terms this is also any inertial frame
// sharing that axis, because the field does not depend on longitude):
//   potential energy per unit mass  V = -mu/r [1 - J2 (R/r)^2 P2(s) - J3 (R/r)^3 P3(s)],  s = z/r,
//   P2(s) = (3 s^2 - 1)/2,  P3(s) = (5 s^3 - 3 s)/2   (Legendre polynomials),
//   acceleration a = -grad V.
// Method
//  1. r^2 = x^2 + y^2 + z^2, r = sqrt(r^2), s = z/r, q = R/r.
//  2. Point mass: a = -mu r_vec / r^3.
//  3. J2 (gradient of the P2 term, written out):
//       a_x = -1.5 J2 mu/r^2 q^2 (x/r) (1 - 5 s^2),  a_y likewise with y,  a_z = -1.5 J2 mu/r^2 q^2 (z/r) (3 - 5 s^2).
//  4. J3: a_x = -2.5 J3 mu/r^2 q^3 (x/r) (3 s - 7 s^3),  a_y likewise,
//          a_z = -2.5 J3 mu/r^2 q^3 (6 s^2 - 7 s^4 - 3/5).
//  The expressions are the standard zonal-harmonic field (for example D. A. Vallado, "Fundamentals of
//  Astrodynamics and Applications", 4th ed. 2013, ch. 8, recalled from memory); tests/integrate-gravity.test.ts
//  checks them against a 60-digit numerical gradient of the potential above.
// Domain: mu > 0, R > 0, any finite J2, J3; r > 0. The zonal series is meant for r > R (outside the body);
// it is evaluated wherever r > 0.
// The helpers below assume finite inputs with r > 0 (the integrators check); the kernel `gravity_zonal` checks.
// Special cases (gravity_zonal), in order: NaN or infinite input -> ERR_NONFINITE; mu <= 0 or R <= 0 ->
// ERR_DOMAIN; r = 0 -> ERR_DEGENERATE; a result beyond the largest real -> ERR_OVERFLOW. Iteration cap: none.
// Accuracy: a few ULP of each term (the terms are sums of like-signed products except 1 - 5 s^2 and its kin).
// Measured (release f64, tests/integrate-gravity.test.ts against the 60-digit gradient, 2026-12): acceleration
// 6.0e-16 relative, potential 2.4e-16 relative; the zonal part alone 1.0e-11 (J2) and 1.3e-9 (J3) relative, seen
// through the rounding of the much larger point-mass term.
// Output slots (gravity_zonal): 0..2 = acceleration, 3 = potential energy per unit mass V.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { IS_F32 } from "./real";
import { scale2, exponent2, maxAbs3 } from "./invariants";

// File-private scratch: the acceleration of the last `accel` call (wasm globals, no linear memory), read by the
// caller right after the call through accelX(), accelY(), accelZ().
let lastAx: real = 0;
let lastAy: real = 0;
let lastAz: real = 0;

/** x component of the last `accel` result. */
export function accelX(): real {
  return lastAx;
}
/** y component of the last `accel` result. */
export function accelY(): real {
  return lastAy;
}
/** z component of the last `accel` result. */
export function accelZ(): real {
  return lastAz;
}

// Window of the plain formulas: r^2 in [2^-400, 2^400] and mu in [2^-200, 2^200] (f64; 2^+-60 and 2^+-30 in
// f32). Then 1/r, mu/r, mu/r^2 and mu/r^3 are all within 2^+-800 (2^+-120): nothing under- or overflows except
// through R / r, where an overflow gives a non-finite result (a failure status) and an underflow drops
// zonal terms below an ulp of the point mass. Outside it accel and potential work on the scaled problem
// x' = x 2^kx (largest |component| in [1, 2)), R' = R 2^kx, mu' = mu 2^km (in [1, 2)): the same field in
// other units, exact, scaled back by 2^(2 kx - km) (acceleration) and 2^(kx - km) (potential). Results below
// the normal range come out with gradual underflow (absolute error below a few 2^-1074, or 2^-149 in f32).
// (Before 2026-12 x^2 overflowed: gravity_zonal(398600.4418, 0, 0, 1, 1.797e308, 0, 0) gave potential 0,
// true -2.2e-303.)
const G_R2_LO: real = IS_F32 ? <real>8.673617379884035e-19 : <real>3.8725919148493183e-121; // 2^-60, 2^-400; f64 0x26F0000000000000, f32 0x21800000
const G_R2_HI: real = IS_F32 ? <real>1152921504606846976.0 : <real>2.5822498780869086e120; // 2^60, 2^400; f64 0x58F0000000000000, f32 0x5D800000
const G_MU_LO: real = IS_F32 ? <real>9.313225746154785e-10 : <real>6.223015277861142e-61; // 2^-30, 2^-200; f64 0x3370000000000000, f32 0x30800000
const G_MU_HI: real = IS_F32 ? <real>1073741824.0 : <real>1.6069380442589903e60; // 2^30, 2^200; f64 0x4C70000000000000, f32 0x4E800000

// Outside the window: x' = x 2^lengthExp(..), mu' = mu 2^muExp(mu) (finite x, y, z not all 0; mu > 0).
function lengthExp(x: real, y: real, z: real): i32 {
  return -exponent2(maxAbs3(x, y, z));
}
function muExp(mu: real): i32 {
  return -exponent2(mu);
}

// True when r2 = x^2 + y^2 + z^2 and mu lie in the window where accel, potential and gradient compute directly.
function inWindow(mu: real, r2: real): bool {
  return r2 >= G_R2_LO && r2 <= G_R2_HI && mu >= G_MU_LO && mu <= G_MU_HI;
}

// The scaled problem of a point outside the window (scaleProblem writes it; file-private scratch, read at once by
// the caller): x' = x 2^sK, R' = R 2^sK, mu' = mu 2^sKm, r2' = x'^2 + y'^2 + z'^2.
let sK: i32 = 0;
let sKm: i32 = 0;
let sX: real = 0;
let sY: real = 0;
let sZ: real = 0;
let sR: real = 0;
let sMu: real = 0;
let sR2: real = 0;

function scaleProblem(mu: real, R: real, x: real, y: real, z: real): void {
  sK = lengthExp(x, y, z);
  sKm = muExp(mu);
  sX = scale2(x, sK);
  sY = scale2(y, sK);
  sZ = scale2(z, sK);
  sR = scale2(R, sK);
  sMu = scale2(mu, sKm);
  sR2 = sX * sX + sY * sY + sZ * sZ;
}

/**
 * Acceleration at (x, y, z), read afterwards with accelX(), accelY(), accelZ(). Zonal terms are skipped when
 * both coefficients are zero.
 */
export function accel(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real): void {
  const r2 = x * x + y * y + z * z;
  if (inWindow(mu, r2)) {
    accelPlain(mu, j2, j3, R, x, y, z, r2);
    return;
  }
  scaleProblem(mu, R, x, y, z);
  accelPlain(sMu, j2, j3, sR, sX, sY, sZ, sR2);
  const back = 2 * sK - sKm;
  lastAx = scale2(lastAx, back);
  lastAy = scale2(lastAy, back);
  lastAz = scale2(lastAz, back);
}

// accel inside the window (r2 = x^2 + y^2 + z^2), to the scratch.
function accelPlain(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real, r2: real): void {
  const r = RMath.sqrt(r2);
  const ir = <real>1.0 / r;
  const k = mu * ir * ir * ir; // mu / r^3
  let fx = -k * x;
  let fy = -k * y;
  let fz = -k * z;
  if (j2 != 0 || j3 != 0) {
    const s = z * ir;
    const s2 = s * s;
    const q = R * ir;
    const q2 = q * q;
    const ux = x * ir;
    const uy = y * ir;
    const g = mu * ir * ir; // mu / r^2
    // J2
    const c2 = <real>-1.5 * j2 * g * q2;
    const t2xy = c2 * (<real>1.0 - <real>5.0 * s2);
    fx += t2xy * ux;
    fy += t2xy * uy;
    fz += c2 * s * (<real>3.0 - <real>5.0 * s2);
    // J3
    const c3 = <real>-2.5 * j3 * g * q2 * q;
    const t3xy = c3 * s * (<real>3.0 - <real>7.0 * s2);
    fx += t3xy * ux;
    fy += t3xy * uy;
    fz += c3 * (<real>6.0 * s2 - <real>7.0 * s2 * s2 - <real>0.6);
  }
  lastAx = fx;
  lastAy = fy;
  lastAz = fz;
}

/** Potential energy per unit mass V at (x, y, z) (zero at infinity, negative near the body). */
export function potential(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real): real {
  const r2 = x * x + y * y + z * z;
  if (inWindow(mu, r2)) return potentialPlain(mu, j2, j3, R, x, y, z, r2);
  scaleProblem(mu, R, x, y, z);
  return scale2(potentialPlain(sMu, j2, j3, sR, sX, sY, sZ, sR2), sK - sKm);
}

// potential inside the window (r2 = x^2 + y^2 + z^2).
function potentialPlain(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real, r2: real): real {
  const r = RMath.sqrt(r2);
  const ir = <real>1.0 / r;
  const pm = -mu * ir;
  if (j2 == 0 && j3 == 0) return pm;
  const s = z * ir;
  const s2 = s * s;
  const q = R * ir;
  const q2 = q * q;
  const p2 = <real>0.5 * (<real>3.0 * s2 - <real>1.0);
  const p3 = <real>0.5 * s * (<real>5.0 * s2 - <real>3.0);
  // V = pm (1 - J2 q^2 P2 - J3 q^3 P3); the zonal part is added as a small correction to pm.
  return pm - pm * q2 * (j2 * p2 + j3 * q * p3);
}

/**
 * Zonal gravity at one point: acceleration (slots 0..2) and potential energy per unit mass (slot 3).
 * Statuses: ERR_NONFINITE, ERR_DOMAIN (mu <= 0 or R <= 0), ERR_DEGENERATE (r = 0), ERR_OVERFLOW (a result beyond
 * the largest real, e.g. mu / r^2 for r very small, or R / r so large that a zonal term overflows).
 */
export function gravity_zonal(mu: real, j2: real, j3: real, radius: real, x: real, y: real, z: real): i32 {
  if (!isFinite(mu) || !isFinite(j2) || !isFinite(j3) || !isFinite(radius) || !isFinite(x) || !isFinite(y) || !isFinite(z)) {
    return ERR_NONFINITE;
  }
  if (!(mu > 0) || !(radius > 0)) return ERR_DOMAIN;
  if (x == 0 && y == 0 && z == 0) return ERR_DEGENERATE;
  accel(mu, j2, j3, radius, x, y, z);
  const v = potential(mu, j2, j3, radius, x, y, z);
  if (!isFinite(lastAx) || !isFinite(lastAy) || !isFinite(lastAz) || !isFinite(v)) return ERR_OVERFLOW; // 1/r^3 overflows
  put(0, lastAx);
  put(1, lastAy);
  put(2, lastAz);
  put(3, v);
  return OK;
}

// ---- gravity gradient ---------------------------------------------------------------------------------------
// The gradient G = d a / d r (a symmetric 3x3 matrix, minus the Hessian of V), for the variational equations of
// the integrators (variational.ts). Derived here by hand from the acceleration of steps 2..4 above (the potential
// V of the header: Vallado 2013, ch. 8, recalled from memory), with u = r_vec / r, s = z / r, q = R / r:
//  point mass  G = mu / r^3 (3 u u^T - I)
//  J2, K2 = -1.5 J2 mu q^2 / r^3:
//    G_xx = K2 (1 - 5 s^2 - 5 ux^2 + 35 ux^2 s^2),  G_yy likewise with uy,  G_xy = K2 ux uy (35 s^2 - 5),
//    G_xz = K2 ux s (35 s^2 - 15),  G_yz likewise with uy,  G_zz = K2 (3 - 30 s^2 + 35 s^4)
//  J3, K3 = -2.5 J3 mu q^3 / r^3:
//    G_xx = K3 (3 s - 7 s^3 + ux^2 (63 s^3 - 21 s)),  G_yy likewise,  G_xy = K3 ux uy (63 s^3 - 21 s),
//    G_xz = K3 ux (3 - 42 s^2 + 63 s^4),  G_yz likewise,  G_zz = K3 (15 s - 70 s^3 + 63 s^5)
// Each zonal part has zero trace (Laplace's equation; ux^2 + uy^2 = 1 - s^2), a check done on paper and by
// tests/integrate-variational.test.ts through the 50-digit Jacobian of the discrete map.
// Read after the call with gradXX() ... gradZZ(). Same domain, window and scaling as accel: outside the window
// the scaled problem's G is scaled back by 2^(3 kx - km).

let lastGxx: real = 0;
let lastGxy: real = 0;
let lastGxz: real = 0;
let lastGyy: real = 0;
let lastGyz: real = 0;
let lastGzz: real = 0;

/** G_xx of the last `gradient` call (likewise the five below). */
export function gradXX(): real {
  return lastGxx;
}
export function gradXY(): real {
  return lastGxy;
}
export function gradXZ(): real {
  return lastGxz;
}
export function gradYY(): real {
  return lastGyy;
}
export function gradYZ(): real {
  return lastGyz;
}
export function gradZZ(): real {
  return lastGzz;
}

/** Gravity gradient d a / d r at (x, y, z), read afterwards with gradXX() .. gradZZ(). */
export function gradient(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real): void {
  const r2 = x * x + y * y + z * z;
  if (inWindow(mu, r2)) {
    gradientPlain(mu, j2, j3, R, x, y, z, r2);
    return;
  }
  scaleProblem(mu, R, x, y, z);
  gradientPlain(sMu, j2, j3, sR, sX, sY, sZ, sR2);
  const back = 3 * sK - sKm;
  lastGxx = scale2(lastGxx, back);
  lastGxy = scale2(lastGxy, back);
  lastGxz = scale2(lastGxz, back);
  lastGyy = scale2(lastGyy, back);
  lastGyz = scale2(lastGyz, back);
  lastGzz = scale2(lastGzz, back);
}

// gradient inside the window (r2 = x^2 + y^2 + z^2), to the scratch.
function gradientPlain(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real, r2: real): void {
  const r = RMath.sqrt(r2);
  const ir = <real>1.0 / r;
  const g3 = mu * ir * ir * ir; // mu / r^3, the scale of every term of G
  const ux = x * ir;
  const uy = y * ir;
  const s = z * ir;
  const t3 = <real>3.0 * g3;
  let gxx = t3 * ux * ux - g3;
  let gyy = t3 * uy * uy - g3;
  let gzz = t3 * s * s - g3;
  let gxy = t3 * ux * uy;
  let gxz = t3 * ux * s;
  let gyz = t3 * uy * s;
  if (j2 != 0 || j3 != 0) {
    const s2 = s * s;
    const q = R * ir;
    const q2 = q * q;
    const ux2 = ux * ux;
    const uy2 = uy * uy;
    // J2
    const c2 = <real>-1.5 * j2 * g3 * q2;
    const d2 = <real>35.0 * s2 - <real>5.0; // 35 s^2 - 5
    const e2 = <real>1.0 - <real>5.0 * s2;
    gxx += c2 * (e2 + ux2 * d2);
    gyy += c2 * (e2 + uy2 * d2);
    gxy += c2 * ux * uy * d2;
    const f2 = c2 * s * (<real>35.0 * s2 - <real>15.0);
    gxz += f2 * ux;
    gyz += f2 * uy;
    gzz += c2 * (<real>3.0 - <real>30.0 * s2 + <real>35.0 * s2 * s2);
    // J3
    const c3 = <real>-2.5 * j3 * g3 * q2 * q;
    const d3 = s * (<real>63.0 * s2 - <real>21.0); // 63 s^3 - 21 s
    const e3 = s * (<real>3.0 - <real>7.0 * s2);
    gxx += c3 * (e3 + ux2 * d3);
    gyy += c3 * (e3 + uy2 * d3);
    gxy += c3 * ux * uy * d3;
    const f3 = c3 * (<real>3.0 - <real>42.0 * s2 + <real>63.0 * s2 * s2);
    gxz += f3 * ux;
    gyz += f3 * uy;
    gzz += c3 * s * (<real>15.0 - <real>70.0 * s2 + <real>63.0 * s2 * s2);
  }
  lastGxx = gxx;
  lastGxy = gxy;
  lastGxz = gxz;
  lastGyy = gyy;
  lastGyz = gyz;
  lastGzz = gzz;
}
