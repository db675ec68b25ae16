// Classical orbital elements from a state (r, v) and back, for every conic.
//
// Elements: a (semi-major axis; negative for a hyperbola, 0 marks a parabola), e, i in [0, pi],
// RAAN, argument of periapsis and true anomaly in [0, 2 pi), p (semi-latus rectum). Radians throughout.
// Formulas (vector forms; e.g. R. R. Bate, D. D. Mueller, J. E. White, "Fundamentals of Astrodynamics",
// Dover 1971, 2.4 and 2.6), written so that each angle is an atan2 of two well-scaled numbers:
//   h = r x v, p = |h|^2 / mu, 1 / a = 2 / r - v^2 / mu, e = ((v^2 - mu / r) r - (r . v) v) / mu,
//   i = atan2(sqrt(hx^2 + hy^2), hz), RAAN = atan2(hx, -hy) (node vector n = z x h),
//   an angle x measured in the orbit plane from a direction d, in the direction of motion:
//   atan2(h . (d x x), |h| (d . x)) (both arguments scale alike, so d need not be a unit vector).
//   argp = angle of e from n, nu = angle of r from e.
//
// Conventions where an angle is undefined (the statuses are in status.ts):
//   circular (|e| <= CIRCULAR_E): argp = 0 and the argument of latitude u (angle of r from the node) is
//     returned in place of nu: OK_CIRCULAR. e itself is still returned.
//   equatorial (sin i <= EQUATORIAL_SIN_I, i = 0 or pi): RAAN = 0, the node line is the x axis, and argp is the
//     longitude of periapsis measured from x in the direction of motion: OK_EQUATORIAL.
//   both: RAAN = 0, argp = 0, nu = true longitude (angle of r from x in the direction of motion):
//     OK_CIRCULAR_EQUATORIAL.
//   These are exactly what `state` needs to rebuild the orbit from the returned values: passing them back
//   reproduces r and v (to the size of e for a circular-labelled orbit, whose periapsis is put at the node).
//   Why the thresholds: the e vector of a state rounded to the format carries an absolute error of a few ulp
//   (about 1e-15); at e = 2^-36 (1.5e-11) the periapsis direction is then uncertain by about 1e-4 rad and below
//   it is noise. The same holds for the node direction and sin i. u = argp + nu stays accurate on both sides.
//   parabola (1 / a = 0, or 1 / a too small to invert): a = 0 is returned; p and e = 1 describe the orbit.
//
// state(mu, a, e, i, RAAN, argp, nu) and state_p(mu, p, e, ...): p = a (1 - e)(1 + e) (1 - e is exact for
// e >= 1/2, so no digits are lost near e = 1 beyond those of a itself); use state_p for a parabola.
//   r = p / (1 + e cos nu), perifocal r = r (cos nu, sin nu), v = sqrt(mu / p) (-sin nu, e + cos nu),
//   rotated by the unit vectors P (periapsis) and Q (P turned 90 degrees in the direction of motion):
//   P = cos w N + sin w M, Q = -sin w N + cos w M, N = (cos O, sin O, 0), M = (-cos i sin O, cos i cos O, sin i).
//
// Special cases, in order: NaN or infinite input -> ERR_NONFINITE; mu <= 0, r = 0, e < 0, p <= 0, a of the
// wrong sign for e (a > 0 needs e < 1, a < 0 needs e > 1; e = 1 needs state_p) -> ERR_DOMAIN; rectilinear
// state -> ERR_DEGENERATE (invariants.ts); 1 + e cos nu <= 0 (beyond the asymptote) -> ERR_UNREACHABLE;
// a non-finite output -> ERR_OVERFLOW.
// Range: elements works on a power-of-two scaled copy of a state outside the plain formulas' window
// (invariants.ts, "Range"; ERR_OVERFLOW where mu / (|r| |v|^2) is beyond about 2^+-598, or |r| or |v| beyond the
// largest real); p, and a unless 0, below the normal range -> ERR_OVERFLOW (before 2026-12,
// elements(2^53, 1, 0, 0, 0, 0, 1.57e-162) gave p = 0 with status ok). |e|, sin i and planeAngle's triple
// products use power-of-two scaled copies where squares or products would leave the range. state / state_p:
// sqrt(mu / p) is taken on scaled mu and p where mu / p is not a normal number (invariants.ts speedScale); state rescales a p = a (1 - e^2)
// that under- or overflows; r or v whose largest component is below the normal range -> ERR_OVERFLOW. Inside the
// window the results are bit for bit those of the plain formulas.
// Output slots: elements 0 a, 1 e, 2 i, 3 RAAN, 4 argp, 5 nu, 6 p; state 0..2 r, 3..5 v.
// Iteration cap: none (closed forms; the only loops are the fixed-length exponent ladders of invariants.ts).
// Accuracy (release f64 build, vectors/elements.csv and vectors/state.csv, 1,200 cases each, 50-digit
// references; `areal check -v`, 2026-12): within 10 x the conditioning of each output (the change caused by one
// ulp of one input) or 1e-14: elements p 3.8e-15 relative, i 8.9e-16 and RAAN 4.0e-15 absolute; a, e, argp and nu
// reach 2.4e-4 relative (a, near e = 1), 3.6e-16 absolute (e of a circular orbit, 8.4 relative) and 1.2e-10
// absolute (argp, nu of a near-circular orbit), each within its conditioning; state 5.4e-16 (r) and 3.9e-16 (v)
// relative. Limits in vectors/limits.json.

import { OK, OK_CIRCULAR, OK_EQUATORIAL, OK_CIRCULAR_EQUATORIAL, ERR_NONFINITE, ERR_DOMAIN, ERR_UNREACHABLE, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { IS_F32, TWO_PI, MIN_NORMAL } from "./real";
import { checkScaled, scaleState, TB_R, TB_V2, TB_RV, TB_HX, TB_HY, TB_HZ, TB_H, TB_MU, TB_RX, TB_RY, TB_RZ, TB_VX, TB_VY, TB_VZ, twoBodyGet, scaledExpR } from "./invariants";
import { putStateInFrame, scale2, exponent2, maxAbs3, norm3, speedScale, speedExp } from "./invariants";

/** At or below this |e| the orbit is treated as circular: 2^-36 (f64), 2^-17 (f32). */
export const CIRCULAR_E: real = IS_F32 ? <real>7.62939453125e-6 : <real>1.4551915228366852e-11; // f64 0x3DB0000000000000, f32 0x37000000
/** At or below this sin i the orbit is treated as equatorial: 2^-36 (f64), 2^-17 (f32). */
export const EQUATORIAL_SIN_I: real = IS_F32 ? <real>7.62939453125e-6 : <real>1.4551915228366852e-11; // f64 0x3DB0000000000000, f32 0x37000000
// Angle in [0, 2 pi) from atan2's (-pi, pi].
function wrap(x: real): real {
  let y = x < 0 ? x + TWO_PI : x;
  if (y >= TWO_PI) y = 0; // f32 only: its 2 pi is above the true value
  return y;
}

/**
 * planeAngle's plain range for the largest |component| of each of h, d and x: 2^-300 .. 2^300 (f64),
 * 2^-36 .. 2^36 (f32), where the triple products h . (d x x) and |h| (d . x) stay normal.
 */
const PA_LO: real = IS_F32 ? <real>1.4551915228366852e-11 : <real>4.909093465297727e-91; // f64 0x2D30000000000000, f32 0x2D800000
const PA_HI: real = IS_F32 ? <real>68719476736.0 : <real>2.037035976334486e90; // f64 0x52B0000000000000, f32 0x51800000

// Angle of (x, y, z) from direction (dx, dy, dz), in the plane with normal (hx, hy, hz) of length h, in the
// direction of motion.
// Outside the plain range each of the three vectors is first multiplied by its own power of two near
// 1 / (its largest |component|): exact, and both arguments of atan2 change by the same factor. (Before
// 2026-12 the products overflowed: elements(3.644e87, 0, 0, 5.477e-42, 0, 2.987e141, 1.497e95) gave
// argp = atan2(inf, inf) = pi/4, true pi/2.)
function planeAngle(hx: real, hy: real, hz: real, h: real, dx: real, dy: real, dz: real, x: real, y: real, z: real): real {
  const md = maxAbs3(dx, dy, dz);
  const mx = maxAbs3(x, y, z);
  const mh = maxAbs3(hx, hy, hz);
  if (!(md >= PA_LO && md <= PA_HI && mx >= PA_LO && mx <= PA_HI && mh >= PA_LO && mh <= PA_HI)) {
    if (md > 0) {
      const k = -exponent2(md);
      dx = scale2(dx, k);
      dy = scale2(dy, k);
      dz = scale2(dz, k);
    }
    if (mx > 0) {
      const k = -exponent2(mx);
      x = scale2(x, k);
      y = scale2(y, k);
      z = scale2(z, k);
    }
    if (mh > 0) {
      const k = -exponent2(mh);
      hx = scale2(hx, k);
      hy = scale2(hy, k);
      hz = scale2(hz, k);
      h = scale2(h, k);
    }
  }
  const cx = dy * z - dz * y;
  const cy = dz * x - dx * z;
  const cz = dx * y - dy * x;
  return RMath.atan2(hx * cx + hy * cy + hz * cz, h * (dx * x + dy * y + dz * z));
}

/** Classical elements of (r, v). Slots 0 a, 1 e, 2 i, 3 RAAN, 4 argp, 5 nu, 6 p. */
export function elements(mu: real, rx0: real, ry0: real, rz0: real, vx0: real, vy0: real, vz0: real): i32 {
  // The state computed with: (mu, r, v) itself, or a power-of-two scaled copy (invariants.ts, "Range").
  const sc = scaleState(mu, rx0, ry0, rz0, vx0, vy0, vz0);
  const st = checkScaled();
  if (st != OK) return st;
  if (sc != OK) return sc;
  const m = twoBodyGet(TB_MU);
  const rx = twoBodyGet(TB_RX), ry = twoBodyGet(TB_RY), rz = twoBodyGet(TB_RZ);
  const vx = twoBodyGet(TB_VX), vy = twoBodyGet(TB_VY), vz = twoBodyGet(TB_VZ);
  const r = twoBodyGet(TB_R), v2 = twoBodyGet(TB_V2), rv = twoBodyGet(TB_RV);
  const hx = twoBodyGet(TB_HX), hy = twoBodyGet(TB_HY), hz = twoBodyGet(TB_HZ), hn = twoBodyGet(TB_H);
  // Lengths back in the caller's units: times 2^-kR (nothing to do inside the window).
  const kR = scaledExpR();
  const p = scale2(hn * hn / m, -kR);
  const alpha = <real>2.0 / r - v2 / m;
  const inv = scale2(<real>1.0 / alpha, -kR);
  const a = alpha == 0 || !isFinite(inv) ? <real>0.0 : inv;
  const c1 = v2 - m / r;
  const ex = (c1 * rx - rv * vx) / m;
  const ey = (c1 * ry - rv * vy) / m;
  const ez = (c1 * rz - rv * vz) / m;
  const e = norm3(ex, ey, ez);
  const hxy = norm3(hx, hy, 0);
  const inc = RMath.atan2(hxy, hz);
  const circular = e <= CIRCULAR_E;
  const equatorial = hxy <= EQUATORIAL_SIN_I * hn;
  // Node direction: z x h, or the x axis for an equatorial orbit.
  const nx = equatorial ? <real>1.0 : -hy;
  const ny = equatorial ? <real>0.0 : hx;
  const raan = equatorial ? <real>0.0 : wrap(RMath.atan2(ny, nx));
  let argp: real = 0;
  let nu: real;
  if (circular) {
    nu = wrap(planeAngle(hx, hy, hz, hn, nx, ny, 0, rx, ry, rz));
  } else {
    argp = wrap(planeAngle(hx, hy, hz, hn, nx, ny, 0, ex, ey, ez));
    nu = wrap(planeAngle(hx, hy, hz, hn, ex, ey, ez, rx, ry, rz));
  }
  // p, and a unless it marks a parabola, must be normal: a subnormal or zero length has lost its digits.
  if (!isFinite(p) || !(p >= MIN_NORMAL) || !isFinite(e) || !(a == 0 || abs(a) >= MIN_NORMAL)) return ERR_OVERFLOW;
  put(0, a);
  put(1, e);
  put(2, inc);
  put(3, raan);
  put(4, argp);
  put(5, nu);
  put(6, p);
  if (circular) return equatorial ? OK_CIRCULAR_EQUATORIAL : OK_CIRCULAR;
  return equatorial ? OK_EQUATORIAL : OK;
}

/** State from (mu, a, e, i, RAAN, argp, nu); e = 1 needs state_p. Slots 0..2 r, 3..5 v. */
export function state(mu: real, a: real, e: real, i: real, raan: real, argp: real, nu: real): i32 {
  if (!isFinite(mu) || !isFinite(a) || !isFinite(e) || !isFinite(i) || !isFinite(raan) || !isFinite(argp) || !isFinite(nu)) return ERR_NONFINITE;
  if (!(mu > 0) || !(e >= 0)) return ERR_DOMAIN;
  if (!(e < 1 && a > 0) && !(e > 1 && a < 0)) return ERR_DOMAIN;
  let p = a * ((<real>1.0 - e) * (<real>1.0 + e));
  let kP: i32 = 0;
  if (!(p >= MIN_NORMAL && isFinite(p))) {
    // p under- or overflowed: the same with a times an even power of two near 1 / |a|, scaled back in stateFromP.
    kP = -exponent2(a) & ~1;
    p = scale2(a, kP) * ((<real>1.0 - e) * (<real>1.0 + e));
  }
  return stateFromP(mu, p, kP, e, i, raan, argp, nu);
}

/** State from (mu, p, e, i, RAAN, argp, nu): any conic, the parabola included. Slots 0..2 r, 3..5 v. */
export function state_p(mu: real, p: real, e: real, i: real, raan: real, argp: real, nu: real): i32 {
  if (!isFinite(mu) || !isFinite(p) || !isFinite(e) || !isFinite(i) || !isFinite(raan) || !isFinite(argp) || !isFinite(nu)) return ERR_NONFINITE;
  if (!(mu > 0) || !(e >= 0)) return ERR_DOMAIN;
  return stateFromP(mu, p, 0, e, i, raan, argp, nu);
}

// The semi-latus rectum is p 2^-kP (kP even: state scales a p that under- or overflowed).
function stateFromP(mu: real, p: real, kP: i32, e: real, i: real, raan: real, argp: real, nu: real): i32 {
  if (!(p > 0)) return ERR_DOMAIN;
  const cn = RMath.cos(nu);
  const sn = RMath.sin(nu);
  // 1 + e cos nu and e + cos nu; where cos nu < 0 they are formed as (1 - e) + 2 e cos^2(nu/2) and
  // (e - 1) + 2 cos^2(nu/2): for e < 1 no term cancels near apoapsis of a near-parabolic ellipse, where the
  // direct forms would lose log10(1 / (1 - e)) digits that the result does not depend on.
  let w: real;
  let epc: real;
  if (cn < 0) {
    const ch = RMath.cos(<real>0.5 * nu);
    const c2 = <real>2.0 * ch * ch;
    w = (<real>1.0 - e) + e * c2;
    epc = (e - <real>1.0) + c2;
  } else {
    w = <real>1.0 + e * cn;
    epc = e + cn;
  }
  if (!(w > 0)) return ERR_UNREACHABLE;
  const r = scale2(p / w, -kP);
  const s = speedScale(mu, p); // sqrt(mu / p_true) = s 2^((kP >> 1) - kS)
  const kS = speedExp();
  const co = RMath.cos(raan);
  const so = RMath.sin(raan);
  const ci = RMath.cos(i);
  const si = RMath.sin(i);
  const cw = RMath.cos(argp);
  const sw = RMath.sin(argp);
  const px = co * cw - so * sw * ci;
  const py = so * cw + co * sw * ci;
  const pz = sw * si;
  const qx = -co * sw - so * cw * ci;
  const qy = -so * sw + co * cw * ci;
  const qz = cw * si;
  const a1 = r * cn;
  const a2 = r * sn;
  const b1 = -s * sn;
  const b2 = s * epc;
  return putStateInFrame(a1, a2, b1, b2, (kP >> 1) - kS, px, py, pz, qx, qy, qz);
}
