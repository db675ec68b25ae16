// Exact reduction of an angle by whole turns: m = x - 2 pi k, k = nearest(x / 2 pi), |m| <= pi (up to a
// rounding of the quotient). 2 pi is carried as three reals (about 160 bits for f64) and every product
// k * part is formed exactly (Dekker's two-product with Veltkamp's split, no fused multiply-add needed),
// so the remainder is a double-real (hi + lo) good to about 2^-100 absolute for |x| < 2^53.
// Source: T. J. Dekker, "A floating-point technique for extending the available precision",
// Numer. Math. 18 (1971); W. J. Cody and W. Waite, "Software Manual for the Elementary Functions" (1980)
// for the split-constant idea. Valid for |x| < INTEGER_LIMIT (2^53, 2^24 for f32); callers treat larger
// |x| themselves (there every real is an integer and the quotient is not needed).

import { IS_F32 } from "./real";

// 2 pi = TWO_PI_1 + TWO_PI_2 + TWO_PI_3 (+ < 2^-160). f64: 0x1.921fb54442d18p2, 0x1.1a62633145c07p-52,
// 0x1.e691995838013p-109. f32 parts: 6.2831854820251465, -1.7484555314695172e-7, -6.8604980400235275e-15.
const TWO_PI_1: real = IS_F32 ? <real>6.2831854820251465 : <real>6.283185307179586;
const TWO_PI_2: real = IS_F32 ? <real>-1.7484555314695172e-7 : <real>2.4492935982947064e-16;
const TWO_PI_3: real = IS_F32 ? <real>-6.8604980400235275e-15 : <real>2.9284291191333423e-33;
const INV_TWO_PI: real = IS_F32 ? <real>0.15915493667125702 : <real>0.15915494309189535;
// Veltkamp split factor 2^ceil(p/2) + 1 (p = 53 or 24 significand bits).
const SPLITTER: real = IS_F32 ? <real>4097.0 : <real>134217729.0;

/** Whole turns removed by the last `reduceTurns` call (an integer-valued real). */
export let turns: real = 0;
/** Low part of the last remainder: the exact remainder is `hi + reducedLo`. */
export let reducedLo: real = 0;

// Exact product a * b = prodHi + prodLo (Dekker 1971). Assumes no overflow or underflow.
let prodLo: real = 0;
function twoProd(a: real, b: real): real {
  const p = a * b;
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  prodLo = ((ah * bh - p) + ah * bl + al * bh) + al * bl;
  return p;
}

/**
 * Reduce x by whole turns. Returns the high part of the remainder; sets `turns` and `reducedLo`.
 * Requires finite |x| < INTEGER_LIMIT.
 */
export function reduceTurns(x: real): real {
  const k = nearest(x * INV_TWO_PI);
  turns = k;
  if (k == 0) {
    reducedLo = 0;
    return x;
  }
  // x - k*P1: k*P1 = p1 + e1 exactly; x - p1 is exact (Sterbenz: x and p1 agree to within a factor 2).
  const p1 = twoProd(k, TWO_PI_1);
  const e1 = prodLo;
  const p2 = twoProd(k, TWO_PI_2);
  const e2 = prodLo;
  const p3 = k * TWO_PI_3;
  // Sum (x - p1) - e1 - p2 - e2 - p3 with a compensated (two-sum) accumulation.
  let s = x - p1;
  let c: real = 0;
  let t = s - p2;
  c += twoSumErr(s, -p2, t);
  s = t;
  t = s - e1;
  c += twoSumErr(s, -e1, t);
  s = t;
  c -= e2 + p3;
  const hi = s + c;
  reducedLo = c - (hi - s);
  return hi;
}

// Error of the floating sum a + b = s (Knuth's two-sum, valid for any ordering).
function twoSumErr(a: real, b: real, s: real): real {
  const bb = s - a;
  return (a - (s - bb)) + (b - bb);
}
