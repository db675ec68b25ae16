/**
 * High-precision references for Kepler's equation, independent of the kernels: plain decimal arithmetic
 * (decimal.js), a bracketed Newton iteration run to 1e-50 relative, the input doubles taken exactly.
 * Near periapsis the residual uses the series of E - sin E (sinh H - H), summed to the working precision,
 * so that no digits are lost when the root is tiny; the working precision also grows with |M| so that
 * the reduction by whole turns keeps 60 significant digits.
 */
import { Dec, decimalAt, exact, toDouble, piOf, oddRemainder, bracketedNewton } from "./decimal.js";

const MAX_NEWTON = 400;

function digitsFor(M: number): number {
  const mag = Math.abs(M) > 1 ? Math.ceil(Math.log10(Math.abs(M))) : 0;
  return 60 + mag;
}


/** E - e sin E - m with no cancellation near E = 0. */
function ellipticResidual(D: typeof Dec, e: Dec, E: Dec, m: Dec): Dec {
  if (E.abs().lte(1)) {
    return new D(1).minus(e).times(E).plus(e.times(oddRemainder(D, E, false))).minus(m);
  }
  return E.minus(e.times(D.sin(E))).minus(m);
}

function hyperbolicResidual(D: typeof Dec, e: Dec, H: Dec, m: Dec): Dec {
  if (H.abs().lte(1)) {
    return e.minus(1).times(H).plus(e.times(oddRemainder(D, H, true))).minus(m);
  }
  return e.times(D.sinh(H)).minus(H).minus(m);
}

/** Root of c1 x + c3 x^3 = r (c1 >= 0, c3 > 0, r > 0) in Cardano's cancellation-free form. */
function cubicRoot(D: typeof Dec, c1: Dec, c3: Dec, r: Dec): Dec {
  const p = c1.div(c3);
  const rr = r.div(c3);
  const t = rr.div(2).plus(rr.times(rr).div(4).plus(p.pow(3).div(27)).sqrt()).cbrt();
  return rr.div(t.times(t).plus(p.div(3)).plus(p.times(p).div(t.times(t).times(9))));
}

/** The shared bracketed Newton (decimal.ts) with this generator's guard digits and step cap. */
function solveMonotone(D: typeof Dec, f: (x: Dec) => Dec, df: (x: Dec) => Dec, lo: Dec, hi: Dec, x0: Dec): Dec {
  return bracketedNewton(D, f, df, lo, hi, x0, 8, MAX_NEWTON);
}

/** The correctly rounded E with E - e sin E = M, for 0 <= e < 1 and finite M (doubles, taken exactly). */
export function referenceElliptic(eIn: number, MIn: number): number {
  if (eIn === 0 || MIn === 0) return MIn;
  const D = decimalAt(digitsFor(MIn));
  const e = exact(D, eIn);
  const M = exact(D, MIn);
  const pi = piOf(D);
  const twoPi = pi.times(2);
  const k = M.div(twoPi).toDecimalPlaces(0, Dec.ROUND_HALF_EVEN);
  const m = M.minus(k.times(twoPi));
  const neg = m.isNegative();
  const am = m.abs();
  if (am.isZero()) return MIn;
  const E = solveMonotone(
    D,
    (x) => ellipticResidual(D, e, x, am),
    (x) => new D(1).minus(e.times(D.cos(x))),
    new D(0),
    pi.plus(1),
    D.min(cubicRoot(D, new D(1).minus(e), e.div(6), am), pi),
  );
  const Em = neg ? E.neg() : E;
  return toDouble(Em.plus(k.times(twoPi)));
}

/** The correctly rounded H with e sinh H - H = M, for e > 1 and finite M. */
export function referenceHyperbolic(eIn: number, MIn: number): number {
  if (MIn === 0) return MIn;
  const D = decimalAt(60);
  const e = exact(D, eIn);
  const am = exact(D, Math.abs(MIn));
  // Bracket: 0 < H <= asinh(M/(e-1)) ... use H_hi = max(ln(2(M+1)/e) + 2, cubic bound), grown until f(hi) > 0.
  let hi = D.ln(am.plus(1).times(2).div(e)).abs().plus(2);
  const lin = am.div(e.minus(1));
  if (lin.lt(hi)) hi = lin;
  const f = (x: Dec): Dec => hyperbolicResidual(D, e, x, am);
  for (let i = 0; i < 64 && f(hi).isNegative(); i++) hi = hi.times(2);
  const x0 = D.min(cubicRoot(D, e.minus(1), e.div(6), am), hi);
  const H = solveMonotone(D, f, (x) => e.times(D.cosh(x)).minus(1), new D(0), hi, x0);
  return toDouble(MIn < 0 ? H.neg() : H);
}

/** Barker's equation D + D^3/3 = M for the parabolic anomaly D = tan(nu/2), correctly rounded. */
export function referenceParabolic(MIn: number): number {
  if (MIn === 0) return MIn;
  const D = decimalAt(digitsFor(MIn) + 10);
  const M = exact(D, MIn);
  // Cardano with exact arithmetic: D = cbrt(b + sqrt(b^2 + 1)) - cbrt(-b + sqrt(b^2 + 1)), b = 3M/2.
  const b = M.times(3).div(2);
  const s = b.times(b).plus(1).sqrt();
  const root = s.plus(b).cbrt().minus(s.minus(b).cbrt());
  // Polish once by Newton on x^3 + 3x - 3M (guards the cancellation of the two cube roots for small M).
  const g = (x: Dec): Dec => x.times(x).times(x).plus(x.times(3)).minus(M.times(3));
  const r1 = root.minus(g(root).div(root.times(root).times(3).plus(3)));
  const r2 = r1.minus(g(r1).div(r1.times(r1).times(3).plus(3)));
  return toDouble(r2);
}
