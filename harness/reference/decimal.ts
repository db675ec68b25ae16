/**
 * decimal.js set-up shared by the reference generators: a private Decimal constructor (so no global
 * configuration leaks between generators), exact conversion from doubles, and round-to-nearest back.
 */
import { Decimal as DecimalJs } from "decimal.js";
import { exactHex } from "../float.js";

/** Working precision of the references, in significant decimal digits. */
export const REFERENCE_DIGITS = 60;

export const Dec = DecimalJs.clone({ precision: REFERENCE_DIGITS, rounding: DecimalJs.ROUND_HALF_EVEN, toExpNeg: -9e15, toExpPos: 9e15, minE: -9e15, maxE: 9e15 });
export type Dec = InstanceType<typeof Dec>;

/** A clone of Dec at another precision (digits). */
export function decimalAt(digits: number): typeof Dec {
  return Dec.clone({ precision: digits });
}

/** The exact value of a double (through its hex-float form), rounded only by the clone's precision. */
export function exact(D: typeof Dec, x: number): Dec {
  if (x === 0) return new D(0);
  return new D(exactHex(x));
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
