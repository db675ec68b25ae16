// Error-free transformations: the exact rounding error of a sum or a product of two reals, and a product
// difference built on them. The one home of Veltkamp's splitting in the module (reduce.ts and universal.ts use
// it). No fused multiply-add is needed, so the same source is exact on every build.
// Sources: T. J. Dekker, "A floating-point technique for extending the available precision", Numer. Math. 18
// (1971) 224-242 (two-product with Veltkamp's splitting); D. E. Knuth, "The Art of Computer Programming",
// vol. 2, 3rd ed. 1997, 4.2.2 (two-sum, valid for either ordering of the operands).
// Restricted input (every helper): finite operands with |a|, |b| below the largest real / VELTKAMP_SPLIT and
// products that neither over- nor underflow; outside it the results are not finite or not exact, and callers
// that can meet such inputs test the result (diffProd does).

import { VELTKAMP_SPLIT } from "./real";

/** The rounding error of ab = fl(a b), exactly: a b = ab + twoProductError(a, b, ab) (Dekker 1971). */
export function twoProductError(a: real, b: real, ab: real): real {
  const ta = VELTKAMP_SPLIT * a;
  const ah = ta - (ta - a);
  const al = a - ah;
  const tb = VELTKAMP_SPLIT * b;
  const bh = tb - (tb - b);
  const bl = b - bh;
  return ah * bh - ab + ah * bl + al * bh + al * bl;
}

/** The rounding error of s = fl(a + b), exactly: a + b = s + twoSumError(a, b, s) (Knuth's two-sum). */
export function twoSumError(a: real, b: real, s: real): real {
  const bb = s - a;
  return (a - (s - bb)) + (b - bb);
}

/**
 * a b - c d to within a few ulps of the result, whatever the cancellation (each product's rounding error is
 * recovered); the plain difference when the splitting overflows.
 */
export function diffProd(a: real, b: real, c: real, d: real): real {
  const ab = a * b;
  const cd = c * d;
  const s = ab - cd + (twoProductError(a, b, ab) - twoProductError(c, d, cd));
  return isFinite(s) ? s : ab - cd;
}
