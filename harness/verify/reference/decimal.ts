/**
 * decimal.js set-up shared by the reference generators: a private Decimal constructor (so no global
 * configuration leaks between generators), exact conversion from doubles, and round-to-nearest back.
 */
import { Decimal as DecimalJs } from "decimal.js";
import { toBits, ulpOf } from "../../core/float.js";

/** Working precision of the references, in significant decimal digits. */
export const REFERENCE_DIGITS = 60;

export const Dec = DecimalJs.clone({ precision: REFERENCE_DIGITS, rounding: DecimalJs.ROUND_HALF_EVEN, toExpNeg: -9e15, toExpPos: 9e15, minE: -9e15, maxE: 9e15 });
export type Dec = InstanceType<typeof Dec>;

/** A clone of Dec at another precision (digits). */
export function decimalAt(digits: number): typeof Dec {
  return Dec.clone({ precision: digits });
}

/**
 * The value of a double, exact up to the clone's precision: integer significand times a power of two. The one
 * conversion from a double to a decimal in the project (the vectors, the references and the fuzz properties use
 * it). Never `new Decimal(x)` (the shortest round-trip string, not the value) and never a hex-float string
 * (decimal.js 10.6.0 parses binary exponents through Math.pow(2, p) taken as its shortest decimal string, which
 * is not exact for p below about -23: 0x1.086bced637035p-24 reads 0.5 ulp off).
 */
export function exact(D: typeof Dec, x: number): Dec {
  if (x === 0) return new D(0);
  if (!Number.isFinite(x)) throw new Error(`exact() needs a finite value, got ${x}`);
  const bits = toBits(x);
  const biased = Number((bits >> 52n) & 0x7ffn);
  const field = bits & ((1n << 52n) - 1n);
  const significand = biased === 0 ? field : field | (1n << 52n);
  const exponent = biased === 0 ? -1074 : biased - 1075;
  const v = new D(significand.toString()).times(new D(2).pow(exponent));
  return bits >> 63n ? v.neg() : v;
}

/** Round a decimal to the nearest double. */
export function toDouble(x: Dec): number {
  if (x.isZero()) return x.isNegative() ? -0 : 0;
  // Number() on a decimal string is correctly rounded; the string carries all working digits.
  return Number(x.toExponential());
}

/** pi at the given clone's precision. */
export function piOf(D: typeof Dec): Dec {
  return D.acos(-1);
}

/**
 * The problem's own conditioning in units in the last place: the largest change of f, in ulps of the rounded
 * result, when one input double moves to a neighbouring double (both directions, each input in turn), all at
 * high precision. A method working in the same precision as its inputs cannot be expected to beat a small
 * multiple of it. `keep(i, x)` may refuse a perturbed input (for example one that changes the kind of conic).
 */
export function conditionUlps(D: typeof Dec, f: (xs: Dec[]) => Dec | undefined, inputs: readonly number[], keep: (i: number, x: number) => boolean = () => true): number {
  const xs = inputs.map((x) => exact(D, x));
  const base = f(xs);
  if (base === undefined) return NaN;
  const rounded = toDouble(base);
  const ulp = Math.abs(rounded) === 0 ? 5e-324 : ulpOf(rounded);
  let worst = 0;
  inputs.forEach((x, i) => {
    for (const dir of [1, -1]) {
      const y = neighbour(x, dir);
      if (!Number.isFinite(y) || !keep(i, y)) continue;
      const moved = [...xs];
      moved[i] = exact(D, y);
      const v = f(moved);
      if (v === undefined) continue;
      const change = v.minus(base).abs().div(ulp).toNumber();
      if (change > worst) worst = change;
    }
  });
  return worst;
}

function neighbour(x: number, dir: number): number {
  if (x === 0) return dir * 5e-324;
  const b = new DataView(new ArrayBuffer(8));
  b.setFloat64(0, x);
  const bits = b.getBigUint64(0);
  const away = (x > 0) === (dir > 0);
  b.setBigUint64(0, away ? bits + 1n : bits - 1n);
  return b.getFloat64(0);
}


/** x - sin x (or sinh x - x when `hyperbolic`) by its series, for |x| <= 1: no cancellation near 0. */
export function oddRemainder(D: typeof Dec, x: Dec, hyperbolic: boolean): Dec {
  const x2 = x.times(x);
  let term = x.times(x2).div(6);
  let sum = term;
  const tiny = new D(10).pow(-(D.precision + 5));
  for (let n = 5; n < 4000; n += 2) {
    term = term.times(x2).div((n - 1) * n);
    if (!hyperbolic) term = term.neg();
    sum = sum.plus(term);
    if (term.abs().lte(sum.abs().times(tiny))) break;
  }
  return sum;
}

/**
 * Bracketed Newton on an increasing f with f(lo) <= 0 <= f(hi): Newton steps, bisection whenever a step would
 * leave the bracket; stops when a step is below 10^-(precision - guardDigits) relative. Throws after maxSteps.
 */
export function bracketedNewton(D: typeof Dec, f: (x: Dec) => Dec, df: (x: Dec) => Dec, lo: Dec, hi: Dec, x0: Dec, guardDigits: number, maxSteps: number): Dec {
  let x = x0;
  const tol = new D(10).pow(-(D.precision - guardDigits));
  for (let i = 0; i < maxSteps; i++) {
    const fx = f(x);
    if (fx.isZero()) return x;
    if (fx.isNegative()) lo = x;
    else hi = x;
    const step = fx.div(df(x));
    if (step.abs().lte(x.abs().times(tol))) return x.minus(step);
    let next = x.minus(step);
    if (!next.isFinite() || next.lte(lo) || next.gte(hi)) next = lo.plus(hi).div(2);
    x = next;
  }
  throw new Error("reference Newton iteration did not converge");
}
