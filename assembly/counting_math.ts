// Operation-counting math for the bench-only "counting" build (asconfig.json target `counting`, entry
// assembly/counting.ts, `--use RMath=CountingMath`). Never part of the release, single or debug modules.
//
// Each function forwards to the AssemblyScript math library (NativeMath) and counts one call of its kind. While a
// library function runs, `mathDepth` is above zero: the arithmetic counters that scripts/build-bench.mjs inserts
// into the module (every f64 div, mul, add/sub, sqrt instruction) ignore operations inside the library, so a sin
// counts as one sin, not as the thirty multiply-adds it is made of.
// Counters are file-private module-level scalars (no allocation, nothing exported but the functions below):
// count_get(i) reads them in the order of MATH_COUNTERS in harness/opcount.ts, count_reset clears them.
// scripts/instrument-wat.mjs finds the depth global by its internal name ($assembly/counting_math/mathDepth).

/** Nesting depth of library math calls; the inserted arithmetic counters count only at depth 0. */
let mathDepth: i32 = 0;

let nSin: i64 = 0;
let nCos: i64 = 0;
let nTan: i64 = 0;
let nInvTrig: i64 = 0; // asin, acos, atan
let nAtan2: i64 = 0;
let nSqrt: i64 = 0; // RMath.sqrt here; the inserted counter adds bare f64.sqrt instructions
let nCbrt: i64 = 0;
let nLog: i64 = 0; // log, log1p, log2, log10
let nExp: i64 = 0; // exp, expm1
let nPow: i64 = 0;
let nHyp: i64 = 0; // sinh, cosh, tanh, asinh, acosh, atanh
let nHypot: i64 = 0;
// The two results of the last sincos call (read through CountingMath.sincos_sin / sincos_cos).
let sincosSin: f64 = 0;
let sincosCos: f64 = 0;
// Division, multiplication, addition/subtraction, fusable pairs and bare f64.sqrt instructions are counted by
// globals that scripts/build-bench.mjs adds to the module text (count_arith, count_arith_reset).

/** Number of counters (count_get indices 0 .. COUNTERS - 1). */
export const COUNTERS: i32 = 12;

/** Set every counter to zero. */
export function count_reset(): void {
  nSin = 0; nCos = 0; nTan = 0; nInvTrig = 0; nAtan2 = 0; nSqrt = 0; nCbrt = 0; nLog = 0;
  nExp = 0; nPow = 0; nHyp = 0; nHypot = 0;
  mathDepth = 0;
}

/** Counter i (order: sin cos tan invtrig atan2 sqrt cbrt log exp pow hyp hypot), or -1. */
export function count_get(i: i32): f64 {
  switch (i) {
    case 0: return <f64>nSin;
    case 1: return <f64>nCos;
    case 2: return <f64>nTan;
    case 3: return <f64>nInvTrig;
    case 4: return <f64>nAtan2;
    case 5: return <f64>nSqrt;
    case 6: return <f64>nCbrt;
    case 7: return <f64>nLog;
    case 8: return <f64>nExp;
    case 9: return <f64>nPow;
    case 10: return <f64>nHyp;
    case 11: return <f64>nHypot;
    default: return -1;
  }
}

// @ts-ignore: decorator
@inline function enter(): void { mathDepth++; }
// @ts-ignore: decorator
@inline function leave(): void { mathDepth--; }

// A class of static members rather than a namespace, so that sincos's two results are read-only getters (the
// interface of NativeMath, whose sincos_sin and sincos_cos kernels read after RMath.sincos) and not exported
// mutable variables.
// @ts-ignore: decorator
@global export class CountingMath {
  static readonly PI: f64 = NativeMath.PI;
  static readonly E: f64 = NativeMath.E;
  static sin(x: f64): f64 { if (mathDepth == 0) nSin++; enter(); const r = NativeMath.sin(x); leave(); return r; }
  static cos(x: f64): f64 { if (mathDepth == 0) nCos++; enter(); const r = NativeMath.cos(x); leave(); return r; }
  // One call that gives both, with one argument reduction: counted as one sin and one cos (the cost model then
  // charges a little more than the call costs; the counts stay an upper bound).
  static get sincos_sin(): f64 { return sincosSin; }
  static get sincos_cos(): f64 { return sincosCos; }
  static sincos(x: f64): void {
    if (mathDepth == 0) { nSin++; nCos++; }
    enter();
    NativeMath.sincos(x);
    sincosSin = NativeMath.sincos_sin;
    sincosCos = NativeMath.sincos_cos;
    leave();
  }
  static tan(x: f64): f64 { if (mathDepth == 0) nTan++; enter(); const r = NativeMath.tan(x); leave(); return r; }
  static asin(x: f64): f64 { if (mathDepth == 0) nInvTrig++; enter(); const r = NativeMath.asin(x); leave(); return r; }
  static acos(x: f64): f64 { if (mathDepth == 0) nInvTrig++; enter(); const r = NativeMath.acos(x); leave(); return r; }
  static atan(x: f64): f64 { if (mathDepth == 0) nInvTrig++; enter(); const r = NativeMath.atan(x); leave(); return r; }
  static atan2(y: f64, x: f64): f64 { if (mathDepth == 0) nAtan2++; enter(); const r = NativeMath.atan2(y, x); leave(); return r; }
  static sqrt(x: f64): f64 { if (mathDepth == 0) nSqrt++; enter(); const r = NativeMath.sqrt(x); leave(); return r; }
  static cbrt(x: f64): f64 { if (mathDepth == 0) nCbrt++; enter(); const r = NativeMath.cbrt(x); leave(); return r; }
  static log(x: f64): f64 { if (mathDepth == 0) nLog++; enter(); const r = NativeMath.log(x); leave(); return r; }
  static log1p(x: f64): f64 { if (mathDepth == 0) nLog++; enter(); const r = NativeMath.log1p(x); leave(); return r; }
  static log2(x: f64): f64 { if (mathDepth == 0) nLog++; enter(); const r = NativeMath.log2(x); leave(); return r; }
  static log10(x: f64): f64 { if (mathDepth == 0) nLog++; enter(); const r = NativeMath.log10(x); leave(); return r; }
  static exp(x: f64): f64 { if (mathDepth == 0) nExp++; enter(); const r = NativeMath.exp(x); leave(); return r; }
  static expm1(x: f64): f64 { if (mathDepth == 0) nExp++; enter(); const r = NativeMath.expm1(x); leave(); return r; }
  static pow(x: f64, y: f64): f64 { if (mathDepth == 0) nPow++; enter(); const r = NativeMath.pow(x, y); leave(); return r; }
  static sinh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.sinh(x); leave(); return r; }
  static cosh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.cosh(x); leave(); return r; }
  static tanh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.tanh(x); leave(); return r; }
  static asinh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.asinh(x); leave(); return r; }
  static acosh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.acosh(x); leave(); return r; }
  static atanh(x: f64): f64 { if (mathDepth == 0) nHyp++; enter(); const r = NativeMath.atanh(x); leave(); return r; }
  static hypot(x: f64, y: f64): f64 { if (mathDepth == 0) nHypot++; enter(); const r = NativeMath.hypot(x, y); leave(); return r; }
  // Not counted: cheap bit operations on every target.
  static abs(x: f64): f64 { return NativeMath.abs(x); }
  static floor(x: f64): f64 { return NativeMath.floor(x); }
  static ceil(x: f64): f64 { return NativeMath.ceil(x); }
  static trunc(x: f64): f64 { return NativeMath.trunc(x); }
  static round(x: f64): f64 { return NativeMath.round(x); }
  static sign(x: f64): f64 { return NativeMath.sign(x); }
  static min(x: f64, y: f64): f64 { return NativeMath.min(x, y); }
  static max(x: f64, y: f64): f64 { return NativeMath.max(x, y); }
}
