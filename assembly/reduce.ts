// Reduction of an angle by whole turns: m = x - 2 pi k, k = nearest(x / 2 pi), |m| <= pi (up to a rounding of
// the quotient). 2 pi is carried as three reals (real.ts) and every product k * part is formed exactly
// (Dekker's two-product with Veltkamp's split, exact.ts; no fused multiply-add needed), so the remainder is a
// double-real (hi + lo) whose error is k times the error of the three-part 2 pi: k 8.9e-33 absolute with the f64
// parts as committed (below 1.3e-17 for |x| < 2^53; see the known defect of TWO_PI_3 in real.ts), about
// k 4e-23 with the f32 parts.
// Source: T. J. Dekker, "A floating-point technique for extending the available precision",
// Numer. Math. 18 (1971); W. J. Cody and W. Waite, "Software Manual for the Elementary Functions" (1980)
// for the split-constant idea. Valid for |x| < INTEGER_LIMIT (2^53, 2^24 for f32); callers treat larger
// |x| themselves (there every real is an integer and the quotient is not needed).

import { TWO_PI, TWO_PI_2, TWO_PI_3, INV_TWO_PI } from "./real";
import { twoProductError, twoSumError } from "./exact";

// File-private scratch: the low part and the turn count of the last reduceTurns call (wasm globals), read by
// the caller right after the call through reducedLo() and reducedTurns().
let lastLo: real = 0;
let lastTurns: real = 0;

/** Low part of the last remainder: the exact remainder is (the value reduceTurns returned) + reducedLo(). */
export function reducedLo(): real {
  return lastLo;
}

/** Whole turns removed by the last reduceTurns call (an integer-valued real). */
export function reducedTurns(): real {
  return lastTurns;
}

/**
 * Reduce x by whole turns: returns the high part of the remainder; the low part and the turn count are read
 * afterwards with reducedLo() and reducedTurns(). Requires finite |x| < INTEGER_LIMIT.
 */
export function reduceTurns(x: real): real {
  const k = nearest(x * INV_TWO_PI);
  lastTurns = k;
  if (k == 0) {
    lastLo = 0;
    return x;
  }
  // x - k*P1: k*P1 = p1 + e1 exactly; x - p1 is exact (Sterbenz: x and p1 agree to within a factor 2).
  const p1 = k * TWO_PI;
  const e1 = twoProductError(k, TWO_PI, p1);
  const p2 = k * TWO_PI_2;
  const e2 = twoProductError(k, TWO_PI_2, p2);
  const p3 = k * TWO_PI_3;
  // Sum (x - p1) - e1 - p2 - e2 - p3 with a compensated (two-sum) accumulation.
  let s = x - p1;
  let c: real = 0;
  let t = s - p2;
  c += twoSumError(s, -p2, t);
  s = t;
  t = s - e1;
  c += twoSumError(s, -e1, t);
  s = t;
  c -= e2 + p3;
  const hi = s + c;
  lastLo = c - (hi - s);
  return hi;
}
