// Modified equinoctial elements (p, f, g, h, k, L) from a state and back (M. J. H. Walker, B. Ireland and
// J. Owens, "A set of modified equinoctial orbit elements", Celest. Mech. 36 (1985) 409-419), with the
// direct retrograde factor +1:
//   p = a (1 - e^2), f = e cos(w + O), g = e sin(w + O), h = tan(i/2) cos O, k = tan(i/2) sin O,
//   L = O + w + nu (true longitude).
// They have no singularity at e = 0 or i = 0; the one left is i = pi (tan(i/2) is infinite).
//
// State -> elements, without passing through the classical angles:
//  1. Special cases as in invariants.ts (ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE), then a retrograde
//     equatorial state (h along -z exactly) -> ERR_DEGENERATE (the set is singular there).
//  2. p = |h|^2 / mu. With w = h / |h|: h_eq = -w_y / (1 + w_z), k_eq = w_x / (1 + w_z), where
//     1 + w_z = (|h| + h_z) / |h| is taken as (h_x^2 + h_y^2) / (|h| (|h| - h_z)) when h_z < 0 (no cancellation
//     near i = pi).
//  3. The equinoctial frame, s2 = 1 + h^2 + k^2:
//     f_hat = (1 - k^2 + h^2, 2 h k, -2 k) / s2, g_hat = (2 h k, 1 + k^2 - h^2, 2 h) / s2.
//     f = e . f_hat, g = e . g_hat (e the eccentricity vector, invariants.ts), L = atan2(r . g_hat, r . f_hat)
//     in [0, 2 pi).
// Elements -> state (from_equinoctial):
//  1. Special cases: NaN or infinite input -> ERR_NONFINITE; mu <= 0 or p <= 0 -> ERR_DOMAIN;
//     w = 1 + f cos L + g sin L <= 0 (beyond a hyperbola's asymptote) -> ERR_UNREACHABLE.
//  2. r = p / w; r = r (cos L f_hat + sin L g_hat); v = sqrt(mu / p) (-(g + sin L) f_hat + (f + cos L) g_hat).
// A non-finite output -> ERR_OVERFLOW.
// Range: equinoctial works on a power-of-two scaled copy of a state outside the plain formulas' window
// (invariants.ts, "Range"; ERR_OVERFLOW where mu / (|r| |v|^2) is beyond about 2^+-598); p below the normal
// range -> ERR_OVERFLOW (before 2026-12 it came back 0 with status ok). Near i = pi, h_x^2 + h_y^2 and
// h^2 + k^2 are formed on power-of-two scaled copies when they would leave the range (i within 2^-500 of pi
// gave ERR_DEGENERATE before). from_equinoctial: sqrt(mu / p) from mu and p scaled by powers of two where mu / p is not
// a normal number (invariants.ts speedScale); r or v whose largest component is below the normal range -> ERR_OVERFLOW.
// Output slots: equinoctial 0 p, 1 f, 2 g, 3 h, 4 k, 5 L; from_equinoctial 0..2 r, 3..5 v.
// Iteration cap: none (closed forms).
// Accuracy (release f64 build, vectors/equinoctial.csv 1,200 cases, vectors/from-equinoctial.csv 1,000 cases,
// 50-digit references; `areal check -v`, 2026-12): equinoctial p 2.3e-15 relative, f 3.6e-15, g 2.7e-15,
// h 3.6e-15, k 1.8e-15, L 8.9e-16 absolute (worst L: a hyperbola, got -4.6620396677793075, want ...304 in an
// intermediate angle); from_equinoctial r 2.6e-15 and v 4.9e-16 relative. Limits in vectors/limits.json.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE, ERR_UNREACHABLE, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { TWO_PI, MIN_NORMAL } from "./real";
import { checkScaled, scaleState, TB_R, TB_V2, TB_RV, TB_HX, TB_HY, TB_HZ, TB_H, TB_MU, TB_RX, TB_RY, TB_RZ, TB_VX, TB_VY, TB_VZ, twoBodyGet, scaledExpR } from "./invariants";
import { putStateInFrame, scale2, exponent2, speedScale, speedExp, NORM_LO, NORM_HI } from "./invariants";

// File-private scratch: the frame vectors f_hat, g_hat of the last `frame` call, read by its two callers
// (equinoctial, from_equinoctial) right after the call.
let fx: real = 0;
let fy: real = 0;
let fz: real = 0;
let gx: real = 0;
let gy: real = 0;
let gz: real = 0;

function frame(h: real, k: real): void {
  const m = max(abs(h), abs(k));
  if (m <= NORM_HI) {
    const s2 = <real>1.0 + h * h + k * k;
    const hk = <real>2.0 * h * k;
    fx = (<real>1.0 - k * k + h * h) / s2;
    fy = hk / s2;
    fz = <real>-2.0 * k / s2;
    gx = hk / s2;
    gy = (<real>1.0 + k * k - h * h) / s2;
    gz = <real>2.0 * h / s2;
    return;
  }
  // h^2 + k^2 would overflow (i within about 2^-500 of pi, 2^-60 in f32): the same with numerators and s2
  // divided by t^2, t = 2^j near max(|h|, |k|) (exact; t^-2 may underflow, it is below an ulp of s2 there).
  const j = exponent2(m);
  const hs = scale2(h, -j);
  const ks = scale2(k, -j);
  const u = scale2(<real>1.0, -2 * j);
  const s2 = u + hs * hs + ks * ks;
  const hk = <real>2.0 * hs * ks;
  fx = (u - ks * ks + hs * hs) / s2;
  fy = hk / s2;
  fz = scale2(<real>-2.0 * ks / s2, -j);
  gx = hk / s2;
  gy = (u + ks * ks - hs * hs) / s2;
  gz = scale2(<real>2.0 * hs / s2, -j);
}

/** Modified equinoctial elements of (r, v). Slots 0 p, 1 f, 2 g, 3 h, 4 k, 5 L. */
export function equinoctial(mu: real, rx0: real, ry0: real, rz0: real, vx0: real, vy0: real, vz0: real): i32 {
  // The state computed with: (mu, r, v) itself, or a power-of-two scaled copy (invariants.ts, "Range").
  const sc = scaleState(mu, rx0, ry0, rz0, vx0, vy0, vz0);
  const st = checkScaled();
  if (st != OK) return st;
  const hx = twoBodyGet(TB_HX), hy = twoBodyGet(TB_HY), hz = twoBodyGet(TB_HZ), hn = twoBodyGet(TB_H);
  const mxy = max(abs(hx), abs(hy));
  if (mxy == 0 && hz < 0) return ERR_DEGENERATE;
  if (sc != OK) return sc;
  const m = twoBodyGet(TB_MU);
  const rx = twoBodyGet(TB_RX), ry = twoBodyGet(TB_RY), rz = twoBodyGet(TB_RZ);
  const vx = twoBodyGet(TB_VX), vy = twoBodyGet(TB_VY), vz = twoBodyGet(TB_VZ);
  const r = twoBodyGet(TB_R), v2 = twoBodyGet(TB_V2), rv = twoBodyGet(TB_RV);
  let h: real;
  let k: real;
  if (hz >= 0) {
    const d = hn + hz;
    h = -hy / d;
    k = hx / d;
  } else {
    // Homogeneous of degree 0 in h: where h_x^2 + h_y^2 leaves the normal range the four components are
    // first multiplied by a power of two near 1 / max(|h_x|, |h_y|).
    const j = mxy >= NORM_LO && mxy <= NORM_HI ? 0 : -exponent2(mxy);
    const sx = scale2(hx, j);
    const sy = scale2(hy, j);
    const d = (scale2(hn, j) - scale2(hz, j)) / (sx * sx + sy * sy);
    h = -sy * d;
    k = sx * d;
  }
  frame(h, k);
  const c1 = v2 - m / r;
  const ex = (c1 * rx - rv * vx) / m;
  const ey = (c1 * ry - rv * vy) / m;
  const ez = (c1 * rz - rv * vz) / m;
  const f = ex * fx + ey * fy + ez * fz;
  const g = ex * gx + ey * gy + ez * gz;
  let L = RMath.atan2(rx * gx + ry * gy + rz * gz, rx * fx + ry * fy + rz * fz);
  if (L < 0) L += TWO_PI;
  if (L >= TWO_PI) L = 0; // f32 only: its 2 pi is above the true value
  const p = scale2(hn * hn / m, -scaledExpR()); // back in the caller's units (nothing to do inside the window)
  if (!isFinite(p) || !(p >= MIN_NORMAL) || !isFinite(f) || !isFinite(g) || !isFinite(h) || !isFinite(k) || !isFinite(L)) return ERR_OVERFLOW;
  put(0, p);
  put(1, f);
  put(2, g);
  put(3, h);
  put(4, k);
  put(5, L);
  return OK;
}

/** State from modified equinoctial elements. Slots 0..2 r, 3..5 v. */
export function from_equinoctial(mu: real, p: real, f: real, g: real, h: real, k: real, L: real): i32 {
  if (!isFinite(mu) || !isFinite(p) || !isFinite(f) || !isFinite(g) || !isFinite(h) || !isFinite(k) || !isFinite(L)) return ERR_NONFINITE;
  if (!(mu > 0) || !(p > 0)) return ERR_DOMAIN;
  const cl = RMath.cos(L);
  const sl = RMath.sin(L);
  const w = <real>1.0 + f * cl + g * sl;
  if (!(w > 0)) return ERR_UNREACHABLE;
  frame(h, k);
  const r = p / w;
  const s = speedScale(mu, p);
  const kS = speedExp();
  const a1 = r * cl;
  const a2 = r * sl;
  const b1 = -s * (g + sl);
  const b2 = s * (f + cl);
  return putStateInFrame(a1, a2, b1, b2, -kS, fx, fy, fz, gx, gy, gz);
}
