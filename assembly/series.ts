// Cancellation-free odd remainders for small arguments, used where Kepler's equation is evaluated near
// periapsis. Restricted input: |x| <= ODD_SERIES_MAX (= 1). For |x| <= 1 the truncation error of nine terms is
// below 1/19! / (1/6) = 5e-17 relative, under half a unit in the last place of f64.
//   x - sin x  = x^3 (1/3! - x^2/5! + x^4/7! - ... )
//   sinh x - x = x^3 (1/3! + x^2/5! + x^4/7! + ... )
// Coefficients are 1/(2k+3)! rounded to the format (factorials.ts; relative error 2^-53 each, harmless in
// Horner form).

import { F3 as C3, F5 as C5, F7 as C7, F9 as C9, F11 as C11, F13 as C13, F15 as C15, F17 as C17, F19 as C19 } from "./factorials";

/** Largest |x| the odd-remainder series below take (the error bound above holds up to here). */
export const ODD_SERIES_MAX: real = 1.0;

/** x - sin x for |x| <= ODD_SERIES_MAX, with full relative accuracy (no cancellation). */
export function xMinusSinSeries(x: real): real {
  const y = x * x;
  const p = C3 - y * (C5 - y * (C7 - y * (C9 - y * (C11 - y * (C13 - y * (C15 - y * (C17 - y * C19)))))));
  return x * y * p;
}

/** sinh x - x for |x| <= ODD_SERIES_MAX, with full relative accuracy. */
export function sinhMinusXSeries(x: real): real {
  const y = x * x;
  const p = C3 + y * (C5 + y * (C7 + y * (C9 + y * (C11 + y * (C13 + y * (C15 + y * (C17 + y * C19)))))));
  return x * y * p;
}

/**
 * The fifth-order correction of Householder's method as a series reversion (used by kepler_elliptic.ts and
 * kepler_hyperbolic.ts): the root of f(x + d) = 0 is d = -u (1 + A u + (2A^2 - B) u^2 + (5A^3 - 5AB + C) u^3) to
 * fifth order, u = f/f', A = f''/2f', B = f'''/6f', C = f''''/24f' (J. M. A. Danby and T. M. Burkardt, Celest.
 * Mech. 31 (1983) 95-107, give the same order as nested denominators). Estrin's scheme in u: two short chains.
 */
// @ts-ignore: decorator
@inline export function reversionStep5(u: real, A: real, B: real, C: real): real {
  const AA = A * A;
  const P2 = <real>2.0 * AA - B;
  const P3 = A * (<real>5.0 * (AA - B)) + C;
  return -u * ((<real>1.0 + u * A) + (u * u) * (P2 + u * P3));
}
