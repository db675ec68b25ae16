/**
 * Numbers read from and written to ASCII bytes without intermediate strings, for the eval fast path
 * (evaluate.ts evaluateBytes). Both give exactly what the string functions give (float.ts parseNumber, shortest):
 *  - readDecimal parses a cell of the form of float.ts DECIMAL. Its fast path is Clinger's (Clinger 1990, "How to
 *    read floating point numbers accurately"): an integer w < 2^53 of the significant digits and a power of ten
 *    10^k with |k| <= 22 are both exact doubles, so one multiplication or division by 10^k rounds once, correctly.
 *    Where that does not hold (more significant digits than fit, a larger exponent) it answers NaN and the caller
 *    parses the cell with Number(), which is correctly rounded.
 *  - ByteSink.number writes whole numbers below 2^31 digit by digit (their shortest form is their digits) and
 *    every other value through shortest(), character by character.
 */
import { shortest } from "./float.js";

/** 10^k for k = 0..22: exact doubles (10^22 < 2^53 * 2^22, 5^22 < 2^53). */
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));
/** The largest w for which w * 10 + 9 < 2^53 (so the next digit keeps w exact). */
const W_MAX = 900719925474098;
/** Exponent digits beyond which the fast path gives up (a longer exponent is out of its range anyway). */
const EXP_DIGITS_MAX = 4;

/** The result of readDecimal when the cell is not of the DECIMAL form (the caller names it). */
export const NOT_DECIMAL = -1;
/** The result of readDecimal when the cell is a decimal the fast path cannot convert exactly (use Number()). */
export const NOT_EXACT = -2;
/** Where readDecimal puts a value it converted (read it when readDecimal returns 0). */
export const decimalValue = new Float64Array(1);

/**
 * Read bytes [p, end) of `b` as a decimal of the form [+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)? (float.ts DECIMAL).
 * Returns 0 with the value in decimalValue[0] when it is exact, NOT_EXACT for a decimal it cannot convert
 * exactly, NOT_DECIMAL for anything else (nan, inf, hex, spaces, letters).
 */
export function readDecimal(b: Uint8Array, p: number, end: number): number {
  let neg = false;
  let c = p < end ? b[p]! : 0;
  if (c === 43 || c === 45) {
    neg = c === 45;
    p++;
  }
  let w = 0;
  let extra = 0; // up to EXTRA_DIGITS digits after w is full: the significand is w * 10^nExtra + extra
  let nExtra = 0;
  let scale = 0; // power of ten the digits kept are short of: + for integer digits dropped, - for fraction digits kept
  let digits = 0;
  let exact = true;
  for (; p < end; p++) {
    c = b[p]! - 48;
    if (c < 0 || c > 9) break;
    digits++;
    if (w <= W_MAX) w = w * 10 + c;
    else if (nExtra < EXTRA_DIGITS) {
      extra = extra * 10 + c;
      nExtra++;
    } else {
      scale++;
      if (c !== 0) exact = false;
    }
  }
  if (p < end && b[p] === 46) {
    for (p++; p < end; p++) {
      c = b[p]! - 48;
      if (c < 0 || c > 9) break;
      digits++;
      if (w <= W_MAX) {
        w = w * 10 + c;
        scale--;
      } else if (nExtra < EXTRA_DIGITS) {
        extra = extra * 10 + c;
        nExtra++;
        scale--;
      } else if (c !== 0) exact = false;
    }
  }
  if (digits === 0) return NOT_DECIMAL;
  if (p < end) {
    c = b[p]!;
    if (c !== 101 && c !== 69) return NOT_DECIMAL;
    p++;
    let eneg = false;
    c = p < end ? b[p]! : 0;
    if (c === 43 || c === 45) {
      eneg = c === 45;
      p++;
    }
    let e = 0;
    let ed = 0;
    for (; p < end; p++) {
      c = b[p]! - 48;
      if (c < 0 || c > 9) return NOT_DECIMAL;
      if (++ed <= EXP_DIGITS_MAX) e = e * 10 + c;
    }
    if (ed === 0) return NOT_DECIMAL;
    if (ed > EXP_DIGITS_MAX) exact = false;
    scale += eneg ? -e : e;
  }
  if (w === 0) {
    // every digit read was 0 (a non-zero digit after W_MAX cannot come without one before it)
    decimalValue[0] = neg ? -0 : 0;
    return 0;
  }
  if (!exact || scale > 22 || scale < -22) return NOT_EXACT;
  let v: number;
  if (nExtra === 0) v = scale >= 0 ? w * POW10[scale]! : w / POW10[-scale]!;
  else {
    if (scale >= 0) return NOT_EXACT;
    v = divideExactly(w, nExtra, extra, POW10[-scale]!);
    if (v !== v) return NOT_EXACT;
  }
  decimalValue[0] = neg ? -v : v;
  return 0;
}

/** Digits kept beyond W_MAX for divideExactly: w * 10^3 + 999 < 2^63. */
const EXTRA_DIGITS = 3;
/** Veltkamp's splitter for binary64: 2^27 + 1. */
const SPLITTER = 134217729;
const F = new Float64Array(1);
const U32 = new Uint32Array(F.buffer);
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0; // index of the high word

/** a * b - fl(a * b), exactly (Dekker 1971, "A floating-point technique for extending the available precision"). */
function productError(a: number, b: number, p: number): number {
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  return al * bl - (p - ah * bh - al * bh - ah * bl);
}

/** The spacing of doubles at positive normal x (x < 2^1023), or NaN where a neighbour is in another binade (x a power of 2). */
function spacing(x: number): number {
  F[0] = x;
  const hi = U32[HI]!;
  if ((hi & 0xfffff) === 0 && U32[1 - HI] === 0) return NaN;
  return Math.pow(2, ((hi >>> 20) & 0x7ff) - 1075);
}

/**
 * The double nearest to W / P, W = w * 10^n + extra (an integer below 2^63; n <= 3), P = 10^s (s <= 22, exact),
 * or NaN where this cannot prove it (the caller then uses Number()). A candidate x from double arithmetic is
 * tested by its residual R = W - x * P, computed exactly but for one rounding: W and x * P as sums of two
 * doubles (Dekker's exact product), their high parts within a factor of 2 of each other (so their difference is
 * exact, Sterbenz 1974), the small terms integers or multiples of the same power of two. x is the nearest double
 * when |R| < U / 2 with U = ulp(x) * P; when |R| > U / 2 it moves one ulp towards W / P and is tested again. A
 * residual within the rounding error of U / 2 (a near tie), a candidate that is a power of 2 (its interval is not
 * symmetric), or more than 3 moves: NaN.
 */
function divideExactly(w: number, n: number, extra: number, P: number): number {
  const m = POW10[n]!;
  const t1 = w * m;
  const t2 = productError(w, m, t1); // w * m = t1 + t2 exactly: an integer below 2^63
  let x = t1 / P + (t2 + extra) / P;
  for (let step = 0; step < 3; step++) {
    const u = spacing(x);
    if (u !== u) return NaN;
    const p1 = x * P;
    const p2 = productError(x, P, p1);
    const r = t1 - p1 + t2 + extra - p2; // t1 - p1 exact; the integer terms exact; one rounding on p2
    const half = (u * P) / 2;
    const err = Math.abs(r) * 2.3e-16;
    const a = Math.abs(r);
    if (a + err < half) return x;
    if (a - err <= half) return NaN;
    x = r > 0 ? x + u : x - u;
  }
  return NaN;
}

/** A growing byte buffer written from the front, handed out as a copy of its own (transferable). */
export class ByteSink {
  buf: Uint8Array;
  len = 0;
  constructor(capacity: number) {
    this.buf = new Uint8Array(Math.max(64, capacity));
  }

  /** Room for n more bytes. */
  room(n: number): void {
    if (this.len + n <= this.buf.length) return;
    const next = new Uint8Array(Math.max(this.buf.length * 2, this.len + n));
    next.set(this.buf.subarray(0, this.len));
    this.buf = next;
  }

  /** Bytes [p, end) of `src`. */
  copy(src: Uint8Array, p: number, end: number): void {
    const n = end - p;
    this.room(n);
    const buf = this.buf;
    let o = this.len;
    if (n < 48) for (let i = p; i < end; i++) buf[o++] = src[i]!;
    else buf.set(src.subarray(p, end), o);
    this.len += n;
  }

  byte(c: number): void {
    this.room(1);
    this.buf[this.len++] = c;
  }

  /** An ASCII string, code unit by code unit (callers pass only ASCII). */
  ascii(s: string): void {
    const n = s.length;
    this.room(n);
    const buf = this.buf;
    let o = this.len;
    for (let i = 0; i < n; i++) buf[o++] = s.charCodeAt(i);
    this.len = o;
  }

  /** The bytes of shortest(v). */
  number(v: number): void {
    if (v === (v | 0) && (v !== 0 || 1 / v > 0)) {
      // a whole number in int32 range other than -0: its digits are its shortest form
      this.room(11);
      const buf = this.buf;
      let n = v;
      if (n < 0) {
        buf[this.len++] = 45;
        n = -n; // -2^31 negates to 2^31, still exact as a double
      }
      let digits = 1;
      for (let t = n; t >= 10; t = Math.floor(t / 10)) digits++;
      let o = this.len + digits;
      this.len = o;
      do {
        const q = Math.floor(n / 10);
        buf[--o] = 48 + (n - q * 10);
        n = q;
      } while (n > 0);
      return;
    }
    this.ascii(shortest(v));
  }

  /** A copy of what was written, with a buffer of its own. */
  take(): Uint8Array {
    return this.buf.slice(0, this.len);
  }
}
