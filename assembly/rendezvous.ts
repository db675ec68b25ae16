// Two-impulse rendezvous in the first-order relative-motion model (assembly/relative.ts): from a relative state
// (x0, v0) at t0, the impulse dv1 at t0 that takes the deputy to the relative position rf at t0 + dt, and the
// impulse dv2 there that nulls its relative velocity. All vectors in the chief's rotating frame of their time
// (x radial, y in-track, z along h; relative.ts), km and km/s (or any consistent units).
//
// Method (the classical two-impulse solution of the linear model; e.g. Clohessy & Wiltshire 1960 for the
// circular case, here on Yamanaka & Ankersen's 2002 state transition matrix for any elliptic chief):
//  1. The chief's anomalies at t0 and t0 + dt (chiefAnomalies, relative.ts).
//  2. Columns of the transition matrix by mapping unit states (yaMap): the free drift Phi_rr x0 of the initial
//     position, and Phi_rv (position after dt from a unit velocity along each axis). Phi_rv is block diagonal:
//     an in-plane 2x2 block B (x, y from vx, vy) and the out-of-plane entry b_z (z from vz).
//  3. Conditioning: c = min(2 |det B| / |B|_F^2, |sin(th - th0)|), where th - th0 is the chief's true-anomaly
//     change. 2 |det B| / |B|_F^2 = 2 s1 s2 / (s1^2 + s2^2) for the singular values s1 >= s2 of B: 1 for a
//     multiple of a rotation, about 2 s2 / s1 (twice the reciprocal condition number) when B is nearly
//     singular. Both figures are dimensionless: the transformation to YA's variables scales B's two rows alike
//     (x and y are both divided by rho) and its two columns alike (vx, vy both by 1 / (k2 rho0)), which leaves
//     the first unchanged, and the second is b_z k2 rho rho0. c = 0 exactly where no solution exists for a
//     general rf: the out-of-plane motion at every half revolution of the true anomaly (th - th0 = k pi), the
//     in-plane motion at the zeros of det B (for the circular chief, from the Clohessy-Wiltshire matrix,
//     det B = (8 (1 - cos n t) - 3 n t sin n t) / n^2: n t = 2 pi k, where B's first column vanishes, and
//     n t = 2.81 pi, 4.89 pi, 6.92 pi, ..., 1.41, 2.45, 3.46 orbits; found numerically here).
//     c < NO_SOLUTION_COND -> ERR_NO_SOLUTION (dt = 0 included).
//     A transfer in the chief's plane (z0 = 0 and zf = 0) needs no out-of-plane solve: the answer there is
//     vz0+ = 0 whatever b_z (it keeps z = 0), so only the in-plane figure counts (a half-orbit transfer in the
//     plane is then no longer refused) and dv1z = -vz0.
//  4. v0+ = Phi_rv^-1 (rf - Phi_rr x0) (Cramer's rule on B; b_z alone); dv1 = v0+ - v0.
//  5. The arrival velocity v(t0 + dt) from (x0, v0+) (yaMap); dv2 = -v(t0 + dt).
// Special cases, in order: a NaN or infinite input -> ERR_NONFINITE; mu <= 0 or rc = 0 -> ERR_DOMAIN;
// rectilinear chief -> ERR_DEGENERATE; e >= 1 -> ERR_DOMAIN; c < NO_SOLUTION_COND -> ERR_NO_SOLUTION; a
// non-finite intermediate or result -> ERR_OVERFLOW. No iteration.
// Output slots: 0..2 = dv1 (frame at t0), 3..5 = dv2 (frame at t0 + dt), 6 = c.
// Accuracy: the solve loses about log2(1 / c) bits on top of relative_motion's error; the linear model's own
// error against the nonlinear transfer (Lambert, docs/relative-motion.md) grows with separation / radius.

import { OK, ERR_NONFINITE, ERR_NO_SOLUTION, ERR_OVERFLOW } from "./status";
import { put, got } from "./io";
import {
  RELATIVE_MOTION_X, RELATIVE_MOTION_Y, RELATIVE_MOTION_Z, RELATIVE_MOTION_VX, RELATIVE_MOTION_VY, RELATIVE_MOTION_VZ,
  RENDEZVOUS_LINEAR_DV1X, RENDEZVOUS_LINEAR_DV1Y, RENDEZVOUS_LINEAR_DV1Z, RENDEZVOUS_LINEAR_DV2X, RENDEZVOUS_LINEAR_DV2Y,
  RENDEZVOUS_LINEAR_DV2Z, RENDEZVOUS_LINEAR_COND,
} from "./abi";
import { IS_F32 } from "./real";
import { chiefAnomalies, yaMap, anomalyGapSin } from "./relative";

/**
 * Smallest conditioning c (step 3) with a solution: sqrt of the format's epsilon, 2^-26 (f64) or 2^-12 (f32,
 * about sqrt(2^-23)). Below it the solve would lose more than half the digits of the format: the round-off of
 * the transition matrix alone (a few ulp) would move the impulses by more than sqrt(eps) relative, and any
 * error of the model or the inputs (the linearisation's is 1e-6 to 1e-3 relative, docs/relative-motion.md)
 * by more than 1 / sqrt(eps) = 6.7e7 (f64) times. An impulse that large is no plan: the caller moves dt.
 */
export const NO_SOLUTION_COND: real = IS_F32 ? <real>0.000244140625 : <real>1.4901161193847656e-8; // f64 0x3E50000000000000, f32 0x39800000

/** Two impulses of the linear rendezvous (see the header). Slots 0..2 = dv1, 3..5 = dv2, 6 = conditioning. */
export function rendezvous_linear(mu: real, rcx: real, rcy: real, rcz: real, vcx: real, vcy: real, vcz: real,
  x0: real, y0: real, z0: real, vx0: real, vy0: real, vz0: real, xf: real, yf: real, zf: real, dt: real): i32 {
  if (!isFinite(mu) || !isFinite(rcx) || !isFinite(rcy) || !isFinite(rcz) || !isFinite(vcx) || !isFinite(vcy) || !isFinite(vcz) ||
    !isFinite(x0) || !isFinite(y0) || !isFinite(z0) || !isFinite(vx0) || !isFinite(vy0) || !isFinite(vz0) ||
    !isFinite(xf) || !isFinite(yf) || !isFinite(zf) || !isFinite(dt)) return ERR_NONFINITE;
  const s = chiefAnomalies(mu, rcx, rcy, rcz, vcx, vcy, vcz, dt);
  if (s != OK) return s;
  // Step 2.
  if (!yaMap(x0, y0, z0, <real>0.0, <real>0.0, <real>0.0)) return ERR_OVERFLOW;
  const px = got(RELATIVE_MOTION_X), py = got(RELATIVE_MOTION_Y), pz = got(RELATIVE_MOTION_Z);
  if (!yaMap(<real>0.0, <real>0.0, <real>0.0, <real>1.0, <real>0.0, <real>0.0)) return ERR_OVERFLOW;
  const b11 = got(RELATIVE_MOTION_X), b21 = got(RELATIVE_MOTION_Y);
  if (!yaMap(<real>0.0, <real>0.0, <real>0.0, <real>0.0, <real>1.0, <real>0.0)) return ERR_OVERFLOW;
  const b12 = got(RELATIVE_MOTION_X), b22 = got(RELATIVE_MOTION_Y);
  if (!yaMap(<real>0.0, <real>0.0, <real>0.0, <real>0.0, <real>0.0, <real>1.0)) return ERR_OVERFLOW;
  const bz = got(RELATIVE_MOTION_Z);
  // Step 3.
  const det = b11 * b22 - b12 * b21;
  const ratio = <real>2.0 * abs(det) / (b11 * b11 + b21 * b21 + b12 * b12 + b22 * b22);
  const planar = z0 == 0 && zf == 0;
  const c = planar ? ratio : min(ratio, abs(anomalyGapSin()));
  if (!isFinite(det) || !isFinite(ratio)) return ERR_OVERFLOW;
  if (!(c >= NO_SOLUTION_COND)) return ERR_NO_SOLUTION;
  // Step 4.
  const ex = xf - px, ey = yf - py;
  const u = (b22 * ex - b12 * ey) / det;
  const w = (b11 * ey - b21 * ex) / det;
  const vz = planar ? <real>0.0 : (zf - pz) / bz;
  // Step 5.
  if (!yaMap(x0, y0, z0, u, w, vz)) return ERR_OVERFLOW;
  const d1x = u - vx0, d1y = w - vy0, d1z = vz - vz0;
  const d2x = -got(RELATIVE_MOTION_VX), d2y = -got(RELATIVE_MOTION_VY), d2z = -got(RELATIVE_MOTION_VZ);
  if (!isFinite(d1x) || !isFinite(d1y) || !isFinite(d1z) || !isFinite(d2x) || !isFinite(d2y) || !isFinite(d2z)) return ERR_OVERFLOW;
  put(RENDEZVOUS_LINEAR_DV1X, d1x); put(RENDEZVOUS_LINEAR_DV1Y, d1y); put(RENDEZVOUS_LINEAR_DV1Z, d1z);
  put(RENDEZVOUS_LINEAR_DV2X, d2x); put(RENDEZVOUS_LINEAR_DV2Y, d2y); put(RENDEZVOUS_LINEAR_DV2Z, d2z);
  put(RENDEZVOUS_LINEAR_COND, c);
  return OK;
}
