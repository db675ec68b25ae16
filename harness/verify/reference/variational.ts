/**
 * High-precision reference for the transition matrix that the fixed-step integrators carry (assembly/variational.ts):
 * the Jacobian of the DISCRETE map (steps of rk4, verlet, yoshida4 or butcher6 from step 0 to step n), by central
 * differences of that map run in decimal.js at many digits. It shares nothing with the kernel's variational
 * equations or its analytic gravity gradient:
 *  - the field is the potential of an axisymmetric body, V = -mu/r [1 - sum_n J_n (R/r)^n P_n(z/r)] (for example
 *    D. A. Vallado, "Fundamentals of Astrodynamics and Applications", ch. 8; recalled from memory), P_n by
 *    Bonnet's recurrence, and the acceleration is its numerical gradient (central differences), as in
 *    tests/integrate-gravity.test.ts: the kernel's closed-form acceleration and gradient are not used;
 *  - the Runge-Kutta methods are applied in their classical form to y = (r, v), y' = (v, a(r)), with the full
 *    tableau (the kernel uses the Nystrom form): rk4 (Kutta 1901), butcher6 (Butcher 1964, the tableau quoted in
 *    assembly/integrators.ts, recalled from memory there); verlet is kick-drift-kick (Verlet 1967); yoshida4
 *    composes three of them with w1 = 1 / (2 - 2^(1/3)), w0 = 1 - 2 w1 (Yoshida 1990) computed here at full
 *    precision (the kernel's w1 is a double one ulp from it: a relative change of 1e-16 in Phi, far below the
 *    tolerances);
 *  - Phi column j = (map(y0 + d e_j) - map(y0 - d e_j)) / (2 d), d = 10^-OUTER_EXP of L = |r0| (positions) or
 *    V = sqrt(mu / L) (velocities).
 * Error budget (common practice: the error terms of central differences): at WORK_DIGITS = 100, the gradient's
 * offset 10^-INNER_EXP relative gives a truncation of about 10^-90 and a rounding of 10^-(100 - 45) = 1e-55 in
 * the acceleration; the outer difference then has truncation about 1e-44 times the third derivative of the map
 * and rounding about 1e-55 / 1e-22 = 1e-33: some 17 digits beyond a double's.
 */
import { decimalAt, exact, toDouble, type Dec } from "./decimal.js";

type D = ReturnType<typeof decimalAt>;

export const WORK_DIGITS = 100;
/** Offset of the numerical gradient of the potential, relative to r. */
export const INNER_EXP = 45;
/** Offset of the outer central difference, relative to L or V. */
export const OUTER_EXP = 22;

export type MapMethod = "rk4" | "verlet" | "yoshida4" | "butcher6";

export interface ZonalField {
  readonly mu: number;
  readonly j2: number;
  readonly j3: number;
  readonly radius: number;
}

interface Field {
  P: D;
  mu: Dec;
  R: Dec;
  J: Dec[];
}

function potential(f: Field, x: Dec, y: Dec, z: Dec): Dec {
  const { P, mu, R, J } = f;
  const r = x.times(x).plus(y.times(y)).plus(z.times(z)).sqrt();
  const s = z.div(r);
  const q = R.div(r);
  let pPrev = new P(1);
  let p = s;
  let qn = q;
  let sum = new P(0);
  for (let n = 2; n < J.length; n++) {
    const next = new P(2 * n - 1).times(s).times(p).minus(new P(n - 1).times(pPrev)).div(n); // Bonnet
    pPrev = p;
    p = next;
    qn = qn.times(q);
    sum = sum.plus(J[n]!.times(qn).times(p));
  }
  return mu.div(r).neg().times(new P(1).minus(sum));
}

/** a = -grad V by central differences (offset 10^-INNER_EXP r). */
function accel(f: Field, r: Dec[]): Dec[] {
  const size = r[0]!.abs().plus(r[1]!.abs()).plus(r[2]!.abs());
  const d = size.times(new f.P(10).pow(-INNER_EXP));
  return [0, 1, 2].map((i) => {
    const at = (sgn: number): Dec => {
      const p = r.map((c, j) => (j === i ? c.plus(d.times(sgn)) : c));
      return potential(f, p[0]!, p[1]!, p[2]!);
    };
    return at(-1).minus(at(1)).div(d.times(2));
  });
}

/** The classical tableaux (A strictly lower, b) of the two Runge-Kutta methods, as fractions. */
const TABLEAUX: Record<"rk4" | "butcher6", { a: number[][][]; b: number[][] }> = {
  rk4: {
    a: [[], [[1, 2]], [[0, 1], [1, 2]], [[0, 1], [0, 1], [1, 1]]],
    b: [[1, 6], [1, 3], [1, 3], [1, 6]],
  },
  butcher6: {
    a: [[], [[1, 3]], [[0, 1], [2, 3]], [[1, 12], [1, 3], [-1, 12]], [[-1, 16], [9, 8], [-3, 16], [-3, 8]],
      [[0, 1], [9, 8], [-3, 8], [-3, 4], [1, 2]], [[9, 44], [-9, 11], [63, 44], [18, 11], [0, 1], [-16, 11]]],
    b: [[11, 120], [0, 1], [27, 40], [27, 40], [-4, 15], [-4, 15], [11, 120]],
  },
};

function rkStep(f: Field, tab: { a: number[][][]; b: number[][] }, y: Dec[], h: Dec): Dec[] {
  const P = f.P;
  const frac = (q: number[]): Dec => new P(q[0]!).div(q[1]!);
  const ks: Dec[][] = [];
  for (let i = 0; i < tab.b.length; i++) {
    const yi = y.map((c, m) => tab.a[i]!.reduce((s, q, j) => s.plus(h.times(frac(q)).times(ks[j]![m]!)), c));
    const a = accel(f, yi.slice(0, 3));
    ks.push([yi[3]!, yi[4]!, yi[5]!, ...a]);
  }
  return y.map((c, m) => tab.b.reduce((s, q, i) => s.plus(h.times(frac(q)).times(ks[i]![m]!)), c));
}

function kdk(f: Field, y: Dec[], h: Dec): Dec[] {
  const half = h.div(2);
  const a0 = accel(f, y.slice(0, 3));
  const v1 = [0, 1, 2].map((i) => y[3 + i]!.plus(half.times(a0[i]!)));
  const r1 = [0, 1, 2].map((i) => y[i]!.plus(h.times(v1[i]!)));
  const a1 = accel(f, r1);
  return [...r1, ...[0, 1, 2].map((i) => v1[i]!.plus(half.times(a1[i]!)))];
}

/** The discrete map of `steps` steps of size h. */
function map(f: Field, method: MapMethod, y0: Dec[], h: Dec, steps: number): Dec[] {
  let y = y0;
  const w1 = new f.P(1).div(new f.P(2).minus(new f.P(2).cbrt()));
  const w0 = new f.P(1).minus(w1.times(2));
  for (let n = 0; n < steps; n++) {
    if (method === "verlet") y = kdk(f, y, h);
    else if (method === "yoshida4") y = kdk(f, kdk(f, kdk(f, y, h.times(w1)), h.times(w0)), h.times(w1));
    else y = rkStep(f, TABLEAUX[method], y, h);
  }
  return y;
}

export interface MapJacobian {
  /** The state after `steps` steps (rounded to doubles). */
  state: number[];
  /** d(state) / d(state0), row-major, rounded to doubles. */
  phi: number[];
}

/** State and Jacobian of the discrete map of `steps` steps of size `step` of `method` from the state y0 (doubles). */
export function discreteMapJacobian(method: MapMethod, field: ZonalField, y0: readonly number[], step: number, steps: number): MapJacobian {
  const P = decimalAt(WORK_DIGITS);
  const f: Field = { P, mu: exact(P, field.mu), R: exact(P, field.radius), J: [new P(0), new P(0), exact(P, field.j2), exact(P, field.j3)] };
  const y = y0.map((c) => exact(P, c));
  const h = exact(P, step);
  const L = y[0]!.times(y[0]!).plus(y[1]!.times(y[1]!)).plus(y[2]!.times(y[2]!)).sqrt();
  const V = f.mu.div(L).sqrt();
  const tiny = new P(10).pow(-OUTER_EXP);
  const phi: number[] = new Array<number>(36).fill(0);
  for (let j = 0; j < 6; j++) {
    const d = tiny.times(j < 3 ? L : V);
    const at = (sgn: number): Dec[] => map(f, method, y.map((c, m) => (m === j ? c.plus(d.times(sgn)) : c)), h, steps);
    const plus = at(1);
    const minus = at(-1);
    for (let i = 0; i < 6; i++) phi[6 * i + j] = toDouble(plus[i]!.minus(minus[i]!).div(d.times(2)));
  }
  return { state: map(f, method, y, h, steps).map(toDouble), phi };
}
