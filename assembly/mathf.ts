// Single-precision math without double precision: RMath of the f32 build (asconfig.json target `single`,
// `--use RMath=ArealMathf`). The AssemblyScript library's NativeMathf computes sin, cos, sincos, tan, exp, log,
// pow, cbrt and hypot (and, through exp and log, sinh, cosh and asinh) in f64; on a single-precision FPU each of
// those is a software double routine. Everything here is f32 and integer arithmetic only: the f32 module holds no
// `f64.` operation (tests/f32-math.test.ts counts them).
//
// Methods (each function's comment has its steps):
//  1. sin, cos, sincos, tan: argument reduction by pi/2, then Taylor polynomials on [-pi/4, pi/4] (truncation
//     below 0.05 ulp there). Reduction: |x| <= MEDIUM_MAX by Cody & Waite ("Software Manual for the Elementary
//     Functions", 1980): pi/2 as four floats (12, 12, 12 and 24 significant bits, to 2^-68 absolute), n P1, n P2,
//     n P3 exact for n < 2^12, the sum carried as a float pair (Knuth's TwoSum, Knuth TAOCP vol. 2, 1969);
//     beyond MEDIUM_MAX by Payne & Hanek ("Radian reduction for trigonometric functions", SIGNUM Newsletter
//     1983; the reference recalled from memory) in integer
//     arithmetic: the 24-bit significand times a 96-bit window of the bits of 2/pi (TWO_OVER_PI, 288 bits)
//     gives the quarter turns mod 4 with 62 fraction bits, turned into a float pair with Dekker's exact product
//     (Dekker 1971, Veltkamp's split). The reduced argument enters the polynomials as a pair (y, y_lo).
//  2. exp: k = round(x / ln 2), r = x - k ln2 with ln 2 as two floats (Cody & Waite 1980), exp(r) by its Taylor
//     series to r^8 (|r| <= 0.347: truncation 2.3e-10 relative), times 2^k by exponent bits (two steps near the
//     ends of the range).
//  3. log: x = 2^k m, m in [sqrt(1/2), sqrt(2)), f = m - 1, s = f / (2 + f), log m = 2 atanh s = 2s + 2s^3/3 +
//     2s^5/5 + ... to s^11 (|s| <= 0.1716: truncation 2e-11 relative), with s as a float pair (the residual
//     f - s (2 + f) taken exactly) and 2s^3/3 as a pair, the result log x = k ln 2 + log m as a float pair
//     (Muller, "Elementary Functions", 2006, ch. 5 and 11 for the series and the double-word arithmetic).
//  4. pow(x, y) = exp(y log x) with log x and the product y log x as float pairs (the exponent's error would
//     otherwise grow with |y log x|, up to 88 ulp), and exp taking the pair. IEEE 754-2008 / C99 special cases.
//  5. cbrt: starter from the exponent bits divided by three (the bit trick of fdlibm's s_cbrtf.c, Sun
//     Microsystems 1993: bits/3 + (127 - 127/3 - 0.03306235651) 2^23 = 709958130, recalled from memory; it only
//     sets the starter, about 5 correct bits), then three Newton steps t <- t - (t - a / t^2) / 3 in float
//     (quadratic: 5, 10, 20, 40 bits); subnormals scaled by 2^24 first.
//  6. hypot: sqrt(a^2 + b^2) with both squares exact (Dekker products), one Newton correction of the square root
//     with the exact residual; scaled by a power of two outside [2^-30, 2^50].
//  7. sinh, cosh, asinh: the structure of musl's sinhf.c, coshf.c, asinhf.c (as in AssemblyScript's NativeMathf)
//     calling this file's exp and log. atan, atan2, acos, tanh, log1p, expm1, sqrt: NativeMathf's own (musl's
//     single-precision code, float only: checked in tests/f32-math.test.ts with the others).
// Domain: every f32. Special cases first in each function (NaN, +-Inf, +-0, subnormals), as C99 Annex F.
// Measured accuracy, max error in f32 ulps (tests/f32-math.test.ts: decimal.js at 60 digits, seeded sample of
// each domain plus edges: both zeros, subnormals, the largest float, the floats nearest n pi/2 for n up to 3800,
// the switch at 6000; 2026-12; `AREAL_MATHF_TABLE=1 npx vitest run tests/f32-math.test.ts`):
//   sin 0.687 (worst near the quadrant edges), cos 0.691, sincos the same bits as sin and cos, tan 0.733,
//   exp 0.735, log 0.500, pow 0.744 (|y log x| up to 88), cbrt 0.692, hypot 0.499, sinh 1.547, cosh 1.109,
//   asinh 0.991; NativeMathf's kept: atan 0.633, atan2 0.936, acos 0.737, tanh 1.068, log1p 0.682, expm1 1.547
//   (sinh's worst is expm1's).
// Loops: none (the polynomials, the Newton steps and the table reads are written out). No allocation: the 2/pi
// table is a static read-only data segment (40 bytes with its leading zero word). File-private scratch: redLo
// and redN (the low part and quadrant of the last reduction) and LOG_LO (the low part of the last logPair),
// each read right after the call that sets it; sincos_sin / sincos_cos, the results of sincos, are the two
// exported mutable variables that NativeMath's interface requires (kepler_elliptic.ts reads them).
// The constants that sinh, cosh and asinh share with musl (0x42B17217 = ln FLT_MAX, 0x4322E3BC = 235 ln 2,
// 0x3F317218 = ln 2) are read from AssemblyScript's std/assembly/math.ts, not recalled.

// ---- constants (bits from decimal.js at 120 digits; decimal values for reading) ----------------------------

import { F2, F3, F4, F5, F6, F7, F8, F9, F10 } from "./factorials";
import { twoProductError as productError, twoSumError as sumError } from "./exact";

/** 2/pi rounded to f32. */
const INV_PIO2: f32 = reinterpret<f32>(0x3F22F983); // 0.63661975
/** pi/2 in four parts (round-to-nearest splits, 12, 12, 12, 24 bits): P1 + P2 + P3 + P4 = pi/2 - 2.0e-21. */
const PIO2_1: f32 = reinterpret<f32>(0x3FC91000); // 1.57080078125
const PIO2_2: f32 = reinterpret<f32>(0xB6957000); // -4.453584551811218e-6
const PIO2_3: f32 = reinterpret<f32>(0xB06F5000); // -8.706138032721356e-10
const PIO2_4: f32 = reinterpret<f32>(0x298C234C); // 6.223371969669989e-14
/** Above this |x| the reduction is Payne-Hanek's (n = round(x 2/pi) < 2^12 keeps n P1, n P2, n P3 exact). */
const MEDIUM_MAX: f32 = reinterpret<f32>(0x45BB8000); // 6000
/** pi/2 times 2^-62 as two floats (the fixed-point fraction of the large reduction has 62 bits). */
const PIO2_SCALED_1: f32 = reinterpret<f32>(0x20C90FDB); // 3.4061216748705226e-19
const PIO2_SCALED_2: f32 = reinterpret<f32>(0x943BBD2E); // -9.478396428567739e-27
/** The first 288 bits of 2/pi after the binary point, 32 to a word, most significant first. */
const TWO_OVER_PI: usize = memory.data<u32>([
  0x00000000, // one zero word in front: the window may start before the binary point
  0xA2F9836E, 0x4E441529, 0xFC2757D1, 0xF534DDC0, 0xDB629599, 0x3C439041, 0xFE5163AB, 0xDEBBC561, 0xB7246E3A,
]);

/** 1/ln 2 rounded to f32. */
const INV_LN2: f32 = reinterpret<f32>(0x3FB8AA3B); // 1.4426950
/** ln 2 in two parts: LN2_1 has 15 significant bits (k LN2_1 exact for |k| < 2^9). */
const LN2_1: f32 = reinterpret<f32>(0x3F317200); // 0.693145751953125
const LN2_2: f32 = reinterpret<f32>(0x35BFBE8E); // 1.428606765330187e-6

/** sqrt(2) as f32 bits: significands above it are halved in log. */
const SQRT2_BITS: u32 = 0x3FB504F3;

// Taylor coefficients 1/n! rounded to f32: factorials.ts (F2 0x3F000000, F3 0x3E2AAAAB, F4 0x3D2AAAAB,
// F5 0x3C088889, F6 0x3AB60B61, F7 0x39500D01, F8 0x37D00D01, F9 0x3638EF1D, F10 0x3493F27E; real = f32 here).
// 2/(2j+1) rounded to f32: the atanh series.
const A3: f32 = reinterpret<f32>(0x3F2AAAAB); // 2/3
const A3_LO: f32 = reinterpret<f32>(0xB2AAAAAB); // 2/3 - A3 = -1.9868215e-8
const A5: f32 = reinterpret<f32>(0x3ECCCCCD); // 2/5
const A7: f32 = reinterpret<f32>(0x3E924925); // 2/7
const A9: f32 = reinterpret<f32>(0x3E638E39); // 2/9
const A11: f32 = reinterpret<f32>(0x3E3A2E8C); // 2/11
const THIRD_F: f32 = reinterpret<f32>(0x3EAAAAAB); // 1/3
/** cbrt starter offset (see the header, step 5). */
const CBRT_B1: u32 = 709958130; // 0x2A5119F2

// ---- file-private scratch ------------------------------------------------------------------------------------

/** Low part of the last reduction (sin/cos/tan) and quadrant: set by reduce(), read right after it. */
let redLo: f32 = 0;
let redN: i32 = 0;
/** Low part of the last logPair(): set by it, read right after it. */
let LOG_LO: f32 = 0;

// ---- exact float arithmetic (Dekker 1971) --------------------------------------------------------------------

// productError and sumError are exact.ts's twoProductError and twoSumError (this file is compiled in the f32 build
// only, where real is f32, so Veltkamp's split there is 2^12 + 1).
/** 2^k for -126 <= k <= 127, from the exponent bits. */
// @ts-ignore: decorator
@inline function pow2(k: i32): f32 {
  return reinterpret<f32>(<u32>(k + 127) << 23);
}

// ---- sin, cos, tan -------------------------------------------------------------------------------------------

/** sin(y + lo) on |y| <= pi/4 + 2^-20, |lo| <= ulp(y): Taylor to y^9. */
// @ts-ignore: decorator
@inline function sinKernel(y: f32, lo: f32): f32 {
  const z = y * y;
  const p = F3 - z * (F5 - z * (F7 - z * F9));
  return y + (lo * (<f32>1.0 - F2 * z) - y * z * p);
}

/** cos(y + lo) on |y| <= pi/4 + 2^-20: Taylor to y^10; 1 - y^2/2 formed as w + ((1 - w) - y^2/2). */
// @ts-ignore: decorator
@inline function cosKernel(y: f32, lo: f32): f32 {
  const z = y * y;
  const hz = F2 * z;
  const w = <f32>1.0 - hz;
  const r = F4 - z * (F6 - z * (F8 - z * F10));
  return w + ((((<f32>1.0 - w) - hz) + z * z * r) - y * lo);
}

/**
 * Reduce x (finite, |x| >= pi/4) by pi/2: returns y, sets redLo (x - n pi/2 = y + redLo) and redN (n mod 4).
 * Steps: |x| <= MEDIUM_MAX: n = round(x 2/pi); x - n P1 exact (Sterbenz), minus n P2, minus n P3, each with
 * its rounding error kept (TwoSum; zero when the difference cancels), minus n P4 into the low part. Beyond:
 * reduceLarge.
 */
function reduce(x: f32): f32 {
  if (abs(x) > MEDIUM_MAX) return reduceLarge(x);
  const n = nearest(x * INV_PIO2);
  const t = x - n * PIO2_1;
  const a = -(n * PIO2_2);
  const s1 = t + a;
  const b = -(n * PIO2_3);
  const s2 = s1 + b; // exact when it cancels (Cody & Waite): the parts' trailing zeros
  const lo = (sumError(t, a, s1) + sumError(s1, b, s2)) - n * PIO2_4;
  const y = s2 + lo;
  redLo = lo - (y - s2);
  redN = <i32>n & 3;
  return y;
}

/**
 * Payne-Hanek reduction of a finite |x| > MEDIUM_MAX in integer arithmetic. x = m 2^e (m the 24-bit
 * significand, e >= -11). x 2/pi mod 4 needs the bits of 2/pi from weight 2^(1-e) on: a 96-bit window W of
 * them, read at bit offset e + 30 of the table (one zero word in front), gives the low 96 bits of m W, whose
 * top 64 bits are the quarter turns with 62 fraction bits (the dropped bits weigh below 2^-62). Rounding to the
 * nearest quarter turn gives n and a signed fraction; the fraction times pi/2 2^-62 as a float pair.
 */
function reduceLarge(x: f32): f32 {
  const ix = reinterpret<u32>(x);
  const m = <u64>((ix & 0x7FFFFF) | 0x800000);
  const offset = <i32>((ix >> 23) & 0xFF) - 150 + 30;
  const q = offset >> 5;
  const sh = <u64>(offset & 31);
  const p = TWO_OVER_PI + (<usize>q << 2);
  const w0 = <u64>load<u32>(p), w1 = <u64>load<u32>(p, 4), w2 = <u64>load<u32>(p, 8), w3 = <u64>load<u32>(p, 12);
  const a0 = (((w0 << 32) | w1) << sh) >> 32; // window word 0 (top 32 bits)
  const a1 = (((w1 << 32) | w2) << sh) >> 32;
  const a2 = (((w2 << 32) | w3) << sh) >> 32;
  let r = ((m * a0) << 32) + m * a1 + ((m * a2) >> 32); // mod 2^64: 2 integer bits, 62 fraction bits
  const n = (r + (<u64>1 << 61)) >> 62; // nearest quarter turn
  r -= n << 62;
  const f = <i64>r; // signed fraction, |f| <= 2^61
  const fh = <f32>f;
  const fl = <f32>(f - <i64>fh);
  const yh = fh * PIO2_SCALED_1;
  const lo = productError(fh, PIO2_SCALED_1, yh) + (fl * PIO2_SCALED_1 + fh * PIO2_SCALED_2);
  const y = yh + lo;
  const sign = <i32>(ix >> 31);
  redLo = lo - (y - yh);
  redN = <i32>n & 3;
  if (sign) {
    redLo = -redLo;
    redN = (4 - redN) & 3;
    return -y;
  }
  return y;
}

/** |x| below this: sin x = x and cos x = 1 after rounding (x^2/6 < 2^-27). */
const TINY_TRIG: f32 = reinterpret<f32>(0x39800000); // 2^-12
/** pi/4 rounded down, as bits: up to it no reduction. */
const PIO4_BITS: u32 = 0x3F490FDA;

/** sin x. Special cases: NaN, +-Inf -> NaN; +-0 and |x| < 2^-12 -> x. */
function sinf(x: f32): f32 {
  const ax = reinterpret<u32>(x) & 0x7FFFFFFF;
  if (ax >= 0x7F800000) return x - x;
  if (abs(x) < TINY_TRIG) return x;
  if (ax <= PIO4_BITS) return sinKernel(x, 0);
  const y = reduce(x);
  const lo = redLo;
  const n = redN;
  const v = (n & 1) ? cosKernel(y, lo) : sinKernel(y, lo);
  return (n & 2) ? -v : v;
}

/** cos x. Special cases: NaN, +-Inf -> NaN; |x| < 2^-12 -> 1. */
function cosf(x: f32): f32 {
  const ax = reinterpret<u32>(x) & 0x7FFFFFFF;
  if (ax >= 0x7F800000) return x - x;
  if (abs(x) < TINY_TRIG) return 1;
  if (ax <= PIO4_BITS) return cosKernel(x, 0);
  const y = reduce(x);
  const lo = redLo;
  const n = redN;
  const v = (n & 1) ? sinKernel(y, lo) : cosKernel(y, lo);
  return ((n + 1) & 2) ? -v : v;
}

/** tan x = sin/cos of the reduced argument (quadrant parity swaps them). NaN, +-Inf -> NaN; tiny -> x. */
function tanf(x: f32): f32 {
  const ax = reinterpret<u32>(x) & 0x7FFFFFFF;
  if (ax >= 0x7F800000) return x - x;
  if (abs(x) < TINY_TRIG) return x;
  let y = x, lo: f32 = 0, n = 0;
  if (ax > PIO4_BITS) {
    y = reduce(x);
    lo = redLo;
    n = redN;
  }
  return tanKernel(y, lo, n & 1);
}

/**
 * tan(y + lo) (odd: -cot) as the quotient of the sine and cosine series kept as pairs (y + ss, w + cc), with
 * one correction by the exact residual num - q den (Dekker product): the quotient of the rounded sine and
 * cosine alone was 1.7 ulp off.
 */
function tanKernel(y: f32, lo: f32, odd: i32): f32 {
  const z = y * y;
  const ss = lo * (<f32>1.0 - F2 * z) - y * z * (F3 - z * (F5 - z * (F7 - z * F9)));
  const hz = F2 * z;
  const w = <f32>1.0 - hz;
  const cc = (((<f32>1.0 - w) - hz) + z * z * (F4 - z * (F6 - z * (F8 - z * F10)))) - y * lo;
  let nh = y, nl = ss, dh = w, dl = cc;
  if (odd) { nh = -w; nl = -cc; dh = y; dl = ss; }
  const q = (nh + nl) / (dh + dl);
  const p = q * dh;
  const r = (((nh - p) - productError(q, dh, p)) + nl) - q * dl;
  return q + r / (dh + dl);
}

// ---- exp and log ---------------------------------------------------------------------------------------------

/** Above this, exp overflows; below EXP_MIN it is 0 (f32: ln(2^128) = 88.72284, ln(2^-150) = -103.97208). */
const EXP_MAX: f32 = reinterpret<f32>(0x42B17218); // 88.72284 (just above ln of the largest float)
const EXP_MIN: f32 = reinterpret<f32>(0xC2CFF1B5); // -103.97209

/**
 * exp(h + l) for finite h in [EXP_MIN, EXP_MAX], |l| <= ulp(h): k = round(h / ln2), r = h - k ln2 as a float
 * pair (h - k LN2_1 exact by Sterbenz), Taylor to r^8, times 2^k in one or two exact power-of-two steps.
 */
function expPair(h: f32, l: f32): f32 {
  const k = nearest(h * INV_LN2);
  const t = h - k * LN2_1;
  const u = -(k * LN2_2);
  const r0 = t + u;
  const l0 = sumError(t, u, r0) + l; // may exceed ulp(r0) (l up to ulp(h)): renormalise the pair
  const r = r0 + l0;
  const rl = l0 - (r - r0);
  const q = F2 + r * (F3 + r * (F4 + r * (F5 + r * (F6 + r * (F7 + r * F8)))));
  const e = <f32>1.0 + (r + (r * r * q + rl * (<f32>1.0 + r)));
  const ki = <i32>k;
  if (ki > 127) return e * pow2(127) * pow2(ki - 127);
  if (ki < -126) return e * pow2(ki + 100) * pow2(-100);
  return e * pow2(ki);
}

/** exp x. NaN -> NaN; +Inf -> +Inf; -Inf -> 0; overflow -> +Inf; underflow -> 0. */
function expf(x: f32): f32 {
  if (isNaN(x)) return x;
  if (x > EXP_MAX) return Infinity;
  if (x < EXP_MIN) return 0;
  return expPair(x, 0);
}

/**
 * log x for finite x > 0 as a float pair: the high part returned, the low part in LOG_LO (read right after).
 * Steps: x = 2^k m (subnormals scaled by 2^25 first), m in [sqrt(1/2), sqrt(2)); f = m - 1 exact; d = 2 + f as
 * a pair; s = f/d and its low part (f - s d)/d with s d exact (Dekker); log m = 2s + (2 s_lo + 2s^3/3 + ...);
 * k ln2 + log m summed with TwoSum.
 */
function logPair(x: f32): f32 {
  let k: i32 = 0;
  if (x < <f32>1.1754943508222875e-38) { // below the smallest normal (0x00800000)
    x *= pow2(25);
    k = -25;
  }
  let ix = reinterpret<u32>(x);
  k += <i32>(ix >> 23) - 127;
  ix = (ix & 0x7FFFFF) | 0x3F800000;
  if (ix > SQRT2_BITS) {
    ix -= 0x800000; // m / 2
    k += 1;
  }
  const f = reinterpret<f32>(ix) - <f32>1.0;
  const d = <f32>2.0 + f;
  const dl = (<f32>2.0 - d) + f;
  const s = f / d;
  const sd = s * d;
  const res = ((f - sd) - productError(s, d, sd)) - s * dl;
  const sl = res / d;
  // 2s^3/3 as a pair (it reaches 0.0034: its float rounding would be 2^-30 of log x), the rest in float;
  // the low part of s enters as 2 atanh'(s) s_lo = 2 s_lo / (1 - s^2).
  const z = s * s;
  const s3 = s * z;
  const s3e = productError(s, z, s3) + s * productError(s, s, z);
  const t3 = s3 * A3;
  const t3e = productError(s3, A3, t3) + (s3e * A3 + s3 * A3_LO);
  const rest = s3 * z * (A5 + z * (A7 + z * (A9 + z * A11)));
  const kf = <f32>k;
  const a = kf * LN2_1;
  const b = <f32>2.0 * s;
  const h1 = a + b;
  const h2 = h1 + t3;
  const small = (<f32>2.0 * sl / (<f32>1.0 - z) + (t3e + rest)) + kf * LN2_2;
  const lo = (sumError(a, b, h1) + sumError(h1, t3, h2)) + small;
  const out = h2 + lo;
  LOG_LO = lo - (out - h2);
  return out;
}

/** log x. NaN -> NaN; x < 0 -> NaN; +-0 -> -Inf; +Inf -> +Inf; 1 -> +0. */
function logf(x: f32): f32 {
  if (isNaN(x) || x < 0) return NaN;
  if (x == 0) return -Infinity;
  if (x == Infinity) return x;
  return logPair(x);
}

// ---- pow -----------------------------------------------------------------------------------------------------

/** y is an integer (f32: every |y| >= 2^23 is one). */
// @ts-ignore: decorator
@inline function isInteger(y: f32): bool {
  return y == trunc(y);
}

/** y is an odd integer (|y| < 2^24; above, every f32 is even). */
// @ts-ignore: decorator
@inline function isOdd(y: f32): bool {
  return abs(y) < <f32>16777216.0 && isInteger(y) && (<i32>y & 1) != 0;
}

/** |y| above this with x != 1: |y ln x| > 2^64 2^-24, so the result over- or underflows (2^64). */
const POW_Y_HUGE: f32 = reinterpret<f32>(0x5F800000);
/** y ln x above this overflows, below POW_LOG_MIN underflows to 0 (a little beyond EXP_MAX, EXP_MIN). */
const POW_LOG_MAX: f32 = 89.0;
const POW_LOG_MIN: f32 = -104.5;

/**
 * x^y. Special cases (C99 Annex F.9.4.4, in this order): y = +-0 -> 1; x = 1 -> 1; NaN -> NaN; x = -1 and
 * y = +-Inf -> 1; y = +-Inf -> 0 or +Inf by |x| against 1; x = +-0 and x = +-Inf by the sign of y and whether
 * y is an odd integer; x < 0 with y not an integer -> NaN; x < 0 with y an integer: the sign of (-1)^y times
 * |x|^y. Then |x|^y = exp(y log|x|), the logarithm and the product as float pairs (Dekker).
 */
function powf(x: f32, y: f32): f32 {
  if (y == 0 || x == 1) return 1;
  if (isNaN(x) || isNaN(y)) return x + y;
  const ax = abs(x);
  if (!isFinite(y)) {
    if (ax == 1) return 1;
    return (ax > 1) == (y > 0) ? Infinity : 0;
  }
  const odd = isOdd(y);
  if (x == 0 || !isFinite(x)) { // 1/x keeps the sign of a zero; |x| = Inf or 0 decides with the sign of y
    const big = (x == 0) == (y < 0);
    const mag: f32 = big ? Infinity : 0;
    return odd && (reinterpret<u32>(x) >> 31) != 0 ? -mag : mag;
  }
  let sign: f32 = 1;
  if (x < 0) {
    if (!isInteger(y)) return NaN;
    if (odd) sign = -1;
  }
  if (ax == 1) return sign;
  if (abs(y) > POW_Y_HUGE) return (ax > 1) == (y > 0) ? sign * Infinity : sign * 0;
  const lh = logPair(ax);
  const ll = LOG_LO;
  const ph = y * lh;
  if (ph > POW_LOG_MAX) return sign * Infinity;
  if (ph < POW_LOG_MIN) return sign * 0;
  const pl = productError(y, lh, ph) + y * ll;
  return sign * expPair(ph, pl);
}

// ---- cbrt and hypot ------------------------------------------------------------------------------------------

/** Smallest normal f32 (2^-126). */
const MIN_NORMAL_F: f32 = reinterpret<f32>(0x00800000);

/** One Newton step for t = cbrt(a): t - (t - a / t^2) / 3. */
// @ts-ignore: decorator
@inline function cbrtStep(t: f32, a: f32): f32 {
  return t - (t - a / (t * t)) * THIRD_F;
}

/** cbrt x. NaN, +-Inf, +-0 -> x. Subnormals: cbrt(x 2^24) 2^-8. */
function cbrtf(x: f32): f32 {
  if (!isFinite(x) || x == 0) return x + x;
  let a = abs(x);
  let scale: f32 = 1;
  if (a < MIN_NORMAL_F) {
    a *= pow2(24);
    scale = pow2(-8);
  }
  let t = reinterpret<f32>(reinterpret<u32>(a) / 3 + CBRT_B1);
  t = cbrtStep(t, a); // about 5 -> 10 bits
  t = cbrtStep(t, a); // 10 -> 20 bits
  t = cbrtStep(t, a); // 20 -> 40 bits: below the final rounding
  return copysign<f32>(t * scale, x);
}

/** hypot: below this ratio the smaller term cannot change the rounded result (2^-25). */
const HYPOT_RATIO: f32 = reinterpret<f32>(0x33000000);
const HYPOT_BIG: f32 = reinterpret<f32>(0x58800000); // 2^50
const HYPOT_SMALL: f32 = reinterpret<f32>(0x30800000); // 2^-30

/**
 * sqrt(x^2 + y^2) without spurious overflow or underflow. Inf (either, even with NaN) -> +Inf; NaN -> NaN.
 * a = max(|x|, |y|), b = min; b < a 2^-25 -> a + b; scale by 2^-70 above 2^50, by 2^90 below 2^-30; a^2 + b^2
 * as a float pair from exact squares; r = sqrt(hi), corrected once by (hi - r^2 + lo) / (2r), r^2 exact.
 */
function hypotf(x: f32, y: f32): f32 {
  let a = abs(x), b = abs(y);
  if (a == Infinity || b == Infinity) return Infinity;
  if (isNaN(a) || isNaN(b)) return a + b;
  if (a < b) { const t = a; a = b; b = t; }
  if (b == 0 || b < a * HYPOT_RATIO) return a + b;
  let scale: f32 = 1;
  if (a > HYPOT_BIG) { a *= pow2(-70); b *= pow2(-70); scale = pow2(70); }
  else if (a < HYPOT_SMALL) { a *= pow2(90); b *= pow2(90); scale = pow2(-90); }
  const a2 = a * a, b2 = b * b;
  const hi = a2 + b2;
  const lo = ((a2 - hi) + b2) + (productError(a, a, a2) + productError(b, b, b2));
  const r = sqrt<f32>(hi);
  const r2 = r * r;
  const c = r + (((hi - r2) - productError(r, r, r2)) + lo) / (<f32>2.0 * r);
  return c * scale;
}

// ---- sinh, cosh, asinh (musl's structure with this file's exp and log) ----------------------------------------

/** exp(x)/2 sign for x beyond ln(FLT_MAX) (musl __expo2f.c): exp(x - k ln2) 2^(k-1) in two factors, k = 235. */
function expo2f(x: f32, sign: f32): f32 {
  const kln2 = reinterpret<f32>(0x4322E3BC); // 235 ln 2 = 162.88958740234375
  const scale = pow2(117);
  return expf(x - kln2) * (sign * scale) * scale;
}

/** |x| bits below ln(FLT_MAX) = 88.72283 (0x42B17217). */
const LN_FLT_MAX_BITS: u32 = 0x42B17217;

function sinhf(x: f32): f32 {
  const u = reinterpret<u32>(x) & 0x7FFFFFFF;
  const a = reinterpret<f32>(u);
  const h = copysign<f32>(0.5, x);
  if (u < LN_FLT_MAX_BITS) {
    const t = NativeMathf.expm1(a);
    if (u < 0x3F800000) {
      if (u < 0x3F800000 - (12 << 23)) return x;
      return h * (<f32>2.0 * t - t * t / (t + <f32>1.0));
    }
    return h * (t + t / (t + <f32>1.0));
  }
  return expo2f(a, <f32>2.0 * h);
}

function coshf(x: f32): f32 {
  const u = reinterpret<u32>(x) & 0x7FFFFFFF;
  const a = reinterpret<f32>(u);
  if (u < 0x3F317217) { // ln 2
    if (u < 0x3F800000 - (12 << 23)) return 1;
    const t = NativeMathf.expm1(a);
    return <f32>1.0 + t * t / (<f32>2.0 + <f32>2.0 * t);
  }
  if (u < LN_FLT_MAX_BITS) {
    const t = expf(a);
    return <f32>0.5 * t + <f32>0.5 / t;
  }
  return expo2f(a, 1);
}

function asinhf(x: f32): f32 {
  const u = reinterpret<u32>(x) & 0x7FFFFFFF;
  let y = reinterpret<f32>(u);
  if (u >= 0x3F800000 + (12 << 23)) y = logf(y) + reinterpret<f32>(0x3F317218); // + ln 2
  else if (u >= 0x3F800000 + (1 << 23)) y = logf(<f32>2.0 * y + <f32>1.0 / (sqrt<f32>(y * y + <f32>1.0) + y));
  else if (u >= 0x3F800000 - (12 << 23)) y = NativeMathf.log1p(y + y * y / (sqrt<f32>(y * y + <f32>1.0) + <f32>1.0));
  return copysign<f32>(y, x);
}

// ---- the RMath interface ---------------------------------------------------------------------------------------

// @ts-ignore: decorator
@global export namespace ArealMathf {
  export function sin(x: f32): f32 { return sinf(x); }
  export function cos(x: f32): f32 { return cosf(x); }
  export function tan(x: f32): f32 { return tanf(x); }
  export function exp(x: f32): f32 { return expf(x); }
  export function log(x: f32): f32 { return logf(x); }
  export function pow(x: f32, y: f32): f32 { return powf(x, y); }
  export function cbrt(x: f32): f32 { return cbrtf(x); }
  export function hypot(x: f32, y: f32): f32 { return hypotf(x, y); }
  export function sinh(x: f32): f32 { return sinhf(x); }
  export function cosh(x: f32): f32 { return coshf(x); }
  export function asinh(x: f32): f32 { return asinhf(x); }
  // Float-only already in the standard library (musl's single-precision code); checked in tests/f32-math.test.ts.
  export function atan(x: f32): f32 { return NativeMathf.atan(x); }
  export function atan2(y: f32, x: f32): f32 { return NativeMathf.atan2(y, x); }
  export function acos(x: f32): f32 { return NativeMathf.acos(x); }
  export function tanh(x: f32): f32 { return NativeMathf.tanh(x); }
  export function log1p(x: f32): f32 { return NativeMathf.log1p(x); }
  export function expm1(x: f32): f32 { return NativeMathf.expm1(x); }
  // @ts-ignore: decorator
  @inline export function sqrt(x: f32): f32 { return NativeMathf.sqrt(x); }
  // The results of sincos, as NativeMath's interface has them (kepler_elliptic.ts reads them after the call).
  export let sincos_sin: f32 = 0;
  export let sincos_cos: f32 = 0;
  /** sin x and cos x with one reduction. Special cases as sin and cos. */
  export function sincos(x: f32): void {
    const ax = reinterpret<u32>(x) & 0x7FFFFFFF;
    if (ax >= 0x7F800000) { sincos_sin = x - x; sincos_cos = x - x; return; }
    if (abs(x) < TINY_TRIG) { sincos_sin = x; sincos_cos = 1; return; }
    let y = x, lo: f32 = 0, n = 0;
    if (ax > PIO4_BITS) {
      y = reduce(x);
      lo = redLo;
      n = redN;
    }
    const s = sinKernel(y, lo);
    const c = cosKernel(y, lo);
    const ps = (n & 1) ? c : s;
    const pc = (n & 1) ? s : c;
    sincos_sin = (n & 2) ? -ps : ps;
    sincos_cos = ((n + 1) & 2) ? -pc : pc;
  }
}
