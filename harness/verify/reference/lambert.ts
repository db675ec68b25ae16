/**
 * High-precision references for Lambert's problem, independent of the kernel (which iterates on Izzo's x).
 * Nothing here solves Lambert's problem the kernel's way; the answer comes from shooting on a propagator:
 *
 *  - `propagateDec`: two-body propagation by Kepler's equation written for the change of eccentric (hyperbolic)
 *    anomaly from the starting state, then Lagrange's f and g (the classical elements form, e.g. Battin 1999,
 *    "An Introduction to the Mathematics and Methods of Astrodynamics", ch. 4). Decimal arithmetic throughout
 *    (decimal.js, 50 digits); the residual is written so that nothing cancels for small anomaly changes.
 *  - `shoot`: Newton's method on v1 so that the propagated position lands on r2 exactly (Jacobian by finite
 *    differences at 50 digits). Started from the velocity a case was generated with, it converges in two steps
 *    to the exact solution of the problem as rounded to doubles.
 *  - `familyTime`: the time of flight along the one-parameter family of conics through r1 and r2, parameterized by
 *    the semi-latus rectum p (the p-iteration form of Lagrange's coefficients, Bate, Mueller and White 1971,
 *    "Fundamentals of Astrodynamics", ch. 5). It labels the multi-revolution branch of a solution and finds the
 *    minimum time of flight of a revolution count by golden-section search, both without the kernel's variable.
 *
 * Branches (the kernel's names): for N >= 1 complete revolutions there are two solutions when tof exceeds the
 * minimum; `short-period` is the one with the smaller semi-major axis, `long-period` the one with the larger.
 * Along the family, p grows with Izzo's x on the short way and shrinks on the long way, and the short-period
 * solution lies where tof decreases with x; so here: short-period iff sign(pi - theta) * dT/dp < 0.
 */
import { decimalAt, exact, toDouble, piOf, oddRemainder as seriesRemainder, type Dec } from "./decimal.js";
import { add, sub, scale, dot, cross, norm, type V3 } from "./vec3.js";

/** Working precision of this reference (significant digits). */
export const LAMBERT_DIGITS = 50;
const D = decimalAt(LAMBERT_DIGITS);

const ZERO = new D(0);
const ONE = new D(1);
const TWO = new D(2);
const PI = piOf(D);
const TWO_PI = PI.times(2);
const MAX_NEWTON = 300;
/** Unit roundoff of binary64, for the conditioning figure. */
const U = new D(2).pow(-53);

const HALF_PI = PI.div(2);
/** Below this a series term or Newton step is negligible at the current precision. */
const tiny = (): Dec => new D(10).pow(-(D.precision + 4));

/**
 * Run fn with the working precision lowered (or raised) to `digits`: the searches that only need a starting
 * guess run at fewer digits; the results are then refined at LAMBERT_DIGITS.
 */
export function withDigits<T>(digits: number, fn: () => T): T {
  const saved = D.precision;
  D.set({ precision: digits });
  try {
    return fn();
  } finally {
    D.set({ precision: saved });
  }
}

/** sin x and cos x: reduction by pi/2, Taylor series at x/16, four double-angle steps (decimal.js's own is slower). */
function sincos(x: Dec): [Dec, Dec] {
  const k = x.div(HALF_PI).round();
  const h = x.minus(HALF_PI.times(k)).div(16);
  const h2 = h.times(h);
  const TINY = tiny();
  let ts = h;
  let s = h;
  let tc = ONE;
  let c = ONE;
  for (let n = 1; n < 100; n++) {
    ts = ts.times(h2).div((2 * n) * (2 * n + 1)).neg();
    tc = tc.times(h2).div((2 * n - 1) * (2 * n)).neg();
    s = s.plus(ts);
    c = c.plus(tc);
    if (tc.abs().lt(TINY)) break;
  }
  for (let i = 0; i < 4; i++) {
    const s2 = s.times(c).times(2);
    c = ONE.minus(s.times(s).times(2));
    s = s2;
  }
  const q = k.mod(4).plus(4).mod(4).toNumber();
  if (q === 0) return [s, c];
  if (q === 1) return [c, s.neg()];
  if (q === 2) return [s.neg(), c.neg()];
  return [c.neg(), s];
}
const sin = (x: Dec): Dec => sincos(x)[0];
/** 1 - cos x as 2 sin^2(x / 2): full relative precision at small x. */
const oneMinusCos = (x: Dec): Dec => sin(x.div(2)).pow(2).times(2);
const cos = (x: Dec): Dec => sincos(x)[1];

/**
 * atan2(y, x) in (-pi, pi]: a double starter t, then t + atan(u) with u = tan(error) = (y cos t - x sin t) /
 * (x cos t + y sin t), atan(u) by its series (|u| ~ 1e-16, so two terms per step reach 1e-80).
 */
function atan2(y: Dec, x: Dec): Dec {
  const m = D.max(y.abs(), x.abs());
  if (m.isZero()) return ZERO;
  let t = new D(Math.atan2(y.div(m).toNumber(), x.div(m).toNumber()));
  const TINY = tiny();
  for (let i = 0; i < 10; i++) {
    const [s, c] = sincos(t);
    const u = y.times(c).minus(x.times(s)).div(x.times(c).plus(y.times(s)));
    const u2 = u.times(u);
    t = t.plus(u.times(ONE.minus(u2.div(3)).plus(u2.times(u2).div(5))));
    if (u.abs().lt(new D(1e-12))) break;
  }
  return t;
}


/** A vector of doubles taken exactly. */
export function vecExact(x: readonly number[]): V3 {
  return [exact(D, x[0]!), exact(D, x[1]!), exact(D, x[2]!)];
}
/** Round a decimal vector to doubles. */
export function vecDouble(x: V3): [number, number, number] {
  return [toDouble(x[0]), toDouble(x[1]), toDouble(x[2])];
}
export { D as LambertDecimal };
export type { V3 };

/** x - sin x (hyperbolic: sinh x - x) with no cancellation: the shared series (decimal.ts) for |x| <= 1. */
function oddRemainder(x: Dec, hyperbolic: boolean): Dec {
  if (x.abs().gt(1)) return hyperbolic ? D.sinh(x).minus(x) : x.minus(sin(x));
  return seriesRemainder(D, x, hyperbolic);
}

/** Bracketed Newton for an increasing f on [lo, hi] with f(lo) <= 0 <= f(hi). */
function solveIncreasing(f: (x: Dec) => [Dec, Dec], lo: Dec, hi: Dec, x0: Dec): Dec {
  let x = x0;
  const tol = new D(10).pow(-(D.precision - 6));
  const stall = new D(10).pow(-(D.precision / 2));
  let prev = new D(Infinity);
  for (let i = 0; i < MAX_NEWTON; i++) {
    const [fx, dfx] = f(x);
    if (fx.isZero()) return x;
    if (fx.isNegative()) lo = x;
    else hi = x;
    const step = fx.div(dfx);
    const size = x.abs().plus(1);
    if (step.abs().lte(tol.times(size))) return x.minus(step);
    // Where the residual cancels (near-rectilinear hyperbolas) the steps stop shrinking at the rounding level.
    if (step.abs().lte(stall.times(size)) && step.abs().gte(prev)) return x.minus(step);
    prev = step.abs();
    let next = x.minus(step);
    if (!next.isFinite() || next.lte(lo) || next.gte(hi)) next = lo.plus(hi).div(2);
    x = next;
  }
  throw new Error("lambert reference: Kepler iteration did not converge");
}

/** State after time dt from (r0, v0) under gravitational parameter mu (two-body, any non-parabolic conic). */
export function propagateDec(mu: Dec, r0: V3, v0: V3, dt: Dec, hint?: Dec): { r: V3; v: V3; dx: Dec } {
  const rn = norm(r0);
  const alpha = TWO.div(rn).minus(dot(v0, v0).div(mu)); // 1 / a
  if (alpha.abs().lt(new D(10).pow(-40).div(rn))) throw new Error("lambert reference: parabolic state");
  const sigma = dot(r0, v0).div(mu.sqrt()); // r . v / sqrt(mu)
  const one = ONE;
  let f: Dec, g: Dec, fdot: Dec, gdot: Dec;
  if (alpha.gt(0)) {
    // Ellipse: e cos E0 = 1 - r0 / a, e sin E0 = sigma / sqrt(a); n dt = r0 alpha dE + ecos (dE - sin dE) + esin (1 - cos dE).
    const ecos = one.minus(rn.times(alpha));
    const esin = sigma.times(alpha.sqrt());
    const n = mu.times(alpha.pow(3)).sqrt();
    const ndt = n.times(dt);
    const q = rn.times(alpha);
    const F = (x: Dec): [Dec, Dec] => {
      const s = sin(x);
      const c = cos(x);
      const omc = sin(x.div(2)).pow(2).times(2);
      const val = q.times(x).plus(ecos.times(oddRemainder(x, false))).plus(esin.times(omc)).minus(ndt);
      return [val, one.minus(ecos.times(c)).plus(esin.times(s))];
    };
    const [lo, hi] = [ndt.minus(2), ndt.plus(2)];
    const dE = solveIncreasing(F, lo, hi, hint !== undefined && hint.gt(lo) && hint.lt(hi) ? hint : ndt);
    const omc = sin(dE.div(2)).pow(2).times(2);
    f = one.minus(omc.div(q));
    g = dt.minus(oddRemainder(dE, false).div(n));
    const r = add(scale(r0, f), scale(v0, g));
    const rr = norm(r);
    fdot = mu.div(alpha).sqrt().times(sin(dE)).neg().div(rr.times(rn));
    gdot = one.minus(omc.div(rr.times(alpha)));
    return { r, v: add(scale(r0, fdot), scale(v0, gdot)), dx: dE };
  }
  // Hyperbola: e cosh H0 = 1 - r0 alpha, e sinh H0 = sigma sqrt(-alpha);
  // n dt = -r0 alpha dH + ecosh (sinh dH - dH) + esinh (cosh dH - 1).
  const ma = alpha.neg();
  const ecosh = one.plus(rn.times(ma));
  const esinh = sigma.times(ma.sqrt());
  const n = mu.times(ma.pow(3)).sqrt();
  const ndt = n.times(dt);
  const q = rn.times(ma);
  const F = (x: Dec): [Dec, Dec] => {
    const sh = D.sinh(x);
    const ch = D.cosh(x);
    const cm1 = D.sinh(x.div(2)).pow(2).times(2);
    const val = q.times(x).plus(ecosh.times(oddRemainder(x, true))).plus(esinh.times(cm1)).minus(ndt);
    return [val, ecosh.times(ch).plus(esinh.times(sh)).minus(one)];
  };
  let hi = ONE;
  while (F(hi)[0].lt(0)) hi = hi.times(2);
  const dH = solveIncreasing(F, ZERO, hi, hint !== undefined && hint.gt(0) && hint.lt(hi) ? hint : hi.div(2));
  const cm1 = D.sinh(dH.div(2)).pow(2).times(2);
  f = one.plus(cm1.div(rn.times(alpha)));
  g = dt.minus(oddRemainder(dH, true).div(n));
  const r = add(scale(r0, f), scale(v0, g));
  const rr = norm(r);
  fdot = mu.div(ma).sqrt().times(D.sinh(dH)).neg().div(rr.times(rn));
  gdot = one.plus(cm1.div(rr.times(alpha)));
  return { r, v: add(scale(r0, fdot), scale(v0, gdot)), dx: dH };
}

/** Solve the 3x3 system M x = b (Cramer's rule; M given by columns). */
function solve3(cols: [V3, V3, V3], b: V3): V3 {
  const [a, bb, c] = cols;
  const det = dot(a, cross(bb, c));
  return [dot(b, cross(bb, c)).div(det), dot(a, cross(b, c)).div(det), dot(a, cross(bb, b)).div(det)];
}

const unit = (i: number): V3 => [i === 0 ? ONE : ZERO, i === 1 ? ONE : ZERO, i === 2 ? ONE : ZERO];

/** Columns d(out)/d(v0_i) of the propagated position and velocity, by forward differences at 50 digits. */
function sensitivities(mu: Dec, r0: V3, v0: V3, dt: Dec, base: { r: V3; v: V3; dx: Dec }, wrt: "v" | "r"): { dr: [V3, V3, V3]; dv: [V3, V3, V3] } {
  const x = wrt === "v" ? v0 : r0;
  const h = norm(x).times(new D(10).pow(-22));
  const dr: V3[] = [];
  const dv: V3[] = [];
  for (let i = 0; i < 3; i++) {
    const moved = add(x, scale(unit(i), h));
    const s = wrt === "v" ? propagateDec(mu, r0, moved, dt, base.dx) : propagateDec(mu, moved, v0, dt, base.dx);
    dr.push(scale(sub(s.r, base.r), ONE.div(h)));
    dv.push(scale(sub(s.v, base.v), ONE.div(h)));
  }
  return { dr: dr as [V3, V3, V3], dv: dv as [V3, V3, V3] };
}

export interface ShotSolution {
  v1: V3;
  v2: V3;
  /** The anomaly change of the solution (a starter for nearby propagations). */
  dx: Dec;
  /** d r2 / d v1 columns at the solution (for conditioning). */
  jrv: [V3, V3, V3];
  jvv: [V3, V3, V3];
}

/** Newton on v1 until r(tof; r1, v1) = r2, from a guess close to the solution (a few percent at most). */
export function shoot(mu: Dec, r1: V3, r2: V3, tof: Dec, guess: V3): ShotSolution {
  let v = guess;
  let s = propagateDec(mu, r1, v, tof);
  let jac = sensitivities(mu, r1, v, tof, s, "v");
  const tol = new D(10).pow(-(LAMBERT_DIGITS - 8));
  const stall = new D(10).pow(-(LAMBERT_DIGITS / 2));
  let prev = new D(Infinity);
  for (let it = 0; it < 40; it++) {
    const miss = sub(s.r, r2);
    const dv = solve3(jac.dr, miss);
    v = sub(v, dv);
    s = propagateDec(mu, r1, v, tof, s.dx);
    const size = norm(dv);
    if (size.lte(norm(v).times(tol))) return { v1: v, v2: s.v, dx: s.dx, jrv: jac.dr, jvv: jac.dv };
    // Where the propagation itself cancels (near-rectilinear hyperbolas) the corrections stop shrinking.
    if (size.lte(norm(v).times(stall)) && size.gte(prev)) return { v1: v, v2: s.v, dx: s.dx, jrv: jac.dr, jvv: jac.dv };
    prev = size;
    // Refresh the Jacobian while far from the solution (Newton); near it a chord step is enough.
    if (norm(dv).gt(norm(v).times(new D(10).pow(-12)))) jac = sensitivities(mu, r1, v, tof, s, "v");
  }
  throw new Error("lambert reference: shooting did not converge");
}

/**
 * First-order relative error of v1 and v2 caused by rounding every input (mu, r1, r2, tof) by half an ulp:
 * u * || sum_j |d v / d input_j| |input_j| || / |v|, u = 2^-53 (derivatives at 50 digits).
 */
export function lambertCondition(mu: Dec, r1: V3, r2: V3, tof: Dec, sol: ShotSolution): { v1: number; v2: number } {
  const base = { r: r2, v: sol.v2, dx: sol.dx };
  const sr = sensitivities(mu, r1, sol.v1, tof, base, "r");
  const hm = mu.times(new D(10).pow(-22));
  const sm = propagateDec(mu.plus(hm), r1, sol.v1, tof, sol.dx);
  const rmu = scale(sub(sm.r, r2), ONE.div(hm));
  const vmu = scale(sub(sm.v, sol.v2), ONE.div(hm));
  const r2n = norm(r2);
  const acc2 = scale(r2, mu.neg().div(r2n.pow(3)));
  // Perturbations: each input component j with its magnitude; dv1 = Jrv^-1 (dr2 - Jrr dr1 - Rmu dmu - v2 dt).
  const cols1: V3[] = [];
  const cols2: V3[] = [];
  const push = (rhs: V3, direct2: V3, size: Dec): void => {
    const dv1 = solve3(sol.jrv, rhs);
    // dv2 = Jvv dv1 + direct2 (direct2: the explicit dependence of v2 on the input).
    const dv2 = add(add(add(scale(sol.jvv[0], dv1[0]), scale(sol.jvv[1], dv1[1])), scale(sol.jvv[2], dv1[2])), direct2);
    cols1.push(scale(dv1, size.abs()));
    cols2.push(scale(dv2, size.abs()));
  };
  const zero: V3 = [ZERO, ZERO, ZERO];
  for (let j = 0; j < 3; j++) push(unit(j), zero, r2[j]!);
  for (let j = 0; j < 3; j++) push(scale(sr.dr[j]!, new D(-1)), sr.dv[j]!, r1[j]!);
  push(scale(rmu, new D(-1)), vmu, mu);
  push(scale(sol.v2, new D(-1)), acc2, tof);
  const fig = (cols: V3[], v: V3): number => {
    const s: V3 = [ZERO, ZERO, ZERO];
    for (const c of cols) for (let i = 0; i < 3; i++) s[i] = s[i]!.plus(c[i]!.abs());
    return norm(s).times(U).div(norm(v)).toNumber();
  };
  return { v1: fig(cols1, sol.v1), v2: fig(cols2, sol.v2) };
}

/** Transfer angle in [0, 2 pi) from r1 to r2 measured about the unit normal nhat (direction of motion). */
export function transferAngle(r1: V3, r2: V3, nhat: V3): Dec {
  const th = atan2(dot(cross(r1, r2), nhat), dot(r1, r2));
  return th.isNegative() ? th.plus(TWO_PI) : th;
}

/** e sin E and E (ellipse) or e sinh H and H (hyperbola) of a state, with the mean motion. */
function anomalyOf(mu: Dec, r: V3, v: V3): { A: Dec; es: Dec; n: Dec; elliptic: boolean } {
  const rn = norm(r);
  const alpha = TWO.div(rn).minus(dot(v, v).div(mu));
  const sigma = dot(r, v).div(mu.sqrt());
  const ec = ONE.minus(rn.times(alpha));
  if (alpha.gt(0)) {
    const es = sigma.times(alpha.sqrt());
    return { A: atan2(es, ec), es, n: mu.times(alpha.pow(3)).sqrt(), elliptic: true };
  }
  const ma = alpha.neg();
  const es = sigma.times(ma.sqrt());
  return { A: D.atanh(es.div(ec)), es, n: mu.times(ma.pow(3)).sqrt(), elliptic: false };
}

/** The member of semi-latus rectum p of the family of conics through r1 and r2 (transfer angle theta). */
export function familyMember(mu: Dec, r1: V3, r2: V3, theta: Dec, p: Dec): { v1: V3; v2: V3 } {
  const r1n = norm(r1);
  const r2n = norm(r2);
  const st = sin(theta);
  const omc = oneMinusCos(theta);
  const f = ONE.minus(r2n.times(omc).div(p));
  const g = r1n.times(r2n).times(st).div(mu.times(p).sqrt());
  const gdot = ONE.minus(r1n.times(omc).div(p));
  return { v1: scale(sub(r2, scale(r1, f)), ONE.div(g)), v2: scale(sub(scale(r2, gdot), r1), ONE.div(g)) };
}

/**
 * Time of flight from r1 to r2 on the conic of semi-latus rectum p through both points (transfer angle theta in
 * (0, 2 pi) about the direction of motion, N extra complete revolutions; a hyperbola only with N = 0).
 * Lagrange's coefficients in p: f = 1 - r2 (1 - cos theta) / p, g = r1 r2 sin theta / sqrt(mu p),
 * gdot = 1 - r1 (1 - cos theta) / p; v1 = (r2 - f r1) / g, v2 = (gdot r2 - r1) / g. Then Kepler's equation.
 * Undefined (returned as such) for a hyperbolic member with N >= 1 or a member that does not reach r2.
 */
export function familyTime(mu: Dec, r1: V3, r2: V3, theta: Dec, N: number, p: Dec): Dec | undefined {
  const m = familyMember(mu, r1, r2, theta, p);
  const a = anomalyOf(mu, r1, m.v1);
  const b = anomalyOf(mu, r2, m.v2);
  if (a.elliptic !== b.elliptic) return undefined;
  if (a.elliptic) {
    let dE = b.A.minus(a.A);
    while (dE.isNegative()) dE = dE.plus(TWO_PI);
    while (dE.gte(TWO_PI)) dE = dE.minus(TWO_PI);
    dE = dE.plus(TWO_PI.times(N));
    return dE.minus(b.es.minus(a.es)).div(a.n);
  }
  const dH = b.A.minus(a.A);
  if (N !== 0 || !dH.gt(0)) return undefined;
  return b.es.minus(a.es).minus(dH).div(a.n);
}

/** The parabolic limits of the elliptic family: p in (p_i, p_ii) (Bate, Mueller and White 1971, sec. 5.4). */
export function ellipticPRange(r1: V3, r2: V3, theta: Dec): [Dec, Dec] {
  const r1n = norm(r1);
  const r2n = norm(r2);
  const k = r1n.times(r2n).times(oneMinusCos(theta));
  const l = r1n.plus(r2n);
  const m = r1n.times(r2n).times(ONE.plus(cos(theta)));
  const s = m.times(2).sqrt();
  return [k.div(l.plus(s)), k.div(l.minus(s))];
}

/** Which multi-revolution branch a solution v1 lies on: 0 short-period, 1 long-period (see the file header). */
export function branchOf(mu: Dec, r1: V3, r2: V3, v1: V3, N: number): number {
  const h = cross(r1, v1);
  const nhat = scale(h, ONE.div(norm(h)));
  const theta = transferAngle(r1, r2, nhat);
  const p = dot(h, h).div(mu);
  const dp = p.times(new D(10).pow(-20));
  const tp = familyTime(mu, r1, r2, theta, N, p.plus(dp));
  const tm = familyTime(mu, r1, r2, theta, N, p.minus(dp));
  if (tp === undefined || tm === undefined) throw new Error("lambert reference: branch test left the elliptic family");
  const slope = tp.minus(tm);
  const shortWay = theta.lt(PI);
  return (shortWay ? slope.isNegative() : slope.isPositive()) ? 0 : 1;
}

/**
 * The minimum time of flight with N >= 1 complete revolutions between r1 and r2 (motion about nhat), by
 * golden-section search on the family time over p (unimodal there), to a relative width `rel` in p.
 * Returns [tmin, p at the minimum].
 */
export function minimumTime(mu: Dec, r1: V3, r2: V3, nhat: V3, N: number, rel = new D(10).pow(-24)): [Dec, Dec] {
  const theta = transferAngle(r1, r2, nhat);
  let [lo, hi] = ellipticPRange(r1, r2, theta);
  const w = ONE.minus(new D(5).sqrt()).div(2).neg(); // (sqrt 5 - 1) / 2
  const T = (p: Dec): Dec => familyTime(mu, r1, r2, theta, N, p) ?? new D(Infinity);
  let x1 = hi.minus(hi.minus(lo).times(w));
  let x2 = lo.plus(hi.minus(lo).times(w));
  let f1 = T(x1);
  let f2 = T(x2);
  for (let i = 0; i < 300; i++) {
    if (f1.lt(f2)) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi.minus(hi.minus(lo).times(w));
      f1 = T(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo.plus(hi.minus(lo).times(w));
      f2 = T(x2);
    }
    if (hi.minus(lo).lte(hi.times(rel))) break;
  }
  return f1.lt(f2) ? [f1, x1] : [f2, x2];
}

// The search for the family member (a starting guess only; shooting at 50 digits then refines it) runs in double
// precision: the same formulas as familyMember / familyTime, in ordinary arithmetic.
type N3 = readonly [number, number, number];

interface FamilyF {
  mu: number;
  r1: N3;
  r2: N3;
  r1n: number;
  r2n: number;
  st: number;
  /** 1 - cos theta, from 2 sin^2(theta / 2) at 50 digits (no cancellation at small transfer angles). */
  omc: number;
  N: number;
}

function anomalyF(mu: number, r: N3, rn: number, v: number[]): { A: number; es: number; n: number; elliptic: boolean } {
  const alpha = 2 / rn - (v[0]! * v[0]! + v[1]! * v[1]! + v[2]! * v[2]!) / mu;
  const sigma = (r[0] * v[0]! + r[1] * v[1]! + r[2] * v[2]!) / Math.sqrt(mu);
  const ec = 1 - rn * alpha;
  if (alpha > 0) {
    const es = sigma * Math.sqrt(alpha);
    return { A: Math.atan2(es, ec), es, n: Math.sqrt(mu * alpha ** 3), elliptic: true };
  }
  const es = sigma * Math.sqrt(-alpha);
  return { A: Math.atanh(es / ec), es, n: Math.sqrt(mu * (-alpha) ** 3), elliptic: false };
}

/** familyTime in double precision (NaN where undefined). */
function familyTimeF(F: FamilyF, p: number): number {
  const omc = F.omc;
  const f = 1 - (F.r2n * omc) / p;
  const g = (F.r1n * F.r2n * F.st) / Math.sqrt(F.mu * p);
  const gdot = 1 - (F.r1n * omc) / p;
  const v1 = [0, 1, 2].map((i) => (F.r2[i]! - f * F.r1[i]!) / g);
  const v2 = [0, 1, 2].map((i) => (gdot * F.r2[i]! - F.r1[i]!) / g);
  const a = anomalyF(F.mu, F.r1, F.r1n, v1);
  const b = anomalyF(F.mu, F.r2, F.r2n, v2);
  if (a.elliptic !== b.elliptic) return NaN;
  if (a.elliptic) {
    let dE = b.A - a.A;
    while (dE < 0) dE += 2 * Math.PI;
    while (dE >= 2 * Math.PI) dE -= 2 * Math.PI;
    dE += 2 * Math.PI * F.N;
    return (dE - (b.es - a.es)) / a.n;
  }
  const dH = b.A - a.A;
  if (F.N !== 0 || !(dH > 0)) return NaN;
  return (b.es - a.es - dH) / a.n;
}

/** Root p of T(p) = tof between lo and hi (T monotonic, defined at both ends): Illinois false position in ln p. */
function solveFamilyF(T: (p: number) => number, tof: number, lo: number, hi: number, increasing: boolean): number {
  const F = (lnp: number): number => {
    const v = Math.log(T(Math.exp(lnp)) / tof);
    if (Number.isNaN(v)) throw new Error("lambert reference: p iteration left the family");
    return increasing ? v : -v;
  };
  let a = Math.log(lo);
  let b = Math.log(hi);
  let fa = F(a);
  let fb = F(b);
  if (fa > 0 === fb > 0) throw new Error("lambert reference: p bracket does not hold the root");
  let side = 0;
  for (let i = 0; i < 400; i++) {
    let c = a - (fa * (b - a)) / (fb - fa);
    if (!(c > Math.min(a, b) && c < Math.max(a, b))) c = (a + b) / 2;
    const fc = F(c);
    if (Math.abs(fc) <= 4e-16 || Math.abs(b - a) <= 4e-16 * Math.abs(c)) return Math.exp(c);
    if (fc < 0 === fa < 0) {
      a = c;
      fa = fc;
      if (side === -1) fb /= 2;
      side = -1;
    } else {
      b = c;
      fb = fc;
      if (side === 1) fa /= 2;
      side = 1;
    }
  }
  throw new Error("lambert reference: p iteration did not converge");
}

/** Move p from `from` by `factor` steps until T is defined and on the far side of tof. */
function bracketEndF(T: (p: number) => number, tof: number, from: number, factor: number, wantAbove: boolean): number {
  let p = from;
  for (let i = 0; i < 3000; i++) {
    const t = T(p);
    if (t > 0 && (wantAbove ? t > tof : t < tof)) return p;
    p *= factor;
  }
  throw new Error("lambert reference: no bracket for the p iteration");
}

/** Golden-section minimum of T over (lo, hi), to a relative width `rel` in p. Returns [tmin, p]. */
function goldenF(T: (p: number) => number, lo: number, hi: number, rel: number): [number, number] {
  const w = (Math.sqrt(5) - 1) / 2;
  const val = (p: number): number => {
    const t = T(p);
    return Number.isNaN(t) ? Infinity : t;
  };
  let x1 = hi - (hi - lo) * w;
  let x2 = lo + (hi - lo) * w;
  let f1 = val(x1);
  let f2 = val(x2);
  for (let i = 0; i < 300 && hi - lo > hi * rel; i++) {
    if (f1 < f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - (hi - lo) * w;
      f1 = val(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + (hi - lo) * w;
      f2 = val(x2);
    }
  }
  return f1 < f2 ? [f1, x1] : [f2, x2];
}

/**
 * The direction of motion asked for: unit normal along r1 x r2, flipped so that its z component is positive for
 * prograde and negative for retrograde (when (r1 x r2)_z = 0, prograde is motion about r1 x r2).
 */
export function motionNormal(r1: V3, r2: V3, retrograde: number): V3 {
  const h = cross(r1, r2);
  let sgn = h[2].isNegative() && !h[2].isZero() ? -1 : 1;
  if (retrograde === 1) sgn = -sgn;
  return scale(h, new D(sgn).div(norm(h)));
}

/** Within this many radians of 180 degrees solveByP evaluates the family time in decimal, not in doubles. */
const NEAR_PI_DOUBLE = 1e-3;

/**
 * Lambert's problem by the p-iteration, as a starting guess (no guess needed): the semi-latus rectum p of the
 * solution for revs complete revolutions in the direction asked for, on the branch asked for when revs >= 1, in
 * double precision; the transfer angle at 50 digits. Undefined when no solution exists.
 */
export function solveByP(mu: number, r1: N3, r2: N3, tof: number, revs: number, retrograde: number, branch: number): { p: number; theta: Dec } | undefined {
  const R1 = vecExact(r1);
  const R2 = vecExact(r2);
  const nhat = motionNormal(R1, R2, retrograde);
  const theta = transferAngle(R1, R2, nhat);
  const fam: FamilyF = { mu, r1, r2, r1n: Math.hypot(...r1), r2n: Math.hypot(...r2), st: toDouble(sin(theta)), omc: toDouble(oneMinusCos(theta)), N: revs };
  // Within NEAR_PI_DOUBLE of 180 degrees the family members cancel in double precision (r2 - f r1 and g both
  // shrink with sin theta, and the elliptic p range with them): evaluate the family time in decimal there.
  const M = exact(D, mu);
  const nearPi = theta.minus(PI).abs().lt(NEAR_PI_DOUBLE);
  const T = nearPi
    ? (p: number): number => familyTime(M, R1, R2, theta, revs, exact(D, p))?.toNumber() ?? NaN
    : (p: number): number => familyTimeF(fam, p);
  const shortWay = theta.lt(PI);
  const [piD, piiD] = ellipticPRange(R1, R2, theta);
  const pi = piD.toNumber();
  const pii = piiD.toNumber();
  const near = 1 - 1e-12; // steps into the family from a parabolic end
  const far = 1 + 1e-12;
  let p: number;
  if (revs === 0) {
    // Short way: p in (p_i, inf), T decreasing; long way: p in (0, p_ii), T increasing (hyperbolas below p_i).
    if (shortWay) p = solveFamilyF(T, tof, bracketEndF(T, tof, pi * far, far, true), bracketEndF(T, tof, pi * 2, 2, false), false);
    else p = solveFamilyF(T, tof, bracketEndF(T, tof, pii / 2, 0.5, false), bracketEndF(T, tof, pii * near, near, true), true);
  } else {
    const [tmin, pm] = goldenF(T, pi, pii, 1e-9);
    if (tof < tmin) return undefined;
    // Short-period (Izzo's x below x_min): p below p_m on the short way, above it on the long way.
    const below = (branch === 0) === shortWay;
    if (below) p = solveFamilyF(T, tof, bracketEndF(T, tof, pi * far, far, true), pm, false);
    else p = solveFamilyF(T, tof, pm, bracketEndF(T, tof, pii * near, near, true), true);
  }
  return { p, theta };
}

/** Orbital elements to a state at high precision (angles in radians; a < 0 for a hyperbola, p = a (1 - e^2)). */
export function elementsToState(mu: Dec, p: Dec, e: Dec, inc: Dec, raan: Dec, argp: Dec, nu: Dec): { r: V3; v: V3 } {
  const [cO, sO, ci, si, cw, sw] = [cos(raan), sin(raan), cos(inc), sin(inc), cos(argp), sin(argp)];
  const P: V3 = [cO.times(cw).minus(sO.times(sw).times(ci)), sO.times(cw).plus(cO.times(sw).times(ci)), sw.times(si)];
  const Q: V3 = [cO.times(sw).neg().minus(sO.times(cw).times(ci)), sO.times(sw).neg().plus(cO.times(cw).times(ci)), cw.times(si)];
  const cn = cos(nu);
  const sn = sin(nu);
  const r = p.div(ONE.plus(e.times(cn)));
  const vs = mu.div(p).sqrt();
  return { r: add(scale(P, r.times(cn)), scale(Q, r.times(sn))), v: add(scale(P, vs.times(sn).neg()), scale(Q, vs.times(e.plus(cn)))) };
}

/**
 * Time from true anomaly nu1 to nu1 + dnu (dnu > 0; may include whole turns on an ellipse), by Kepler's equation;
 * with the change of eccentric (hyperbolic) anomaly.
 */
export function timeBetween(mu: Dec, p: Dec, e: Dec, nu1: Dec, dnu: Dec): { tof: Dec; dA: Dec } {
  const nu2 = nu1.plus(dnu);
  if (e.lt(1)) {
    const a = p.div(ONE.minus(e.times(e)));
    const rt = ONE.minus(e.times(e)).sqrt();
    const ecc = (nu: Dec): Dec => {
      const k = nu.div(TWO_PI).plus(new D(0.5)).floor(); // nu = wrapped + 2 pi k, wrapped in [-pi, pi)
      const w = nu.minus(TWO_PI.times(k));
      return atan2(rt.times(sin(w)), e.plus(cos(w))).plus(TWO_PI.times(k));
    };
    const E1 = ecc(nu1);
    const E2 = ecc(nu2);
    const M = (E: Dec): Dec => E.minus(e.times(sin(E)));
    return { tof: M(E2).minus(M(E1)).div(mu.div(a.pow(3)).sqrt()), dA: E2.minus(E1) };
  }
  const a = p.div(e.times(e).minus(1)); // |a|
  const t = e.minus(1).div(e.plus(1)).sqrt();
  const hyp = (nu: Dec): Dec => D.atanh(t.times(sin(nu.div(2)).div(cos(nu.div(2))))).times(2);
  const M = (H: Dec): Dec => e.times(D.sinh(H)).minus(H);
  const H1 = hyp(nu1);
  const H2 = hyp(nu2);
  return { tof: M(H2).minus(M(H1)).div(mu.div(a.pow(3)).sqrt()), dA: H2.minus(H1) };
}

export interface LambertReference {
  v1: [number, number, number];
  v2: [number, number, number];
  cond1: number;
  cond2: number;
}

/**
 * The reference solution for inputs given as doubles (taken exactly): the p-iteration, polished by shooting on
 * the Kepler propagator; v1, v2 rounded to doubles, and the conditioning figures. Undefined when there is no
 * solution for that revolution count.
 */
export function referenceLambert(mu: number, r1: readonly number[], r2: readonly number[], tof: number, revs: number, retrograde: number, branch: number): LambertReference | undefined {
  const M = exact(D, mu);
  const R1 = vecExact(r1);
  const R2 = vecExact(r2);
  const T = exact(D, tof);
  // The p-iteration in double precision gives the starting guess; shooting refines it at 50 digits.
  const fam = solveByP(mu, [r1[0]!, r1[1]!, r1[2]!], [r2[0]!, r2[1]!, r2[2]!], tof, revs, retrograde, branch);
  if (fam === undefined) return undefined;
  const sol = shoot(M, R1, R2, T, familyMember(M, R1, R2, fam.theta, exact(D, fam.p)).v1);
  const c = lambertCondition(M, R1, R2, T, sol);
  return { v1: vecDouble(sol.v1), v2: vecDouble(sol.v2), cond1: c.v1, cond2: c.v2 };
}
