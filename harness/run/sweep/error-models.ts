/**
 * Error estimates of the Kepler solvers for sweeps: the residual of the equation at the returned root with
 * error-free transformations, divided by the derivative and the spacing of doubles at the root (run/sweep.ts).
 */
import { ulpOf } from "../../core/float.js";
import { referenceElliptic, referenceHyperbolic, referenceParabolic } from "../../verify/reference/kepler.js";

// error estimates (error-free transformations: T. J. Dekker, "A floating-point technique for extending the
// available precision", Numer. Math. 18 (1971) 224-242; two-sum from D. E. Knuth, TAOCP vol. 2)

const SPLIT = 134217729; // 2^27 + 1
// The low parts of the last twoProd (LOW[0]), twoSum (LOW[1]) and oddRemainder (LOW[2]). A typed array, not
// module-level variables: V8 boxes every double stored in a module variable (a heap allocation per store, which
// made a 9,000,000-case sweep churn through 2 GB and kept two workers from running at full speed).
const LOW = new Float64Array(3);

function twoProd(a: number, b: number): number {
  const p = a * b;
  let t = SPLIT * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLIT * b;
  const bh = t - (t - b);
  const bl = b - bh;
  LOW[0] = al * bl - (((p - ah * bh) - al * bh) - ah * bl);
  return p;
}

function twoSum(a: number, b: number): number {
  const s = a + b;
  const bb = s - a;
  LOW[1] = (a - (s - bb)) + (b - bb);
  return s;
}


/** Spacing of doubles at x (core/float.ts ulpOf; the name the sweep's error models use). */
export const ulpAt = ulpOf;

// x - sin x and sinh x - x for |x| <= 1: x^3 (1/3! -+ x^2/5! + x^4/7! -+ ...); 12 terms reach 2^-60. The
// leading x^3/6 is formed as a double-double (near periapsis it is as large as M itself); the rest, at most
// 5% of it, in plain doubles.
const ODD_TERMS = 12;
const INV_FACT: number[] = [];
{
  let f = 6;
  for (let n = 3; n < 3 + 2 * ODD_TERMS; n += 2) {
    INV_FACT.push(1 / f);
    f *= (n + 1) * (n + 2);
  }
}

/** x - sin x (sinh x - x when hyperbolic) for |x| <= 1, as the pair (result, LOW[2]). */
function oddRemainder(x: number, hyperbolic: boolean): number {
  const x2 = x * x;
  let s = 0;
  for (let k = ODD_TERMS - 1; k >= 1; k--) s = INV_FACT[k]! + (hyperbolic ? x2 * s : -x2 * s);
  const tail = hyperbolic ? x2 * s : -x2 * s; // the series after its first term, over x^3
  const a = twoProd(x, x);
  const al = LOW[0]!;
  const c = twoProd(x, a);
  const cl = LOW[0]! + x * al; // x^3 = c + cl
  const c6 = c / 6;
  const p = twoProd(c6, 6);
  const rem = ((c - p) - LOW[0]! + cl) / 6; // x^3 / 6 = c6 + rem
  const hi = twoSum(c6, c * tail);
  LOW[2] = LOW[1]! + rem + cl * tail;
  return hi;
}

/**
 * The Kepler residual (q + ql) x + e rem(x) - M for |x| <= 1, nearly error-free: q + ql is 1 - e (ellipse) or
 * e - 1 (hyperbola) exactly, rem(x) is x - sin x or sinh x - x (oddRemainder), so no term cancels near x = 0.
 */
function smallResidual(q: number, ql: number, e: number, x: number, M: number, hyperbolic: boolean): number {
  const a = twoProd(q, x);
  const al = LOW[0]! + ql * x;
  const r = oddRemainder(x, hyperbolic);
  const b = twoProd(e, r);
  const bl = LOW[0]! + e * LOW[2]!;
  const s = twoSum(a, -M);
  const s1 = LOW[1]!;
  const t = twoSum(s, b);
  return t + (s1 + LOW[1]! + al + bl);
}

/** |E - E*| / ulp(E) for E - e sin E = M, to first order, from the residual. NaN when it cannot be evaluated. */
export function ellipticErrorUlps(e: number, M: number, E: number): number {
  if (E === M && (e === 0 || M === 0)) return 0;
  let f: number;
  if (Math.abs(E) <= 1) {
    const q = twoSum(1, -e); // 1 - e = q + LOW[1] exactly (LOW[1] = 0 for e >= 1/2, Sterbenz)
    f = smallResidual(q, LOW[1]!, e, E, M, false);
  } else {
    const b = twoProd(e, Math.sin(E));
    const bl = LOW[0]!;
    const d = twoSum(E, -M);
    const d1 = LOW[1]!;
    const t = twoSum(d, -b);
    f = t + (d1 + LOW[1]! - bl);
  }
  const h = Math.sin(E / 2);
  const fp = (1 - e) + 2 * e * h * h; // 1 - e cos E without cancellation
  return Math.abs(f) / fp / ulpAt(E);
}

/** |H - H*| / ulp(H) for e sinh H - H = M. */
export function hyperbolicErrorUlps(e: number, M: number, H: number): number {
  if (H === 0 && M === 0) return 0;
  let f: number;
  if (Math.abs(H) <= 1) {
    const q = twoSum(e, -1); // e - 1 = q + LOW[1] exactly (LOW[1] = 0 for e <= 2, Sterbenz)
    f = smallResidual(q, LOW[1]!, e, H, M, true);
  } else {
    const b = twoProd(e, Math.sinh(H));
    const bl = LOW[0]!;
    const t = twoSum(b, -H);
    const t1 = LOW[1]!;
    const u = twoSum(t, -M);
    f = u + (t1 + LOW[1]! + bl);
  }
  const h = Math.sinh(H / 2);
  const fp = (e - 1) + 2 * e * h * h; // e cosh H - 1
  return Math.abs(f) / fp / ulpAt(H);
}

/** |D - D*| / ulp(D) for Barker's equation D + D^3/3 = M. */
export function parabolicErrorUlps(M: number, D: number): number {
  if (D === 0 && M === 0) return 0;
  const a = twoProd(D, D);
  const al = LOW[0]!;
  const c = twoProd(D, a);
  const cl = LOW[0]! + D * al;
  const c3 = c / 3;
  const p = twoProd(c3, 3);
  const rem = ((c - p) - LOW[0]! + cl) / 3; // D^3/3 = c3 + rem
  const s = twoSum(D, -M);
  const s1 = LOW[1]!;
  const t = twoSum(s, c3);
  const f = t + (s1 + LOW[1]! + rem);
  return Math.abs(f) / (1 + D * D) / ulpAt(D);
}

export interface ErrorModel {
  readonly measure: string;
  /** The estimate for one case from its arguments and the first output. */
  estimate(args: readonly number[], got: number): number;
  /** The correctly rounded first output, from decimal.js. */
  reference(args: readonly number[]): number;
}

export const ERROR_MODELS: Readonly<Record<string, ErrorModel>> = {
  "kepler-elliptic": {
    measure: "|f/f'|/ulp(E) with f = (1-e)E + e(E - sin E) - M evaluated error-free",
    estimate: (a, E) => ellipticErrorUlps(a[0]!, a[1]!, E),
    reference: (a) => referenceElliptic(a[0]!, a[1]!),
  },
  "kepler-hyperbolic": {
    measure: "|f/f'|/ulp(H) with f = (e-1)H + e(sinh H - H) - M evaluated error-free",
    estimate: (a, H) => hyperbolicErrorUlps(a[0]!, a[1]!, H),
    reference: (a) => referenceHyperbolic(a[0]!, a[1]!),
  },
  "kepler-parabolic": {
    measure: "|f/f'|/ulp(D) with f = D + D^3/3 - M evaluated error-free",
    estimate: (a, D) => parabolicErrorUlps(a[0]!, D),
    reference: (a) => referenceParabolic(a[0]!),
  },
};

