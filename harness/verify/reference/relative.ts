/**
 * High-precision references for the relative-motion kernels (assembly/relative.ts), independent of them:
 * decimal.js, the input doubles taken exactly, results rounded to nearest. No linear model inside.
 *
 * Frame (the kernels' convention, docs/relative-motion.md): x = r / |r|, z = h / |h| (h = r x v), y = z x x;
 * relative velocity as seen in the rotating frame, (v_d - v_c) - omega x (r_d - r_c), omega = h / |r|^2.
 *
 * First-order relative motion: the chief (rc, vc) and a deputy offset from it by EPS times the relative state
 * (mapped to inertial space at t0) are propagated each on the nonlinear two-body problem (propagateDec of
 * twobody.ts: classical elements and Kepler's equation, a method the kernel does not use); the deputy's state
 * relative to the chief at t, mapped into the chief's rotating frame at t and divided by EPS, is the
 * first-order (linear) relative state to within EPS times the second-order terms: with EPS = 1e-20 and offsets
 * of order 1 that is 20 digits below the answer, far below a double's ulp. The working precision is
 * REFERENCE_DIGITS (60) plus the digits lost to 1 - e^2, so that the difference keeps 40 digits.
 */
import { Dec, decimalAt, exact, toDouble } from "./decimal.js";
import { add, sub, scale, dot, cross, norm, type V3 } from "./vec3.js";
import { propagateDec } from "./twobody.js";

type D = typeof Dec;

/** The deputy's offset scale: the relative state is multiplied by this before the nonlinear propagation. */
export const OFFSET_EPS = "1e-20";
const BASE_DIGITS = 60;

/** The chief's rotating frame at (r, v): unit vectors x, y, z and the rate w = |h| / |r|^2. */
export function frameDec(r: V3, v: V3): { x: V3; y: V3; z: V3; w: Dec } {
  const rn = norm(r);
  const h = cross(r, v);
  const hn = norm(h);
  const one = new (r[0].constructor as D)(1);
  const x = scale(r, one.div(rn));
  const z = scale(h, one.div(hn));
  return { x, y: cross(z, x), z, w: hn.div(rn).div(rn) };
}

/** Relative state (x, y, z, vx, vy, vz) of deputy (rd, vd) in the chief's rotating frame. */
export function toRelativeDec(rc: V3, vc: V3, rd: V3, vd: V3): Dec[] {
  const f = frameDec(rc, vc);
  const d = sub(rd, rc);
  const u = sub(vd, vc);
  const x = dot(d, f.x);
  const y = dot(d, f.y);
  const z = dot(d, f.z);
  return [x, y, z, dot(u, f.x).plus(f.w.times(y)), dot(u, f.y).minus(f.w.times(x)), dot(u, f.z)];
}

/** Deputy inertial state [rd, vd] from a relative state in the chief's rotating frame. */
export function fromRelativeDec(rc: V3, vc: V3, rel: readonly Dec[]): { r: V3; v: V3 } {
  const f = frameDec(rc, vc);
  const [x, y, z, vx, vy, vz] = rel as [Dec, Dec, Dec, Dec, Dec, Dec];
  const comb = (a: Dec, b: Dec, c: Dec): V3 => add(add(scale(f.x, a), scale(f.y, b)), scale(f.z, c));
  return { r: add(rc, comb(x, y, z)), v: add(vc, comb(vx.minus(f.w.times(y)), vy.plus(f.w.times(x)), vz)) };
}

/** Working digits: BASE_DIGITS plus those lost to 1 - e^2 of the chief (near e = 1). */
function digitsFor(mu: number, rc: readonly number[], vc: readonly number[]): number {
  const r = Math.hypot(rc[0]!, rc[1]!, rc[2]!);
  const v2 = vc[0]! ** 2 + vc[1]! ** 2 + vc[2]! ** 2;
  const alphaR = Math.abs(2 - (r * v2) / mu); // r / a
  return BASE_DIGITS + Math.min(40, Math.max(0, Math.ceil(-Math.log10(alphaR))));
}

/**
 * Reference for one relative-motion case (mu, rcx, rcy, rcz, vcx, vcy, vcz, x0, y0, z0, vx0, vy0, vz0, dt):
 * the first-order relative state at t0 + dt, [x, y, z, vx, vy, vz], each rounded to the nearest double.
 */
export function referenceRelativeMotion(x: readonly number[]): number[] {
  return relativeMotionDec(x).map(toDouble);
}

/** referenceRelativeMotion before rounding (decimals at the working precision). */
export function relativeMotionDec(x: readonly number[]): Dec[] {
  const P = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7)));
  const ex = x.map((v) => exact(P, v));
  const [mu, rcx, rcy, rcz, vcx, vcy, vcz] = ex as [Dec, Dec, Dec, Dec, Dec, Dec, Dec];
  const dt = ex[13]!;
  const eps = new P(OFFSET_EPS);
  const rc: V3 = [rcx, rcy, rcz];
  const vc: V3 = [vcx, vcy, vcz];
  const dep = fromRelativeDec(rc, vc, ex.slice(7, 13).map((q) => q.times(eps)));
  const chief = propagateDec(P, [mu, ...rc, ...vc, dt]);
  const deputy = propagateDec(P, [mu, ...dep.r, ...dep.v, dt], chief.anomaly);
  return toRelativeDec(chief.r, chief.v, deputy.r, deputy.v).map((q) => q.div(eps));
}
