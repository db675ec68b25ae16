// Cancellation-free odd remainders for small arguments, used where Kepler's equation is evaluated near
// periapsis. Restricted input: |x| <= SERIES_MAX (= 1). For |x| <= 1 the truncation error of nine terms is
// below 1/19! / (1/6) = 5e-17 relative, under half a unit in the last place of f64.
//   x - sin x  = x^3 (1/3! - x^2/5! + x^4/7! - ... )
//   sinh x - x = x^3 (1/3! + x^2/5! + x^4/7! + ... )
// Coefficients are 1/(2k+3)! rounded to the format (relative error 2^-53 each, harmless in Horner form).

export const SERIES_MAX: real = 1.0;

const C3: real = <real>0.16666666666666666; // 1/3!
const C5: real = <real>0.008333333333333333; // 1/5!
const C7: real = <real>0.0001984126984126984; // 1/7!
const C9: real = <real>2.7557319223985893e-6; // 1/9!
const C11: real = <real>2.505210838544172e-8; // 1/11!
const C13: real = <real>1.6059043836821613e-10; // 1/13!
const C15: real = <real>7.647163731819816e-13; // 1/15!
const C17: real = <real>2.8114572543455206e-15; // 1/17!
const C19: real = <real>8.22063524662433e-18; // 1/19!

/** x - sin x for |x| <= SERIES_MAX, with full relative accuracy (no cancellation). */
export function xMinusSinSeries(x: real): real {
  const y = x * x;
  const p = C3 - y * (C5 - y * (C7 - y * (C9 - y * (C11 - y * (C13 - y * (C15 - y * (C17 - y * C19)))))));
  return x * y * p;
}

/** sinh x - x for |x| <= SERIES_MAX, with full relative accuracy. */
export function sinhMinusXSeries(x: real): real {
  const y = x * x;
  const p = C3 + y * (C5 + y * (C7 + y * (C9 + y * (C11 + y * (C13 + y * (C15 + y * (C17 + y * C19)))))));
  return x * y * p;
}
