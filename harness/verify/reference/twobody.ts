/**
 * High-precision references for the two-body kernels, independent of them: decimal.js, the input doubles
 * taken exactly, results rounded to nearest.
 *
 * Propagation uses a different method from the kernel (which iterates on the universal anomaly chi): the
 * classical route of any textbook (e.g. Bate, Mueller and White 1971, ch. 2 and 4): state -> angular momentum,
 * eccentricity vector, perifocal frame (P, Q) -> eccentric or hyperbolic anomaly from the perifocal coordinates
 * (x = a (cos E - e), y = b sin E; x = |a| (e - cosh H), y = b sinh H; Barker's D = tan(nu/2) for a parabola)
 * -> mean anomaly -> mean anomaly at t -> Kepler's equation solved by bracketed Newton (series forms of
 * E - sin E and sinh H - H near periapsis, so no digits are lost near e = 1) -> perifocal state -> rotated.
 * The working precision grows with the closeness to a parabola (|alpha r0| or |alpha p| = |1 - e^2| small).
 *
 * The conditioning figure of a case is the largest relative change of the result when one input double moves
 * by one ulp (to the next double up), computed at the same precision; angles are compared modulo 2 pi.
 */
import { Dec, decimalAt, exact, toDouble, oddRemainder, bracketedNewton } from "./decimal.js";
import { fromBits, toBits } from "../../core/float.js";
import { sub, scale, dot, cross, norm, add, type V3 } from "./vec3.js";

type D = typeof Dec;

/** Conventions shared with the kernels' documented thresholds (a convention, not the method): 2^-36. */
export const CIRCULAR_E = 2 ** -36;
export const EQUATORIAL_SIN_I = 2 ** -36;

const BASE_DIGITS = 50;

/** pi at a clone's precision, cached (decimal.js computes acos(-1) from scratch each call). */
const PI_CACHE = new Map<number, Dec>();
function piOf(P: D): Dec {
  let v = PI_CACHE.get(P.precision);
  if (v === undefined) {
    v = P.acos(-1);
    PI_CACHE.set(P.precision, v);
  }
  return v;
}
const MAX_NEWTON = 300;

/** The next double above x (one ulp up; 0 goes to the smallest subnormal). */
export function ulpUp(x: number): number {
  if (x === 0) return 5e-324;
  return fromBits(toBits(x) + (x > 0 ? 1n : -1n));
}



/** The shared bracketed Newton (decimal.ts) with this generator's guard digits and step cap. */
function newton(P: D, f: (x: Dec) => Dec, df: (x: Dec) => Dec, lo: Dec, hi: Dec, x0: Dec): Dec {
  return bracketedNewton(P, f, df, lo, hi, x0, 6, MAX_NEWTON);
}

/**
 * Precision of the conditioning figures: a one-ulp change moves a result by about 1e-16 relative, and a few
 * digits of that change are all the figure needs, so 34 digits (plus those lost near e = 1) suffice.
 */
const COND_DIGITS = 34;

/** Precision for a state: more digits as |alpha r0| -> 0 (near-parabolic). */
export function digitsFor(mu: number, r: readonly number[], v: readonly number[], base = BASE_DIGITS): number {
  const P = decimalAt(40);
  const rv: V3 = [exact(P, r[0]!), exact(P, r[1]!), exact(P, r[2]!)];
  const vv: V3 = [exact(P, v[0]!), exact(P, v[1]!), exact(P, v[2]!)];
  const rn = norm(rv);
  const m = exact(P, mu);
  const alpha = new P(2).div(rn).minus(dot(vv, vv).div(m));
  const h = cross(rv, vv);
  const ar = alpha.times(rn).abs();
  const ap = alpha.times(dot(h, h)).div(m).abs(); // |1 - e^2|
  if (ar.isZero() || ap.isZero()) return base + 40;
  const lostIn = (x: Dec): number => Math.max(0, -Math.floor(Math.log10(Number(x.toExponential(3)))));
  return base + Math.min(Math.max(lostIn(ar), lostIn(ap)), 60);
}

interface Frame {
  mu: Dec;
  p: Dec;
  e: Dec;
  alpha: Dec;
  P: V3;
  Q: V3;
  W: V3;
  h: V3;
  hmag: Dec;
  evec: V3;
  nu: Dec;
}

/** Orbit frame and true anomaly of a state (shared by propagation, elements, equinoctial). */
function frameOf(P: D, mu: Dec, r: V3, v: V3, withNu = true): Frame {
  const rn = norm(r);
  const v2 = dot(v, v);
  const h = cross(r, v);
  const hmag = norm(h);
  const p = hmag.times(hmag).div(mu);
  const alpha = new P(2).div(rn).minus(v2.div(mu));
  const evec = scale(sub(scale(r, v2.minus(mu.div(rn))), scale(v, dot(r, v))), new P(1).div(mu));
  const e = norm(evec);
  const W = scale(h, new P(1).div(hmag));
  const Pv = e.isZero() ? scale(r, new P(1).div(rn)) : scale(evec, new P(1).div(e));
  const Qv = cross(W, Pv);
  const nu = withNu ? P.atan2(dot(r, Qv), dot(r, Pv)) : new P(0);
  return { mu, p, e, alpha, P: Pv, Q: Qv, W, h, hmag, evec, nu };
}

export interface PropagationResult {
  r: V3;
  v: V3;
  /** Revolutions |dt| / T for the ellipse, 0 otherwise. */
  revs: number;
  /** The anomaly found (E, H or D), reused as a starter by the perturbed solves. */
  anomaly: Dec;
}

/** Kepler propagation of (r0, v0) by dt at the precision of P (also the transition-matrix reference's). */
export function propagateDec(P: D, inputs: readonly Dec[], guess?: Dec): PropagationResult {
  const [mu, rx, ry, rz, vx, vy, vz, dt] = inputs as [Dec, Dec, Dec, Dec, Dec, Dec, Dec, Dec];
  const r0: V3 = [rx, ry, rz];
  const fr = frameOf(P, mu, r0, [vx, vy, vz], false);
  const one = new P(1);
  const e = fr.e;
  const pi = piOf(P);
  // Perifocal coordinates of r0 (P towards periapsis, Q 90 degrees ahead).
  const x0 = dot(r0, fr.P);
  const y0 = dot(r0, fr.Q);
  const onFrame = (x: Dec, y: Dec, vxp: Dec, vyp: Dec): { r: V3; v: V3 } => ({
    r: add(scale(fr.P, x), scale(fr.Q, y)),
    v: add(scale(fr.P, vxp), scale(fr.Q, vyp)),
  });
  if (fr.alpha.isPositive() && !fr.alpha.isZero()) {
    // Ellipse: x = a (cos E - e), y = b sin E; E0 from r0, M = M0 + n dt reduced to (-pi, pi], E by Newton.
    const a = one.div(fr.alpha);
    const b = a.times(fr.p).sqrt();
    const ome = one.minus(e);
    const E0 = P.atan2(y0.div(b), x0.div(a).plus(e));
    const kepler = (x: Dec): Dec => (x.abs().lte(1) ? ome.times(x).plus(e.times(oddRemainder(P, x, false))) : x.minus(e.times(P.sin(x))));
    const n = fr.mu.times(fr.alpha.pow(3)).sqrt();
    const twoPi = pi.times(2);
    const M = kepler(E0).plus(n.times(dt));
    const k = M.div(twoPi).toDecimalPlaces(0, Dec.ROUND_HALF_EVEN);
    const m = M.minus(k.times(twoPi));
    const lo = pi.neg().minus(1);
    const hi = pi.plus(1);
    const x00 = guess ?? m.plus(e.times(P.sin(m)).times(0.85).div(one.plus(e.times(0.15))));
    const E = newton(P, (x) => kepler(x).minus(m), (x) => one.minus(e.times(P.cos(x))), lo, hi, x00.gt(lo) && x00.lt(hi) ? x00 : m);
    const cE = P.cos(E);
    const sE = P.sin(E);
    const rr = a.times(one.minus(e.times(cE)));
    const st = onFrame(a.times(cE.minus(e)), b.times(sE), fr.mu.times(a).sqrt().times(sE).div(rr).neg(), fr.mu.times(fr.p).sqrt().times(cE).div(rr));
    return { ...st, revs: Number(n.times(dt).abs().div(twoPi).toExponential(20)), anomaly: E };
  }
  if (fr.alpha.isZero()) {
    // Parabola: Barker's equation D + D^3/3 = M, D = tan(nu/2).
    const D0 = P.tan(P.atan2(y0, x0).div(2));
    const M = D0.plus(D0.pow(3).div(3)).plus(fr.mu.div(fr.p.pow(3)).sqrt().times(2).times(dt));
    const bnd = M.abs().plus(1);
    const Dx = newton(P, (x) => x.plus(x.pow(3).div(3)).minus(M), (x) => one.plus(x.times(x)), bnd.neg(), bnd, guess ?? M.div(one.plus(M.abs().cbrt())));
    const nu = P.atan(Dx).times(2);
    const c = P.cos(nu);
    const s = P.sin(nu);
    const rr = fr.p.div(one.plus(c));
    const k = fr.mu.div(fr.p).sqrt();
    return { ...onFrame(rr.times(c), rr.times(s), k.times(s).neg(), k.times(one.plus(c))), revs: 0, anomaly: Dx };
  }
  // Hyperbola: x = |a| (e - cosh H), y = b sinh H, M = e sinh H - H.
  const aa = one.div(fr.alpha).neg();
  const b = aa.times(fr.p).sqrt();
  const em1 = e.minus(one);
  const H0 = P.asinh(y0.div(b));
  const Mh = (x: Dec): Dec => (x.abs().lte(1) ? em1.times(x).plus(e.times(oddRemainder(P, x, true))) : e.times(P.sinh(x)).minus(x));
  const n = fr.mu.times(fr.alpha.neg().pow(3)).sqrt();
  const M = Mh(H0).plus(n.times(dt));
  // Bracket: |H| <= asinh(|M| / (e - 1)) (e sinh H - H >= (e - 1) sinh H); a log bound is tighter for large M.
  let bound = P.asinh(M.abs().div(em1)).plus(1);
  const lnb = P.ln(M.abs().times(2).div(e).plus(1)).plus(2);
  if (lnb.lt(bound)) bound = lnb;
  for (let i = 0; i < 64 && Mh(bound).lt(M.abs()); i++) bound = bound.times(2);
  const g0 = guess ?? (M.abs().lt(1) ? M.div(e) : P.asinh(M.div(e)));
  const H = newton(P, (x) => Mh(x).minus(M), (x) => e.times(P.cosh(x)).minus(one), bound.neg(), bound, g0.gt(bound.neg()) && g0.lt(bound) ? g0 : new P(0));
  const ch = P.cosh(H);
  const sh = P.sinh(H);
  const rr = aa.times(e.times(ch).minus(one));
  const st = onFrame(aa.times(e.minus(ch)), b.times(sh), fr.mu.times(aa).sqrt().times(sh).div(rr).neg(), fr.mu.times(fr.p).sqrt().times(ch).div(rr));
  return { ...st, revs: 0, anomaly: H };
}

const relChange = (a: V3, b: V3): Dec => norm(sub(a, b)).div(norm(b));

/**
 * The conditioning figures of a reference: evaluated at precision C from the exact inputs and again with each
 * input moved one ulp up in turn, the largest change of each output (`changes` of a perturbed result against
 * the unperturbed one). `evaluate` gets the unperturbed result (`low`) when it evaluates a perturbed case.
 */
function conditioning<T>(C: D, x: readonly number[], evaluate: (ins: Dec[], low?: T) => T, changes: (q: T, low: T) => Dec[]): Dec[] {
  const ins = x.map((v) => exact(C, v));
  const low = evaluate(ins);
  let cond: Dec[] = [];
  for (let j = 0; j < x.length; j++) {
    const pert = ins.slice();
    pert[j] = exact(C, ulpUp(x[j]!));
    const d = changes(evaluate(pert, low), low);
    cond = j === 0 ? d : cond.map((c, m) => Dec.max(c, d[m]!));
  }
  return cond;
}


/**
 * Reference for one propagation case (mu, r0x, r0y, r0z, v0x, v0y, v0z, dt):
 * [rx, ry, rz, vx, vy, vz, cond_r, cond_v, revs].
 */
export function referencePropagate(x: readonly number[]): number[] {
  const P = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7)));
  const base = propagateDec(P, x.map((v) => exact(P, v)));
  const C = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7), COND_DIGITS));
  const cond = conditioning(C, x, (ins, low?: ReturnType<typeof propagateDec>) => propagateDec(C, ins, low ? low.anomaly : new C(base.anomaly)), (q, low) => [relChange(q.r, low.r), relChange(q.v, low.v)]);
  return [...base.r.map(toDouble), ...base.v.map(toDouble), ...cond.map(toDouble), base.revs];
}

// ---- elements ----------------------------------------------------------------------------------------

/** atan2 result mapped to [0, 2 pi). */
function wrap(P: D, x: Dec): Dec {
  return x.isNegative() ? x.plus(piOf(P).times(2)) : x;
}

/** Angle of x from direction d in the plane with normal h, in the direction of motion. */
function planeAngle(P: D, h: V3, d: V3, x: V3): Dec {
  return P.atan2(dot(h, cross(d, x)), norm(h).times(dot(d, x)));
}

interface ElementsDec {
  a: Dec;
  e: Dec;
  i: Dec;
  raan: Dec;
  argp: Dec;
  nu: Dec;
  p: Dec;
  status: number;
}

function elementsDec(P: D, ins: readonly Dec[]): ElementsDec {
  const [mu, rx, ry, rz, vx, vy, vz] = ins as [Dec, Dec, Dec, Dec, Dec, Dec, Dec];
  const r: V3 = [rx, ry, rz];
  const fr = frameOf(P, mu, r, [vx, vy, vz]);
  const zero = new P(0);
  const [hx, hy, hz] = fr.h;
  const hxy = hx.times(hx).plus(hy.times(hy)).sqrt();
  const i = P.atan2(hxy, hz);
  const circular = fr.e.lte(CIRCULAR_E);
  const equatorial = hxy.lte(fr.hmag.times(EQUATORIAL_SIN_I));
  const n: V3 = equatorial ? [new P(1), zero, zero] : [hy.neg(), hx, zero];
  const raan = equatorial ? zero : wrap(P, P.atan2(n[1], n[0]));
  const argp = circular ? zero : wrap(P, planeAngle(P, fr.h, n, fr.evec));
  const nu = circular ? wrap(P, planeAngle(P, fr.h, n, r)) : wrap(P, planeAngle(P, fr.h, fr.evec, r));
  const a = fr.alpha.isZero() ? zero : new P(1).div(fr.alpha);
  const status = circular ? (equatorial ? 3 : 1) : equatorial ? 2 : 0;
  return { a, e: fr.e, i, raan, argp, nu, p: fr.p, status };
}

const ELEMENT_KEYS = ["a", "e", "i", "raan", "argp", "nu", "p"] as const;
const ANGLE_KEYS = new Set(["i", "raan", "argp", "nu"]);

/** Distance of two angles modulo 2 pi. */
function angleDiff(P: D, a: Dec, b: Dec): Dec {
  const twoPi = piOf(P).times(2);
  let d = a.minus(b).abs();
  d = d.minus(twoPi.times(d.div(twoPi).floor()));
  return Dec.min(d, twoPi.minus(d));
}

/**
 * Reference elements of a state (mu, rx, ry, rz, vx, vy, vz) with the kernels' conventions:
 * [a, e, i, raan, argp, nu, p, status, cond_a, cond_e, cond_i, cond_raan, cond_argp, cond_nu, cond_p]
 * (cond of a, e, p relative; of the angles absolute, radians).
 */
export function referenceElements(x: readonly number[]): number[] {
  const P = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7)));
  const base = elementsDec(P, x.map((v) => exact(P, v)));
  const C = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7), COND_DIGITS));
  const cond = conditioning(C, x, (ins) => elementsDec(C, ins), (q, low) =>
    ELEMENT_KEYS.map((k) => (ANGLE_KEYS.has(k) ? angleDiff(C, q[k], low[k]) : low[k].isZero() ? q[k].abs() : q[k].minus(low[k]).abs().div(low[k].abs()))),
  );
  return [...ELEMENT_KEYS.map((k) => toDouble(base[k])), base.status, ...cond.map(toDouble)];
}

// ---- elements -> state ---------------------------------------------------------------------------------

function rotatedState(P: D, mu: Dec, p: Dec, e: Dec, i: Dec, raan: Dec, argp: Dec, nu: Dec): { r: V3; v: V3 } {
  const N: V3 = [P.cos(raan), P.sin(raan), new P(0)];
  const Mv: V3 = [P.cos(i).times(P.sin(raan)).neg(), P.cos(i).times(P.cos(raan)), P.sin(i)];
  const Pv = add(scale(N, P.cos(argp)), scale(Mv, P.sin(argp)));
  const Qv = add(scale(N, P.sin(argp).neg()), scale(Mv, P.cos(argp)));
  const c = P.cos(nu);
  const s = P.sin(nu);
  const rad = p.div(new P(1).plus(e.times(c)));
  const k = mu.div(p).sqrt();
  return { r: add(scale(Pv, rad.times(c)), scale(Qv, rad.times(s))), v: add(scale(Pv, k.times(s).neg()), scale(Qv, k.times(e.plus(c)))) };
}

function stateRefGeneric(x: readonly number[], build: (P: D, ins: Dec[]) => { r: V3; v: V3 }): number[] {
  const P = decimalAt(BASE_DIGITS);
  const base = build(P, x.map((v) => exact(P, v)));
  const C = decimalAt(COND_DIGITS + 6);
  const cond = conditioning(C, x, (ins) => build(C, ins), (q, low) => [relChange(q.r, low.r), relChange(q.v, low.v)]);
  return [...base.r.map(toDouble), ...base.v.map(toDouble), ...cond.map(toDouble)];
}

/** Reference state of (mu, a, e, i, raan, argp, nu): [rx, ry, rz, vx, vy, vz, cond_r, cond_v]. */
export function referenceState(x: readonly number[]): number[] {
  return stateRefGeneric(x, (P, [mu, a, e, i, raan, argp, nu]) => {
    const p = a!.times(new P(1).minus(e!.times(e!)));
    return rotatedState(P, mu!, p, e!, i!, raan!, argp!, nu!);
  });
}

/** Reference state of (mu, p, e, i, raan, argp, nu) (the parabola included): [r, v, cond_r, cond_v]. */
export function referenceStateP(x: readonly number[]): number[] {
  return stateRefGeneric(x, (P, [mu, p, e, i, raan, argp, nu]) => rotatedState(P, mu!, p!, e!, i!, raan!, argp!, nu!));
}

// ---- modified equinoctial elements ----------------------------------------------------------------------

interface EquinoctialDec {
  p: Dec;
  f: Dec;
  g: Dec;
  h: Dec;
  k: Dec;
  L: Dec;
}

/**
 * Through the classical angles (a different route from the kernel's frame vectors):
 * f + i g = e exp(i (w + O)), h + i k = tan(i/2) exp(i O), L = O + w + nu, with w + O and L measured as
 * longitudes (well defined for e = 0 or i = 0 because only sums of angles enter).
 */
function equinoctialDec(P: D, ins: readonly Dec[]): EquinoctialDec {
  const [mu, rx, ry, rz, vx, vy, vz] = ins as [Dec, Dec, Dec, Dec, Dec, Dec, Dec];
  const r: V3 = [rx, ry, rz];
  const fr = frameOf(P, mu, r, [vx, vy, vz]);
  const [hx, hy, hz] = fr.h;
  const zero = new P(0);
  const hxy = hx.times(hx).plus(hy.times(hy)).sqrt();
  const i = P.atan2(hxy, hz);
  const raan = hxy.isZero() ? zero : P.atan2(hx, hy.neg());
  const n: V3 = hxy.isZero() ? [new P(1), zero, zero] : [hy.neg(), hx, zero];
  const t = P.tan(i.div(2));
  // Longitude of periapsis w + O and true longitude L = O + angle of r from the node.
  const lonPeri = raan.plus(fr.e.isZero() ? zero : planeAngle(P, fr.h, n, fr.evec));
  const L = wrap(P, P.atan2(P.sin(raan.plus(planeAngle(P, fr.h, n, r))), P.cos(raan.plus(planeAngle(P, fr.h, n, r)))));
  return {
    p: fr.p,
    f: fr.e.times(P.cos(lonPeri)),
    g: fr.e.times(P.sin(lonPeri)),
    h: t.times(P.cos(raan)),
    k: t.times(P.sin(raan)),
    L,
  };
}

const EQ_KEYS = ["p", "f", "g", "h", "k", "L"] as const;

/**
 * Reference modified equinoctial elements of a state: [p, f, g, h, k, L, cond_p, cond_f, cond_g, cond_h,
 * cond_k, cond_L] (cond_p relative, the others absolute).
 */
export function referenceEquinoctial(x: readonly number[]): number[] {
  const P = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7)));
  const base = equinoctialDec(P, x.map((v) => exact(P, v)));
  const C = decimalAt(digitsFor(x[0]!, x.slice(1, 4), x.slice(4, 7), COND_DIGITS));
  const cond = conditioning(C, x, (ins) => equinoctialDec(C, ins), (q, low) =>
    EQ_KEYS.map((k) => (k === "L" ? angleDiff(C, q.L, low.L) : k === "p" ? q.p.minus(low.p).abs().div(low.p) : q[k].minus(low[k]).abs())),
  );
  return [...EQ_KEYS.map((k) => toDouble(base[k])), ...cond.map(toDouble)];
}

/**
 * Reference state of modified equinoctial elements (mu, p, f, g, h, k, L), through the classical elements:
 * e = |f + i g|, O = arg(h + i k), i = 2 atan |h + i k|, w = arg(f + i g) - O, nu = L - arg(f + i g).
 */
export function referenceFromEquinoctial(x: readonly number[]): number[] {
  return stateRefGeneric(x, (P, [mu, p, f, g, h, k, L]) => {
    const e = f!.times(f!).plus(g!.times(g!)).sqrt();
    const tn = h!.times(h!).plus(k!.times(k!)).sqrt();
    const raan = tn.isZero() ? new P(0) : P.atan2(k!, h!);
    const lonPeri = e.isZero() ? new P(0) : P.atan2(g!, f!);
    return rotatedState(P, mu!, p!, e, P.atan(tn).times(2), raan, lonPeri.minus(raan), L!.minus(lonPeri));
  });
}

// ---- invariants ------------------------------------------------------------------------------------------

/**
 * Reference invariants of a state: [energy, hx, hy, hz, |h|, ex, ey, ez, |e|, areal velocity, flight-path angle].
 */
export function referenceInvariants(x: readonly number[]): number[] {
  const P = decimalAt(BASE_DIGITS);
  const [mu, rx, ry, rz, vx, vy, vz] = x.map((v) => exact(P, v)) as [Dec, Dec, Dec, Dec, Dec, Dec, Dec];
  const r: V3 = [rx, ry, rz];
  const v: V3 = [vx, vy, vz];
  const fr = frameOf(P, mu, r, v);
  const energy = dot(v, v).div(2).minus(mu.div(norm(r)));
  const fpa = P.atan2(dot(r, v), fr.hmag);
  return [energy, ...fr.h, fr.hmag, ...fr.evec, fr.e, fr.hmag.div(2), fpa].map(toDouble);
}
