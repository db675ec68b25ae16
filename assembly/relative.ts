// Relative motion of a deputy about a chief on an elliptic Kepler orbit: the rotating frame (to_relative,
// from_relative), the first-order relative state after a time dt (relative_motion), and two-impulse targeting
// in the first-order model (rendezvous_linear, assembly/rendezvous.ts).
//
// Conventions (the chief's rotating frame, often called LVLH or Hill's frame):
//   x = r / |r| (radial, outward), z = h / |h| (along the chief's orbital angular momentum h = r x v),
//   y = z x x (in-track, along the chief's velocity on a circular orbit).
//   The relative position is the deputy's position minus the chief's, in components along x, y, z. The
//   relative velocity is the rate of change of that position as seen in the rotating frame:
//   (v_d - v_c) - omega x (r_d - r_c), with omega = (|h| / |r|^2) z, the frame's rate for Keplerian motion
//   (no mu needed: |h| / |r|^2 is the chief's true-anomaly rate).
//
// to_relative(rc, vc, rd, vd) -> x, y, z, vx, vy, vz. from_relative(rc, vc, x, y, z, vx, vy, vz) -> rd, vd.
//   1. Frame: x^ = rc / |rc|, z^ = h / |h|, y^ = z^ x x^; w = |h| / |rc|^2.
//   2. to: d = rd - rc, u = vd - vc; x = d . x^ (y, z alike); vx = u . x^ + w y, vy = u . y^ - w x, vz = u . z^
//      (omega x rho = w (x y^ - y x^)).
//   3. from: the same relations solved for d and u, then rd = rc + d, vd = vc + u.
//   The two are inverses to a few ulp of the largest term (the frame is orthonormal to a few ulp).
//   Special cases, in order: a NaN or infinite input -> ERR_NONFINITE; rc = 0 -> ERR_DOMAIN; rectilinear chief
//   (|h| <= RECTILINEAR_REL |rc| |vc|, invariants.ts) -> ERR_DEGENERATE; a non-finite result -> ERR_OVERFLOW.
//
// relative_motion(mu, rc, vc, x0, y0, z0, vx0, vy0, vz0, dt) -> x, y, z, vx, vy, vz at t0 + dt.
//   Method: the state transition matrix of K. Yamanaka and F. Ankersen, "New State Transition Matrix for
//   Relative Motion on an Arbitrary Elliptical Orbit", J. Guidance, Control, and Dynamics 25 (1) 2002, 60-66
//   (the solution of the Tschauner-Hempel equations; matrices recalled from memory and checked numerically:
//   Phi(theta0, J = 0) Phi^-1(theta0) = I and the columns satisfy the equations of motion; the vector suite
//   `relative-motion` compares the kernel with the difference of two 60-digit nonlinear propagations).
//   YA write their frame as (x_YA, y_YA, z_YA) = (in-track, -h, -radial) = (y, -z, -x) here.
//   1. Chief: h = |rc x vc|, p = h^2 / mu, rho0 = p / |rc| = 1 + e cos th0, e sin th0 = (rc . vc) h / (mu |rc|),
//      e = |(e cos th0, e sin th0)|; th0 = atan2 of the two (th0 = 0 when e = 0: then only th - th0 matters).
//      k2 = h / p^2 = sqrt(mu / p^3) (the true-anomaly rate is k2 rho^2).
//   2. th at t0 + dt by Kepler's equation: M = M(th0) + n dt, n = k2 (1 - e^2)^(3/2) (true_to_mean,
//      mean_to_true, anomaly.ts). Nothing divides by e, so the circular orbit is the e = 0 point of the same
//      formulas (no special case, no cliff); J = k2 dt.
//   3. YA's transformed variables (those of the Tschauner-Hempel equations): q~ = rho q,
//      q~' = -e sin th q + q. / (k2 rho) for each component q (' = d/dth, . = d/dt).
//   4. In-plane: constants K = Phi^-1(th0) (x~, z~, x~', z~')_YA, then the state at th is Phi(th, J) K.
//      Out-of-plane: z~(th) = z~0 cos(th - th0) + z~0' sin(th - th0).
//   5. Back: q = q~ / rho, q. = k2 (rho q~' + e sin th q~).
//   Domain: an elliptic chief, 0 <= e < 1; dt of either sign. Special cases, in order: a NaN or infinite input
//   -> ERR_NONFINITE; mu <= 0 or rc = 0 -> ERR_DOMAIN; rectilinear chief -> ERR_DEGENERATE; e >= 1 ->
//   ERR_DOMAIN; a non-finite intermediate or result -> ERR_OVERFLOW. No iteration here (the Kepler solve is
//   kepler_elliptic's, capped there).
//
// Range: no power-of-two scaling here (unlike invariants.ts). Accuracy is measured for states of ordinary
// magnitudes (the suite's: km, km/s, the Earth's mu); far from them an intermediate can under- or overflow. One
// that shows as a zero angular momentum or a non-finite value gives ERR_DEGENERATE or ERR_OVERFLOW; an ok status
// always comes with finite outputs (fuzzed with huge, tiny and subnormal inputs, scripts/fuzz.mjs), but the
// accuracy there is not measured and not promised.
//
// Output slots: to_relative 0..5 = x, y, z, vx, vy, vz; from_relative 0..2 = rd, 3..5 = vd; relative_motion
// 0..5 = x, y, z, vx, vy, vz.
// Accuracy (release f64, vectors/relative-motion.csv: 480 cases, 60-digit references by differences of
// nonlinear propagations, harness/verify/reference/relative.ts): |r - r_ref| / |r_ref| at most 2.6e-11 and
// |v - v_ref| / |v_ref| at most 9.5e-11 (limit 1e-9); below 1.3e-13 for e <= 0.9. Worst case: e = 0.999,
// several orbits (chief period conditioned by eps / (1 - e)): x got 0.006345456366297882, want
// 0.006345456365695659. to_relative / from_relative: within 4 ulp of the largest term of the decimal.js mapping,
// round trips within 4 ulp of the chief's components (tests/relative-frame.test.ts). f32 build against f64 on
// binary32 inputs: 3e-5 (e <= 0.9) to 6.5e-3 (e = 0.999) relative.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_OVERFLOW, FIRST_ERROR } from "./status";
import { put, got } from "./io";
import {
  TO_RELATIVE_X, TO_RELATIVE_Y, TO_RELATIVE_Z, TO_RELATIVE_VX, TO_RELATIVE_VY, TO_RELATIVE_VZ,
  FROM_RELATIVE_RDX, FROM_RELATIVE_RDY, FROM_RELATIVE_RDZ, FROM_RELATIVE_VDX, FROM_RELATIVE_VDY, FROM_RELATIVE_VDZ,
  RELATIVE_MOTION_X, RELATIVE_MOTION_Y, RELATIVE_MOTION_Z, RELATIVE_MOTION_VX, RELATIVE_MOTION_VY, RELATIVE_MOTION_VZ,
  TRUE_TO_MEAN_M, MEAN_TO_TRUE_NU,
} from "./abi";
import { checkState, twoBodyGet, TB_R, TB_RV, TB_HX, TB_HY, TB_HZ, TB_H } from "./invariants";
import { true_to_mean, mean_to_true } from "./anomaly";

// ---- file-private scratch state: the frame (set by chiefFrame) ---------------------------------------
let fXx: real = 0, fXy: real = 0, fXz: real = 0; // x^ (radial)
let fYx: real = 0, fYy: real = 0, fYz: real = 0; // y^ (in-track)
let fZx: real = 0, fZy: real = 0, fZz: real = 0; // z^ (angular momentum)
let fW: real = 0; // |h| / |rc|^2

/** Frame of the chief (step 1 of to/from_relative). Status of checkState with mu = 1 (mu plays no part). */
function chiefFrame(rx: real, ry: real, rz: real, vx: real, vy: real, vz: real): i32 {
  const s = checkState(<real>1.0, rx, ry, rz, vx, vy, vz);
  if (s != OK) return s;
  const sR = twoBodyGet(TB_R);
  const sH = twoBodyGet(TB_H);
  const sHX = twoBodyGet(TB_HX), sHY = twoBodyGet(TB_HY), sHZ = twoBodyGet(TB_HZ);
  fXx = rx / sR; fXy = ry / sR; fXz = rz / sR;
  fZx = sHX / sH; fZy = sHY / sH; fZz = sHZ / sH;
  fYx = fZy * fXz - fZz * fXy;
  fYy = fZz * fXx - fZx * fXz;
  fYz = fZx * fXy - fZy * fXx;
  fW = sH / sR / sR;
  return OK;
}

function finite6(a: real, b: real, c: real, d: real, e: real, f: real): bool {
  return isFinite(a) && isFinite(b) && isFinite(c) && isFinite(d) && isFinite(e) && isFinite(f);
}

/** Deputy inertial state -> relative state in the chief's rotating frame. Slots 0..5 = x, y, z, vx, vy, vz. */
export function to_relative(rcx: real, rcy: real, rcz: real, vcx: real, vcy: real, vcz: real,
  rdx: real, rdy: real, rdz: real, vdx: real, vdy: real, vdz: real): i32 {
  if (!finite6(rcx, rcy, rcz, vcx, vcy, vcz) || !finite6(rdx, rdy, rdz, vdx, vdy, vdz)) return ERR_NONFINITE;
  const s = chiefFrame(rcx, rcy, rcz, vcx, vcy, vcz);
  if (s != OK) return s;
  const dx = rdx - rcx, dy = rdy - rcy, dz = rdz - rcz;
  const ux = vdx - vcx, uy = vdy - vcy, uz = vdz - vcz;
  const x = dx * fXx + dy * fXy + dz * fXz;
  const y = dx * fYx + dy * fYy + dz * fYz;
  const z = dx * fZx + dy * fZy + dz * fZz;
  const vx = ux * fXx + uy * fXy + uz * fXz + fW * y;
  const vy = ux * fYx + uy * fYy + uz * fYz - fW * x;
  const vz = ux * fZx + uy * fZy + uz * fZz;
  if (!finite6(x, y, z, vx, vy, vz)) return ERR_OVERFLOW;
  put(TO_RELATIVE_X, x); put(TO_RELATIVE_Y, y); put(TO_RELATIVE_Z, z);
  put(TO_RELATIVE_VX, vx); put(TO_RELATIVE_VY, vy); put(TO_RELATIVE_VZ, vz);
  return OK;
}

/** Relative state in the chief's rotating frame -> deputy inertial state. Slots 0..2 = rd, 3..5 = vd. */
export function from_relative(rcx: real, rcy: real, rcz: real, vcx: real, vcy: real, vcz: real,
  x: real, y: real, z: real, vx: real, vy: real, vz: real): i32 {
  if (!finite6(rcx, rcy, rcz, vcx, vcy, vcz) || !finite6(x, y, z, vx, vy, vz)) return ERR_NONFINITE;
  const s = chiefFrame(rcx, rcy, rcz, vcx, vcy, vcz);
  if (s != OK) return s;
  const ix = vx - fW * y; // inertial velocity difference in frame components: v_rot + omega x rho
  const iy = vy + fW * x;
  const rdx = rcx + (x * fXx + y * fYx + z * fZx);
  const rdy = rcy + (x * fXy + y * fYy + z * fZy);
  const rdz = rcz + (x * fXz + y * fYz + z * fZz);
  const vdx = vcx + (ix * fXx + iy * fYx + vz * fZx);
  const vdy = vcy + (ix * fXy + iy * fYy + vz * fZy);
  const vdz = vcz + (ix * fXz + iy * fYz + vz * fZz);
  if (!finite6(rdx, rdy, rdz, vdx, vdy, vdz)) return ERR_OVERFLOW;
  put(FROM_RELATIVE_RDX, rdx); put(FROM_RELATIVE_RDY, rdy); put(FROM_RELATIVE_RDZ, rdz);
  put(FROM_RELATIVE_VDX, vdx); put(FROM_RELATIVE_VDY, vdy); put(FROM_RELATIVE_VDZ, vdz);
  return OK;
}

// ---- file-private scratch state: the chief's anomalies (set by chiefAnomalies) -------------------------
let cE: real = 0; // e
let cK2: real = 0; // k2 = sqrt(mu / p^3)
let cJ: real = 0; // k2 dt
let cRho0: real = 0, cSin0: real = 0, cCos0: real = 0, cEs0: real = 0; // at th0: rho, sin, cos, e sin
let cRho: real = 0, cSin: real = 0, cCos: real = 0, cEs: real = 0; // at th
let cSinD: real = 0, cCosD: real = 0; // sin, cos of th - th0
// Result of yaMap.
let oX: real = 0, oY: real = 0, oZ: real = 0, oVx: real = 0, oVy: real = 0, oVz: real = 0;

/** Steps 1-2 of relative_motion: the chief's e, k2, anomalies at t0 and t0 + dt. Status as in the header. */
export function chiefAnomalies(mu: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real, dt: real): i32 {
  const s = checkState(mu, rx, ry, rz, vx, vy, vz);
  if (s != OK) return s;
  const sR = twoBodyGet(TB_R);
  const sH = twoBodyGet(TB_H);
  const sRV = twoBodyGet(TB_RV);
  const p = sH / mu * sH;
  const rho0 = p / sR;
  const ec = rho0 - <real>1.0;
  const es = sRV / sR * (sH / mu);
  const e = RMath.sqrt(ec * ec + es * es);
  if (!isFinite(e) || !isFinite(rho0) || !(p > 0)) return ERR_OVERFLOW;
  if (!(e < <real>1.0)) return ERR_DOMAIN;
  const k2 = sH / p / p;
  const th0 = RMath.atan2(es, ec);
  let st = true_to_mean(e, th0);
  if (st >= FIRST_ERROR) return ERR_OVERFLOW;
  const eta = RMath.sqrt((<real>1.0 - e) * (<real>1.0 + e));
  const M = got(TRUE_TO_MEAN_M) + k2 * eta * eta * eta * dt;
  st = mean_to_true(e, M);
  if (st >= FIRST_ERROR || !isFinite(k2) || !(k2 > 0)) return ERR_OVERFLOW;
  const th = got(MEAN_TO_TRUE_NU);
  cE = e; cK2 = k2; cJ = k2 * dt;
  cRho0 = rho0; cSin0 = RMath.sin(th0); cCos0 = RMath.cos(th0); cEs0 = es;
  cSin = RMath.sin(th); cCos = RMath.cos(th);
  cRho = <real>1.0 + e * cCos; cEs = e * cSin;
  cSinD = cSin * cCos0 - cCos * cSin0;
  cCosD = cCos * cCos0 + cSin * cSin0;
  return isFinite(cJ) ? OK : ERR_OVERFLOW;
}

/** sin(th - th0) of the last chiefAnomalies call (rendezvous.ts: the out-of-plane transfer's conditioning). */
export function anomalyGapSin(): real {
  return cSinD;
}

/**
 * Steps 3-5 of relative_motion: the relative state (rotating frame, Hill axes) after the chief's last
 * chiefAnomalies call, written to relative_motion's slots (RELATIVE_MOTION_X .. VZ). Returns false when a result is not finite.
 */
export function yaMap(x: real, y: real, z: real, vx: real, vy: real, vz: real): bool {
  const e = cE, k2 = cK2, J = cJ, r0 = cRho0, ir0 = <real>1.0 / cRho0;
  // Step 3 at th0, then to YA's axes: (a, b) = (y~, -x~) and their th-derivatives.
  const a = r0 * y, b = -(r0 * x), zt = r0 * z;
  const ap = vy / (k2 * r0) - cEs0 * y;
  const bp = cEs0 * x - vx / (k2 * r0);
  const ztp = vz / (k2 * r0) - cEs0 * z;
  // Step 4: K = Phi^-1(th0) (a, b, a', b') (YA 2002; s0 = rho0 sin th0, c0 = rho0 cos th0).
  const s0 = r0 * cSin0, c0 = r0 * cCos0, es0 = e * s0, eta2 = (<real>1.0 - e) * (<real>1.0 + e);
  const K1 = a + (<real>3.0 * e * cSin0 * (<real>1.0 + ir0) * b - es0 * (<real>1.0 + ir0) * ap + (<real>2.0 - e * c0) * bp) / eta2;
  const K2 = (<real>-3.0 * cSin0 * (<real>1.0 + e * e * ir0) * b + s0 * (<real>1.0 + ir0) * ap + (c0 - <real>2.0 * e) * bp) / eta2;
  const K3 = (<real>-3.0 * (cCos0 + e) * b + (c0 * (<real>1.0 + ir0) + e) * ap - s0 * bp) / eta2;
  const K4 = ((<real>3.0 * r0 + e * e - <real>1.0) * b - r0 * r0 * ap + es0 * bp) / eta2;
  // Phi(th, J) K.
  const rho = cRho, ir = <real>1.0 / cRho, s = rho * cSin, c = rho * cCos, esJ = e * s * J;
  const sp = cCos + e * (cCos * cCos - cSin * cSin);
  const cp = -(cSin + <real>2.0 * e * cSin * cCos);
  const a1 = K1 - c * (<real>1.0 + ir) * K2 + s * (<real>1.0 + ir) * K3 + <real>3.0 * rho * rho * J * K4;
  const b1 = s * K2 + c * K3 + (<real>2.0 - <real>3.0 * esJ) * K4;
  const ap1 = <real>2.0 * s * K2 + (<real>2.0 * c - e) * K3 + <real>3.0 * (<real>1.0 - <real>2.0 * esJ) * K4;
  const bp1 = sp * K2 + cp * K3 - <real>3.0 * e * (sp * J + s * ir * ir) * K4;
  const zt1 = zt * cCosD + ztp * cSinD;
  const ztp1 = ztp * cCosD - zt * cSinD;
  // Step 5, back to Hill's axes: x~ = -b, y~ = a.
  const X = -b1 * ir, Y = a1 * ir, Z = zt1 * ir;
  const VX = -(k2 * (rho * bp1 + cEs * b1));
  const VY = k2 * (rho * ap1 + cEs * a1);
  const VZ = k2 * (rho * ztp1 + cEs * zt1);
  if (!finite6(X, Y, Z, VX, VY, VZ)) return false;
  put(RELATIVE_MOTION_X, X); put(RELATIVE_MOTION_Y, Y); put(RELATIVE_MOTION_Z, Z);
  put(RELATIVE_MOTION_VX, VX); put(RELATIVE_MOTION_VY, VY); put(RELATIVE_MOTION_VZ, VZ);
  return true;
}

/**
 * First-order relative state after dt (Yamanaka and Ankersen 2002), chief (rc, vc) on an elliptic orbit,
 * relative state in the chief's rotating frame (header). Slots 0..5 = x, y, z, vx, vy, vz at t0 + dt.
 */
export function relative_motion(mu: real, rcx: real, rcy: real, rcz: real, vcx: real, vcy: real, vcz: real,
  x0: real, y0: real, z0: real, vx0: real, vy0: real, vz0: real, dt: real): i32 {
  if (!finite6(rcx, rcy, rcz, vcx, vcy, vcz) || !finite6(x0, y0, z0, vx0, vy0, vz0) || !isFinite(mu) || !isFinite(dt)) return ERR_NONFINITE;
  const s = chiefAnomalies(mu, rcx, rcy, rcz, vcx, vcy, vcz, dt);
  if (s != OK) return s;
  return yaMap(x0, y0, z0, vx0, vy0, vz0) ? OK : ERR_OVERFLOW;
}
