// Two-body invariants of a state (r, v) under gravitational parameter mu, and the state check shared by the
// two-body kernels (universal.ts, elements.ts, equinoctial.ts).
//
// Quantities (textbook definitions; e.g. R. R. Bate, D. D. Mueller, J. E. White, "Fundamentals of
// Astrodynamics", Dover 1971, ch. 1 and 2):
//   specific energy      E = v^2 / 2 - mu / r
//   angular momentum     h = r x v (vector), |h|
//   eccentricity vector  e = ((v^2 - mu / r) r - (r . v) v) / mu  (the Laplace-Runge-Lenz vector over mu)
//   areal velocity       |h| / 2 (Kepler's second law: area swept per unit time)
//   flight-path angle    gamma = atan2(r . v, |h|), the angle of v above the local horizontal, in [-pi/2, pi/2]
//
// Special cases, in order (shared by every two-body kernel through checkState):
//   an input NaN or infinite -> ERR_NONFINITE; mu <= 0 -> ERR_DOMAIN; r = 0 -> ERR_DOMAIN;
//   |h| <= RECTILINEAR_REL |r| |v| (rectilinear motion, v = 0 included) -> ERR_DEGENERATE. The invariants
//   kernel still writes every output for a rectilinear state (they are defined there) but returns
//   ERR_DEGENERATE, as the other two-body kernels do. checkState takes |r| and |h| with a power-of-two scaled
//   copy when a component is outside [NORM_LO, NORM_HI] (as hypot does), so they are right for any finite
//   state; the products v^2, r . v and the components of h are plain.
//
// Range (invariants, elements.ts, equinoctial.ts): the formulas above keep every intermediate in the normal
// range while the largest |component| of r and of v lies in [WIN_RV_LO, WIN_RV_HI] and mu in [WIN_MU_LO,
// WIN_MU_HI] (derivation beside the constants). Outside that window (scaleState) the kernel works on
//   r' = r 2^kR, v' = v 2^kV, mu' = mu 2^(kR + 2 kV),
// the same orbit in other units (exact: powers of two), with kR putting |r'| near 1 and kV putting v' and mu'
// inside the window; dimensionless results (e, angles, flight-path angle) are those of the scaled state and
// lengths, energies and angular momenta are scaled back. That is possible while mu / (|r| |v|^2) (potential
// against kinetic energy) is within about 2^+-598 (2^+-46 in f32); beyond it -> ERR_OVERFLOW. Inside the window
// nothing is scaled, and where the plain formulas had no under- or overflow the scaled path gives the same bits
// (every operation sees its operands times an exact power of two).
// A result that overflows, or a length, angular momentum or energy scale below the normal range (it would have
// lost relative digits, or be 0) -> ERR_OVERFLOW: a success status always comes with results to the accuracy
// below. (Before 2026-12 a subnormal |r|^2 passed the check: invariants(1, 0, 0, 1.57e-162, 1, 0, 0) gave
// energy -4.50e161 instead of -6.36e161.)
//
// Output slots of `invariants`: 0 energy, 1 hx, 2 hy, 3 hz, 4 |h|, 5 ex, 6 ey, 7 ez, 8 |e|,
// 9 areal velocity, 10 flight-path angle.
// Accuracy: each output is a short sum of products, a few ulp of its largest term; energy and the
// eccentricity vector are differences (v^2/2 against mu/r), so near e = 1 (energy) or e = 0 (e vector) the
// error is a few ulp of v^2/2, absolute, which is the conditioning of the quantity itself. Checked on 150
// states of every orbit class against decimal.js (tests/twobody-conservation.test.ts): energy within
// 4e-16 (v^2/2 + mu/r), h and |h| within 1e-15 relative, e vector within 2e-15 v^2 r / mu, flight-path angle
// within 1e-15 rad.
// Iteration cap: none; the loops are the fixed ladders of pow2 (POW2_BITS), scale2 (SCALE_STEPS) and exponent2
// (EXP_RUNGS plus two).

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { IS_F32, MIN_NORMAL } from "./real";

// ---- power-of-two scaling ------------------------------------------------------------------------------
// Multiplying by 2^k is exact while the result stays normal. No bit access: the exponents are found by
// comparisons, so the same source serves the f64, f32 and host-JS builds.

/** Largest |k| that pow2 takes: 2^k and 2^-k are both normal. */
const POW2_STEP: i32 = IS_F32 ? 120 : 1000;
/** Bits of |k| in pow2 (2^POW2_BITS > POW2_STEP). */
const POW2_BITS: i32 = IS_F32 ? 7 : 10;
/** Multiplications in scale2: |k| up to SCALE_STEPS * POW2_STEP (600 or 5000, beyond any exponent difference). */
const SCALE_STEPS: i32 = 5;
/** Top rung of exponent2's ladder, 2^(2^(EXP_RUNGS - 1)): 2^512 (f64), 2^64 (f32). */
const EXP_TOP: real = IS_F32 ? <real>18446744073709551616.0 : <real>1.3407807929942597e154; // f64 0x5FF0000000000000, f32 0x5F800000
const EXP_RUNGS: i32 = IS_F32 ? 7 : 10;

/** 2^k for |k| <= POW2_STEP, by repeated squaring (every factor is a power of two: exact). */
function pow2(k: i32): real {
  let b: real = k < 0 ? <real>0.5 : <real>2.0;
  let n = k < 0 ? -k : k;
  let s: real = 1;
  for (let i = 0; i < POW2_BITS; i++) {
    if (n & 1) s *= b;
    b *= b; // after the last bit this over- or underflows, unused
    n >>= 1;
  }
  return s;
}

/** x 2^k. Exact when the result is normal: the steps all go the same way, so no step under- or overflows first. */
export function scale2(x: real, k: i32): real {
  let y = x;
  let n = k;
  for (let i = 0; i < SCALE_STEPS && n != 0; i++) {
    const d = n > POW2_STEP ? POW2_STEP : n < -POW2_STEP ? -POW2_STEP : n;
    y *= pow2(d);
    n -= d;
  }
  return y;
}

/** floor(log2 |x|) for finite x != 0, subnormals included: a ladder of comparisons with 2^512, 2^256, ..., 2. */
export function exponent2(x: real): i32 {
  let m = abs(x);
  let k: i32 = 0;
  for (let i = 0; i < 2 && m < 1; i++) {
    m *= pow2(POW2_STEP);
    k -= POW2_STEP;
  }
  let rung = EXP_TOP;
  let step: i32 = 1 << (EXP_RUNGS - 1);
  for (let i = 0; i < EXP_RUNGS; i++) {
    if (m >= rung) {
      m /= rung;
      k += step;
    }
    rung = RMath.sqrt(rung); // 2^(step / 2): exact, step is even until the last rung
    step >>= 1;
  }
  return k;
}

/** Largest |component|. */
export function maxAbs3(x: real, y: real, z: real): real {
  return max(abs(x), max(abs(y), abs(z)));
}

/**
 * Plain sqrt(x^2 + y^2 + z^2) while the largest |component| is in [NORM_LO, NORM_HI] (the squares and their
 * sum stay normal; smaller components' squares are below an ulp of the sum); outside, the same on a copy
 * scaled by a power of two near 1 / max, scaled back. Finite arguments.
 */
export function norm3(x: real, y: real, z: real): real {
  const m = maxAbs3(x, y, z);
  if (m >= NORM_LO && m <= NORM_HI) return RMath.sqrt(x * x + y * y + z * z);
  if (m == 0) return m;
  const k = -exponent2(m);
  const a = scale2(x, k);
  const b = scale2(y, k);
  const c = scale2(z, k);
  return scale2(RMath.sqrt(a * a + b * b + c * c), -k);
}
// File-private scratch: kS of the last speedScale call, read through speedExp().
let lastKS: i32 = 0;

/** kS of the last speedScale call: its result was sqrt(mu / p) 2^kS (0 where mu / p is a normal number). */
export function speedExp(): i32 {
  return lastKS;
}
/** speedScale's result stays within 2^+-SPEED_EXP (times less than 2) when mu / p leaves the normal range. */
const SPEED_EXP: i32 = IS_F32 ? 50 : 500;

/**
 * sqrt(mu / p) 2^kS, kS read afterwards with speedExp(). Where mu / p is a normal number: its plain root, kS = 0. Elsewhere the quotient would
 * have lost digits (or overflowed), and so would sqrt(mu) / sqrt(p) where the speed scale itself is below the
 * normal range although the velocity it multiplies is not: mu and p are first taken to [1, 4) by even powers of
 * two (exact; a subnormal mu included), and the root of their quotient is returned times the power of two
 * nearest to the true scale within 2^+-SPEED_EXP; the caller scales the velocity by 2^-kS at the end.
 * (Before 2026-12 the speed scale was sqrt(mu) / sqrt(p): state_p(5e-324, 7.2e298, 5.5e90, ...) gave v with
 * a relative error of 2.8e-13, the scale 2.6e-312 having kept 38 bits.) mu, p > 0 and finite.
 */
export function speedScale(mu: real, p: real): real {
  lastKS = 0;
  const q = mu / p;
  if (q >= MIN_NORMAL && isFinite(q)) return RMath.sqrt(q);
  const jm = exponent2(mu) & ~1;
  const jp = exponent2(p) & ~1;
  const g = (jm - jp) >> 1; // sqrt(mu / p) = sqrt(mu' / p') 2^g, mu' = mu 2^-jm and p' = p 2^-jp in [1, 4)
  const c = g > SPEED_EXP ? SPEED_EXP : g < -SPEED_EXP ? -SPEED_EXP : g;
  lastKS = c - g;
  return scale2(RMath.sqrt(scale2(mu, -jm) / scale2(p, -jp)), c);
}

/** norm3's plain range: 2^-500 .. 2^500 (f64), 2^-60 .. 2^60 (f32). */
export const NORM_LO: real = IS_F32 ? <real>8.673617379884035e-19 : <real>3.054936363499605e-151; // f64 0x20B0000000000000, f32 0x21800000
export const NORM_HI: real = IS_F32 ? <real>1152921504606846976.0 : <real>3.273390607896142e150; // f64 0x5F30000000000000, f32 0x5D800000

/**
 * A state whose |r x v| is at most this fraction of |r| |v| is rectilinear (the sine of the angle between r
 * and v). 4 ulp of 1: the cross product of two parallel vectors rounded to the format is about that large.
 */
export const RECTILINEAR_REL: real = IS_F32 ? <real>4.76837158203125e-7 : <real>8.881784197001252e-16; // 2^-21, 2^-50; f64 0x3CD0000000000000, f32 0x35000000

// ---- the two-body scratch (file-private: read only through twoBodyGet, scaledExpR, scaledExpV) ------------------------------------------------------------------------------
// checkState and scaleState keep their results in this file's scratch (wasm globals, no linear memory); the
// calling kernel reads them right after the call through twoBodyGet(TB_...).
/** checkState: |r|, v^2, r . v, h = r x v (three values) and |h|. */
export const TB_R: i32 = 0;
export const TB_V2: i32 = 1;
export const TB_RV: i32 = 2;
export const TB_HX: i32 = 3;
export const TB_HY: i32 = 4;
export const TB_HZ: i32 = 5;
export const TB_H: i32 = 6;
/** scaleState: the state to compute with, mu', r' (three values), v' (three values), and the exponents kR, kV. */
export const TB_MU: i32 = 7;
export const TB_RX: i32 = 8;
export const TB_RY: i32 = 9;
export const TB_RZ: i32 = 10;
export const TB_VX: i32 = 11;
export const TB_VY: i32 = 12;
export const TB_VZ: i32 = 13;

// checkState's results
let stR: real = 0;
let stV2: real = 0;
let stRV: real = 0;
let stHX: real = 0;
let stHY: real = 0;
let stHZ: real = 0;
let stH: real = 0;
// scaleState's results
let scMu: real = 0;
let scRX: real = 0;
let scRY: real = 0;
let scRZ: real = 0;
let scVX: real = 0;
let scVY: real = 0;
let scVZ: real = 0;
let scKR: i32 = 0;
let scKV: i32 = 0;

/** Value i (TB_R .. TB_VZ) of the last checkState / scaleState call. */
export function twoBodyGet(i: i32): real {
  switch (i) {
    case TB_R: return stR;
    case TB_V2: return stV2;
    case TB_RV: return stRV;
    case TB_HX: return stHX;
    case TB_HY: return stHY;
    case TB_HZ: return stHZ;
    case TB_H: return stH;
    case TB_MU: return scMu;
    case TB_RX: return scRX;
    case TB_RY: return scRY;
    case TB_RZ: return scRZ;
    case TB_VX: return scVX;
    case TB_VY: return scVY;
    default: return scVZ;
  }
}

/** kR of the last scaleState call: r' = r 2^kR. */
export function scaledExpR(): i32 {
  return scKR;
}

/** kV of the last scaleState call: v' = v 2^kV, mu' = mu 2^(kR + 2 kV). */
export function scaledExpV(): i32 {
  return scKV;
}

/**
 * The special cases shared by the two-body kernels (see the header). Keeps |r|, v^2, r . v, h and |h| (TB_R ..
 * TB_H) for twoBodyGet as far as it gets (all of them when it returns OK or ERR_DEGENERATE).
 */
export function checkState(mu: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real): i32 {
  if (!isFinite(mu) || !isFinite(rx) || !isFinite(ry) || !isFinite(rz) || !isFinite(vx) || !isFinite(vy) || !isFinite(vz)) return ERR_NONFINITE;
  if (!(mu > 0)) return ERR_DOMAIN;
  const r = norm3(rx, ry, rz);
  stR = r;
  if (!(r > 0)) return ERR_DOMAIN;
  const v2 = vx * vx + vy * vy + vz * vz;
  const hx = ry * vz - rz * vy;
  const hy = rz * vx - rx * vz;
  const hz = rx * vy - ry * vx;
  const h = norm3(hx, hy, hz);
  stV2 = v2;
  stRV = rx * vx + ry * vy + rz * vz;
  stHX = hx;
  stHY = hy;
  stHZ = hz;
  stH = h;
  if (!isFinite(r) || !isFinite(v2) || !isFinite(h)) return ERR_OVERFLOW;
  if (!(h > RECTILINEAR_REL * r * RMath.sqrt(v2))) return ERR_DEGENERATE;
  return OK;
}

/** checkState on the scaled state of the last scaleState call. */
export function checkScaled(): i32 {
  return checkState(scMu, scRX, scRY, scRZ, scVX, scVY, scVZ);
}

// ---- the window of the plain formulas and the scaled state -----------------------------------------------
// f64: largest |component| of r and of v in [2^-150, 2^150], mu in [2^-300, 2^300]. Then |r| |v| >= 2^-300
// and a state that is not rectilinear has |h| >= 2^-50 |r| |v|, so |h|^2 >= 2^-700 and p = |h|^2 / mu lies in
// [2^-1000, 2^904]; v^2 / mu and 2 / r lie in [2^-600, 2^600], so 1 / a is 0 or above 2^-653 and a is finite;
// c1 r and (r . v) v are below 2^602 and the e vector below 2^902 (its norm: norm3). In general the bounds
// need 4 w + m <= 900 for windows 2^+-w, 2^+-m. f32 (w = m = 16, RECTILINEAR_REL = 2^-21): |h|^2 >= 2^-106,
// p in [2^-122, 2^84], 1 / a is 0 or above 2^-71.
const WIN_RV_LO: real = IS_F32 ? <real>0.0000152587890625 : <real>7.006492321624085e-46; // 2^-16, 2^-150; f64 0x3690000000000000, f32 0x37800000
const WIN_RV_HI: real = IS_F32 ? <real>65536.0 : <real>1.42724769270596e45; // 2^16, 2^150; f64 0x4950000000000000, f32 0x47800000
const WIN_MU_LO: real = IS_F32 ? <real>0.0000152587890625 : <real>4.909093465297727e-91; // 2^-16, 2^-300; f64 0x2D30000000000000, f32 0x37800000
const WIN_MU_HI: real = IS_F32 ? <real>65536.0 : <real>2.037035976334486e90; // 2^16, 2^300; f64 0x52B0000000000000, f32 0x47800000
/** Largest exponent scaleState gives the largest |component| of v' (it lies in [2^-x, 2^(x+1))). */
const WIN_V_EXP: i32 = IS_F32 ? 15 : 149;

// scaleState's outputs (TB_MU .. TB_KV).
function putScaled(mu: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real, kR: i32, kV: i32): void {
  scMu = mu;
  scRX = rx;
  scRY = ry;
  scRZ = rz;
  scVX = vx;
  scVY = vy;
  scVZ = vz;
  scKR = kR;
  scKV = kV;
}

/**
 * The state the two-body kernels compute with (see "Range" in the header), kept for twoBodyGet (TB_MU .. TB_KV):
 * (mu, r, v) itself inside the window, a power-of-two scaled copy outside it. ERR_OVERFLOW when no scaling puts
 * mu' and v' in the window (mu / (|r| |v|^2) beyond about 2^+-598) or |r| or |v| exceeds the largest real; mu' is
 * then mu and the caller still runs checkScaled for the statuses that come first. Non-finite input, mu <= 0 or
 * r = 0 are left unscaled for checkState.
 */
export function scaleState(mu: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real): i32 {
  putScaled(mu, rx, ry, rz, vx, vy, vz, 0, 0);
  if (!isFinite(mu) || !isFinite(rx) || !isFinite(ry) || !isFinite(rz) || !isFinite(vx) || !isFinite(vy) || !isFinite(vz) || !(mu > 0)) return OK;
  const mr = maxAbs3(rx, ry, rz);
  const mv = maxAbs3(vx, vy, vz);
  if (mr == 0) return OK;
  const vIn = mv == 0 || (mv >= WIN_RV_LO && mv <= WIN_RV_HI);
  if (mr >= WIN_RV_LO && mr <= WIN_RV_HI && vIn && mu >= WIN_MU_LO && mu <= WIN_MU_HI) return OK;
  const kR = -exponent2(mr); // max |r'| in [1, 2)
  const kV = velocityExponent(exponent2(mu) + kR, mv);
  const tRx = scale2(rx, kR);
  const tRy = scale2(ry, kR);
  const tRz = scale2(rz, kR);
  const tVx = scale2(vx, kV);
  const tVy = scale2(vy, kV);
  const tVz = scale2(vz, kV);
  putScaled(mu, tRx, tRy, tRz, tVx, tVy, tVz, kR, kV);
  // |r| or |v| beyond the largest real: ERR_OVERFLOW, as checkState gives for the unscaled state.
  if (!isFinite(scale2(norm3(tRx, tRy, tRz), -kR)) || !isFinite(scale2(norm3(tVx, tVy, tVz), -kV))) return ERR_OVERFLOW;
  const m2 = scale2(mu, kR + 2 * kV);
  if (!(m2 >= WIN_MU_LO && m2 <= WIN_MU_HI)) return ERR_OVERFLOW;
  scMu = m2;
  return OK;
}

// kV for scaleState: mu 2^kR in [2^em, 2^(em + 1)); mv the largest |component| of v (0 allowed).
function velocityExponent(em: i32, mv: real): i32 {
  if (mv == 0) return -(em >> 1); // mu' in [1, 4)
  const ev = exponent2(mv);
  // d = em - 2 ev is log2 of mu / (|r'| |v|^2 2^kR) to within 2: v' = 2^x (x = -floor(d / 2)) gives mu' in [1, 4).
  let x = -((em - 2 * ev) >> 1);
  if (x > WIN_V_EXP) x = WIN_V_EXP;
  if (x < -WIN_V_EXP) x = -WIN_V_EXP;
  return x - ev;
}

/** Energy, angular momentum, eccentricity vector, areal velocity and flight-path angle of (r, v). */
export function invariants(mu: real, rx: real, ry: real, rz: real, vx: real, vy: real, vz: real): i32 {
  const sc = scaleState(mu, rx, ry, rz, vx, vy, vz);
  const s = checkScaled();
  if (s != OK && s != ERR_DEGENERATE) return s;
  if (sc != OK) return s != OK ? s : sc;
  const m = scMu;
  const r = stR;
  const v2 = stV2;
  const rv = stRV;
  const hn = stH;
  const energy = <real>0.5 * v2 - m / r;
  const c1 = v2 - m / r;
  const ex = (c1 * scRX - rv * scVX) / m;
  const ey = (c1 * scRY - rv * scVY) / m;
  const ez = (c1 * scRZ - rv * scVZ) / m;
  const e = norm3(ex, ey, ez);
  const fpa = RMath.atan2(rv, hn);
  // Back to the caller's units (nothing to do inside the window): energy 2^-2kV, h 2^-(kR + kV).
  const kR = scKR;
  const kV = scKV;
  const kh = -(kR + kV);
  const h = scale2(hn, kh);
  const areal = <real>0.5 * h;
  const E = scale2(energy, -2 * kV);
  put(0, E);
  put(1, scale2(stHX, kh));
  put(2, scale2(stHY, kh));
  put(3, scale2(stHZ, kh));
  put(4, h);
  put(5, ex);
  put(6, ey);
  put(7, ez);
  put(8, e);
  put(9, areal);
  put(10, fpa);
  if (s != OK) return s;
  // The scale of the energy (v^2 / 2 + mu / r, which bounds its error) and |h| / 2 must be normal.
  const eScale = scale2(<real>0.5 * v2 + m / r, -2 * kV);
  if (!isFinite(E) || !isFinite(e) || !isFinite(h) || !(eScale >= MIN_NORMAL) || !(areal >= MIN_NORMAL)) return ERR_OVERFLOW;
  return OK;
}

/**
 * Write r = a1 P + a2 Q, v = (b1 P + b2 Q) 2^kv (P, Q a unit frame of the orbit plane; kv undoes speedScale's
 * kS) to slots 0..5. Returns ERR_OVERFLOW, writing nothing, when a component is not finite or r or v is below
 * the normal range (it would have lost its relative digits); else OK. Shared by state, state_p and
 * from_equinoctial.
 */
export function putStateInFrame(a1: real, a2: real, b1: real, b2: real, kv: i32, px: real, py: real, pz: real, qx: real, qy: real, qz: real): i32 {
  const rx = a1 * px + a2 * qx;
  const ry = a1 * py + a2 * qy;
  const rz = a1 * pz + a2 * qz;
  const vx = scale2(b1 * px + b2 * qx, kv);
  const vy = scale2(b1 * py + b2 * qy, kv);
  const vz = scale2(b1 * pz + b2 * qz, kv);
  if (!isFinite(rx) || !isFinite(ry) || !isFinite(rz) || !isFinite(vx) || !isFinite(vy) || !isFinite(vz)) return ERR_OVERFLOW;
  if (!(maxAbs3(rx, ry, rz) >= MIN_NORMAL) || !(maxAbs3(vx, vy, vz) >= MIN_NORMAL)) return ERR_OVERFLOW;
  put(0, rx);
  put(1, ry);
  put(2, rz);
  put(3, vx);
  put(4, vy);
  put(5, vz);
  return OK;
}
