// The codec module of the harness: decimal text to doubles and doubles to shortest decimal text, on bytes in
// this module's own memory, for `areal eval` (harness/core/codec.ts loads it). Not a kernel module: it is not
// in the ABI table and the kernel module does not contain it. No imports, no allocation: the host grows the
// memory and places the bytes; these functions read and write the addresses they are given.
//
// format (Schubfach: Giulietti 2020, "The Schubfach way to render doubles"; the Java reference
// implementation's structure, its constants recalled from memory and checked by tests/codec.test.ts):
//   1. split the double into c * 2^q (c < 2^53); zero, the infinities and NaN are written as their words;
//   2. an integer below 2^53 is its own shortest digits;
//   3. otherwise k = floor(log10(2^q)) (of 3/4 2^q at a binade's bottom, where the lower gap is half), and the
//      bounds of the rounding interval, scaled by 10^-k, are computed with the 126-bit g(k) (codec/tables.ts)
//      and rounded to odd, so that comparisons with decimals are exact;
//   4. the interval holds at most one multiple of 10 of the scaled value: when it holds one, that is the
//      shortest; else the shortest has the length of s = floor(scaled value) and is s or s + 1, the closer
//      (the even at a tie), or the one of them inside the interval (ends inside when c is even: round-half-even);
//   5. the digits are laid out by ECMA-262 Number::toString: fixed form for 1e-7 < |x| < 1e21, else exponent.
//   Unlike Java's Double.toString, a one-digit shortest is kept (Java asks for two digits): the s >= 100 test
//   of the reference is s >= 10 here, and subnormals below 3 * 2^-1074 are not scaled by ten. Every double has
//   an answer: there is no undecided case.
//
// parse (Eisel-Lemire: Lemire 2021, "Number parsing at a gigabyte per second", Algorithm 1 and section 5):
//   1. read [+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)? into w (the first 19 significant digits) and q (w * 10^q);
//   2. Clinger's fast path (Clinger 1990): w <= 2^53 and |q| <= 22: one exact operation, correctly rounded;
//   3. else w normalised times the 128 leading bits of 5^q (codec/tables.ts), a second product when the first
//      leaves the result undecided; the 54 leading bits and the exponent floor(q log2 10) give the double,
//      ties to even decided on the exact product where q is in [-4, 23];
//   4. more than 19 significant digits: w and w + 1 are both converted; they must agree;
//   5. anything it cannot prove (an undecided product, w and w + 1 giving different doubles) answers
//      PARSE_UNSURE, and the host uses Number(); the count of those is kept (parse_unsure_count). Zero from
//      non-zero digits and infinity also answer PARSE_UNSURE: the host names them as lost values.

import { G, G_K_MIN, POW5, POW5_Q_MIN, POW5_Q_MAX } from "./tables";

// ---- shared ---------------------------------------------------------------------------------------------

/** The parsed value (parse) lives here; the host reads it at parse_value_ptr(). */
const VALUE: usize = memory.data(8, 8);
/** Digits of one number, written backwards from the end (format). */
const DIGITS: usize = memory.data(40, 8);
const DIGITS_END: usize = DIGITS + 32; // 8 bytes after it for copyOver's reads

/** "00" "01" ... "99": the two digits of each number below 100. */
const PAIRS: usize = memory.data<u8>([
  48,48,48,49,48,50,48,51,48,52,48,53,48,54,48,55,48,56,48,57,49,48,49,49,49,50,49,51,49,52,49,53,49,54,49,55,49,56,49,57,
  50,48,50,49,50,50,50,51,50,52,50,53,50,54,50,55,50,56,50,57,51,48,51,49,51,50,51,51,51,52,51,53,51,54,51,55,51,56,51,57,
  52,48,52,49,52,50,52,51,52,52,52,53,52,54,52,55,52,56,52,57,53,48,53,49,53,50,53,51,53,52,53,53,53,54,53,55,53,56,53,57,
  54,48,54,49,54,50,54,51,54,52,54,53,54,54,54,55,54,56,54,57,55,48,55,49,55,50,55,51,55,52,55,53,55,54,55,55,55,56,55,57,
  56,48,56,49,56,50,56,51,56,52,56,53,56,54,56,55,56,56,56,57,57,48,57,49,57,50,57,51,57,52,57,53,57,54,57,55,57,56,57,57,
]);

/** How many parses answered PARSE_UNSURE for want of a proof (not counting zero and infinity). */
let unsure: i32 = 0;

/** The high 64 bits of the 128-bit product a * b (four 32-bit products: WebAssembly has no 64x64->128). */
// @ts-ignore: decorator
@inline function mulHi(a: u64, b: u64): u64 {
  const a0 = a & 0xffffffff;
  const a1 = a >> 32;
  const b0 = b & 0xffffffff;
  const b1 = b >> 32;
  const p00 = a0 * b0;
  const p01 = a0 * b1;
  const p10 = a1 * b0;
  const p11 = a1 * b1;
  const mid = (p00 >> 32) + (p01 & 0xffffffff) + (p10 & 0xffffffff);
  return p11 + (p01 >> 32) + (p10 >> 32) + (mid >> 32);
}

/** Where the first free byte of this module's memory is (the host places its buffers from there). */
export function codec_heap(): usize {
  return (__heap_base + 15) & ~15;
}

export function parse_value_ptr(): usize {
  return VALUE;
}

export function parse_unsure_count(): i32 {
  return unsure;
}

// ---- format ---------------------------------------------------------------------------------------------

const C_MIN: u64 = 1 << 52;
const Q_MIN: i32 = -1074;
const MASK63: u64 = 0x7fffffffffffffff;
/** Limit of the fixed form: ECMA-262 writes x in fixed notation when its decimal exponent n is <= 21. */
const FIXED_MAX: i32 = 21;
/** Lower limit of the fixed form: n > -6 (|x| >= 1e-6 or so). */
const FIXED_MIN: i32 = -6;

// floor(q log10 2), floor(q log10 2 + log10 3/4), floor(e log2 10): Giulietti's integer approximations
// (recalled from memory; tests/codec.test.ts checks them against BigInt over the whole range used).
// @ts-ignore: decorator
@inline function flog10pow2(q: i32): i32 {
  return <i32>((<i64>q * 661971961083) >> 41);
}
// @ts-ignore: decorator
@inline function flog10threeQuartersPow2(q: i32): i32 {
  return <i32>((<i64>q * 661971961083 - 274743187321) >> 41);
}
// @ts-ignore: decorator
@inline function flog2pow10(e: i32): i32 {
  return <i32>((<i64>e * 913124641741) >> 38);
}

/** g * cp / 2^127, rounded to odd (Giulietti's rop): exact enough to compare with 4 * a decimal. */
// @ts-ignore: decorator
@inline function rop(g1: u64, g0: u64, cp: u64): u64 {
  const x1 = mulHi(g0, cp);
  const y0 = g1 * cp;
  const y1 = mulHi(g1, cp);
  const z = (y0 >> 1) + x1;
  const vbp = y1 + (z >> 63);
  return vbp | (((z & MASK63) + MASK63) >> 63);
}

/** Write `s` of len bytes at dst; returns the end. */
// @ts-ignore: decorator
@inline function word(dst: usize, a: u64, len: i32): usize {
  // a holds up to 8 ASCII bytes, first byte lowest
  for (let i = 0; i < len; i++) store<u8>(dst + i, <u8>(a >> (i * 8)));
  return dst + len;
}

/** The digit count of the last writeDigits. */
let digitCount: i32 = 0;
/** The digits of f (1 <= f < 10^17) ending at DIGITS_END; returns where they start (digitCount: how many). */
function writeDigits(f: u64): usize {
  let p = DIGITS_END;
  // two u32 halves: hi = f / 10^8 (< 10^9), lo = f mod 10^8; two digits a step (PAIRS)
  const hi = <u32>(f / 100000000);
  let lo = <u32>(f - <u64>hi * 100000000);
  if (hi !== 0) {
    for (let i = 0; i < 4; i++) {
      const q = lo / 100;
      p -= 2;
      store<u16>(p, load<u16>(PAIRS + ((lo - q * 100) << 1)));
      lo = q;
    }
    lo = hi;
  }
  while (lo >= 100) {
    const q = lo / 100;
    p -= 2;
    store<u16>(p, load<u16>(PAIRS + ((lo - q * 100) << 1)));
    lo = q;
  }
  if (lo >= 10) {
    p -= 2;
    store<u16>(p, load<u16>(PAIRS + (lo << 1)));
  } else store<u8>(--p, <u8>(48 + lo));
  digitCount = <i32>(DIGITS_END - p);
  return p;
}

/**
 * The decimal f * 10^e (f >= 1) as ECMA-262 Number::toString writes it, at dst; returns the end. Trailing
 * zeros of f are dropped first (ECMA-262's k is the digit count without them).
 */
function layOut(dst: usize, f: u64, e: i32): usize {
  const first = writeDigits(f);
  let len = digitCount;
  while (load<u8>(first + len - 1) === 48) {
    len--;
    e++;
  }
  const n = e + len; // x = 0.d1 d2 ... d_len * 10^n
  if (len <= n && n <= FIXED_MAX) {
    copyOver(dst, first, len);
    dst += len;
    for (let i = len; i < n; i++) store<u8>(dst++, 48);
    return dst;
  }
  if (0 < n && n <= FIXED_MAX) {
    copyOver(dst, first, n);
    store<u8>(dst + n, 46);
    copyOver(dst + n + 1, first + n, len - n);
    return dst + len + 1;
  }
  if (FIXED_MIN < n && n <= 0) {
    store<u8>(dst++, 48);
    store<u8>(dst++, 46);
    for (let i = n; i < 0; i++) store<u8>(dst++, 48);
    copyOver(dst, first, len);
    return dst + len;
  }
  store<u8>(dst++, load<u8>(first));
  if (len > 1) {
    store<u8>(dst++, 46);
    copyOver(dst, first + 1, len - 1);
    dst += len - 1;
  }
  store<u8>(dst++, 101);
  let x = n - 1;
  store<u8>(dst++, x < 0 ? 45 : 43);
  if (x < 0) x = -x;
  if (x >= 100) {
    store<u8>(dst++, <u8>(48 + x / 100));
    x %= 100;
    store<u8>(dst++, <u8>(48 + x / 10));
  } else if (x >= 10) store<u8>(dst++, <u8>(48 + x / 10));
  store<u8>(dst++, <u8>(48 + (x % 10)));
  return dst;
}

/** Schubfach for c * 2^q (c >= 1 not a power-of-two-with-smaller-gap unless flagged), written at dst. */
function schubfach(dst: usize, q: i32, c: u64): usize {
  const out: u64 = c & 1;
  const cb = c << 2;
  const cbr = cb + 2;
  let cbl: u64;
  let k: i32;
  if (c !== C_MIN || q === Q_MIN) {
    cbl = cb - 2;
    k = flog10pow2(q);
  } else {
    cbl = cb - 1;
    k = flog10threeQuartersPow2(q);
  }
  const h = q + flog2pow10(-k) + 2;
  const gi = (k - G_K_MIN) << 1;
  const g1 = unchecked(G[gi]);
  const g0 = unchecked(G[gi + 1]);
  const vb = rop(g1, g0, cb << h);
  const vbl = rop(g1, g0, cbl << h);
  const vbr = rop(g1, g0, cbr << h);
  const s = vb >> 2;
  if (s >= 10) {
    const sp10 = 10 * mulHi(s, <u64>115292150460684698 << 4);
    const tp10 = sp10 + 10;
    const upin = vbl + out <= sp10 << 2;
    const wpin = (tp10 << 2) + out <= vbr;
    if (upin !== wpin) return layOut(dst, upin ? sp10 : tp10, k);
  }
  const t = s + 1;
  const uin = vbl + out <= s << 2;
  const win = (t << 2) + out <= vbr;
  if (uin !== win) return layOut(dst, uin ? s : t, k);
  const cmp = <i64>vb - <i64>((s + t) << 1);
  return layOut(dst, cmp < 0 || (cmp === 0 && (s & 1) === 0) ? s : t, k);
}

/** The bytes of String(x) at dst (but "-0" for negative zero, as the harness's shortest() writes); returns the end. */
export function format(x: f64, dst: usize): usize {
  if (x !== x) return word(dst, 0x4e614e, 3); // "NaN", whatever its sign bit
  const bits = reinterpret<u64>(x);
  if (<i64>bits < 0) store<u8>(dst++, 45);
  const t = bits & 0xfffffffffffff;
  const bq = <i32>(bits >> 52) & 0x7ff;
  if (bq === 0x7ff) return word(dst, 0x7974696e69666e49, 8); // "Infinity"
  if (bq !== 0) {
    const mq = 1075 - bq; // -q
    const c = C_MIN | t;
    if (0 < mq && mq < 53) {
      const f = c >> mq;
      if (f << mq === c) return layOut(dst, f, 0);
    }
    return schubfach(dst, -mq, c);
  }
  if (t === 0) {
    store<u8>(dst, 48);
    return dst + 1;
  }
  return schubfach(dst, Q_MIN, t);
}

// ---- parse ----------------------------------------------------------------------------------------------

/** parse: the value is at parse_value_ptr(). */
export const PARSE_OK: i32 = 0;
/** parse: not of the decimal form (the host reads it as text: nan, inf, a hex pattern, or an error). */
export const PARSE_NOT_DECIMAL: i32 = -1;
/** parse: a decimal this code does not convert (the host uses Number()). */
export const PARSE_UNSURE: i32 = -2;

/** Significant digits held in w: 19 (10^19 - 1 < 2^64). */
const W_DIGITS: i32 = 19;
/** Exponent digits read before the exponent is only clamped (1e99999 and 1e9999999 are both out of range). */
const EXP_CLAMP: i32 = 100000;
const CLINGER_W_MAX: u64 = 1 << 53;
const CLINGER_Q_MAX: i32 = 22;
const POW10_EXACT: StaticArray<f64> = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];
/** Eisel-Lemire's window of exact ties: q in [-4, 23] (5^23 < 2^64 ... Lemire 2021, section 6). */
const TIE_Q_MIN: i32 = -4;
const TIE_Q_MAX: i32 = 23;
/** 5^q is exact in the table's 128 bits for q in [0, 55] (and rounded up for q in [-27, -1]): Lemire 2021. */
const EXACT_Q_MIN: i32 = -27;
const EXACT_Q_MAX: i32 = 55;
/** A result that parse cannot prove (Eisel-Lemire's -1). */
const NO_BITS: u64 = 0xffffffffffffffff;

/**
 * The bits of the double nearest w * 10^q (w != 0, w < 2^64, q in the table's range), or NO_BITS where it
 * cannot prove them; an infinite result is the bits of infinity, a result that underflows 0.
 */
function eiselLemire(w: u64, q: i32): u64 {
  const lz = <i32>clz(w);
  w <<= lz;
  const idx = (q - POW5_Q_MIN) << 1;
  const p1 = unchecked(POW5[idx]);
  let hi = mulHi(w, p1);
  let lo = w * p1;
  const PRECISION_MASK: u64 = 0x1ff; // the bits below the 55 that are kept (52 + 3)
  if ((hi & PRECISION_MASK) === PRECISION_MASK) {
    const p0 = unchecked(POW5[idx + 1]);
    const second = mulHi(w, p0);
    const nlo = lo + second;
    if (nlo < lo) hi++;
    lo = nlo;
  }
  // Lemire's test of an undecided product: all ones below, where 5^q is not exact in 128 bits
  if (lo === 0xffffffffffffffff && (q < EXACT_Q_MIN || q > EXACT_Q_MAX)) return NO_BITS;
  const upperbit = <i32>(hi >> 63);
  let m = hi >> (upperbit + 9);
  let power2 = (((217706 * q) >> 16) + 63) + upperbit - lz + 1023; // floor(q log2 10) + 63 ...
  if (power2 <= 0) {
    // a subnormal (or zero): no exact tie is possible this far from q = 0 (Lemire 2021); round half up
    if (1 - power2 >= 64) return 0;
    m >>= <u64>(1 - power2);
    m += m & 1;
    m >>= 1;
    return m; // m = 2^52 after rounding is the smallest normal's bits, as wanted
  }
  if (lo <= 1 && q >= TIE_Q_MIN && q <= TIE_Q_MAX && (m & 3) === 1) {
    if (m << (upperbit + 9) === hi) m &= ~(<u64>1); // an exact tie: round to even
  }
  m += m & 1;
  m >>= 1;
  if (m >= (<u64>2 << 52)) {
    m = <u64>1 << 52;
    power2++;
  }
  m &= ~(<u64>1 << 52);
  if (power2 >= 0x7ff) return <u64>0x7ff << 52;
  return (<u64>power2 << 52) | m;
}

/**
 * Read bytes [p, end) as a decimal [+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?: PARSE_OK with the value at
 * parse_value_ptr(), PARSE_NOT_DECIMAL, or PARSE_UNSURE (also for a value that under- or overflows).
 */
export function parse(p: usize, end: usize): i32 {
  let neg = false;
  let c: i32 = p < end ? <i32>load<u8>(p) : 0;
  if (c === 43 || c === 45) {
    neg = c === 45;
    p++;
  }
  let w: u64 = 0;
  let nd: i32 = 0; // significant digits in w
  let digits: i32 = 0; // all digits
  let scale: i32 = 0;
  let dropped = false; // a non-zero digit beyond W_DIGITS
  for (; p < end; p++) {
    c = <i32>load<u8>(p) - 48;
    if (<u32>c > 9) break;
    digits++;
    if (nd < W_DIGITS) {
      w = w * 10 + <u64>c;
      if (w !== 0) nd++;
    } else {
      scale++;
      if (c !== 0) dropped = true;
    }
  }
  if (p < end && load<u8>(p) === 46) {
    for (p++; p < end; p++) {
      c = <i32>load<u8>(p) - 48;
      if (<u32>c > 9) break;
      digits++;
      if (nd < W_DIGITS) {
        w = w * 10 + <u64>c;
        if (w !== 0) nd++;
        scale--;
      } else if (c !== 0) dropped = true;
    }
  }
  if (digits === 0) return PARSE_NOT_DECIMAL;
  if (p < end) {
    c = <i32>load<u8>(p);
    if (c !== 101 && c !== 69) return PARSE_NOT_DECIMAL;
    p++;
    let eneg = false;
    c = p < end ? <i32>load<u8>(p) : 0;
    if (c === 43 || c === 45) {
      eneg = c === 45;
      p++;
    }
    let e: i32 = 0;
    let ed: i32 = 0;
    for (; p < end; p++) {
      c = <i32>load<u8>(p) - 48;
      if (<u32>c > 9) return PARSE_NOT_DECIMAL;
      ed++;
      if (e < EXP_CLAMP) e = e * 10 + c;
    }
    if (ed === 0) return PARSE_NOT_DECIMAL;
    scale += eneg ? -e : e;
  }
  if (w === 0) {
    store<f64>(VALUE, neg ? -0.0 : 0.0);
    return PARSE_OK;
  }
  let v: f64;
  if (!dropped && w <= CLINGER_W_MAX && scale >= -CLINGER_Q_MAX && scale <= CLINGER_Q_MAX) {
    v = <f64>w;
    v = scale >= 0 ? v * unchecked(POW10_EXACT[scale]) : v / unchecked(POW10_EXACT[-scale]);
  } else {
    if (scale < POW5_Q_MIN || scale > POW5_Q_MAX) return PARSE_UNSURE; // 0 or infinity: the host names it
    let bits = eiselLemire(w, scale);
    if (bits !== NO_BITS && dropped) {
      // the digits kept are a lower bound; w + 1 an upper bound (w + 1 <= 10^19 < 2^64)
      if (eiselLemire(w + 1, scale) !== bits) bits = NO_BITS;
    }
    if (bits === NO_BITS) {
      unsure++;
      return PARSE_UNSURE;
    }
    if (bits === <u64>0x7ff << 52 || bits === 0) return PARSE_UNSURE; // infinity or 0: the host names the loss
    v = reinterpret<f64>(bits);
  }
  store<f64>(VALUE, neg ? -v : v);
  return PARSE_OK;
}

// ---- rows of a CSV chunk ----------------------------------------------------------------------------------

/** scan: a line the host reads itself (space around a cell, a byte beyond ASCII, a blank line). */
export const LINE_SLOW: i32 = 1;
/** scan: a line cut at its commas whose cells the host reads itself (a word, a decimal parse left undecided). */
export const LINE_CELLS: i32 = 2;
/** scan's answer when the whole run must go through the host's string path (a line too long, a wrong width). */
export const SCAN_FALL_BACK: i32 = -1;
/** An argument taken from the host's default (scan's cols). */
export const COL_DEFAULT: i32 = -1;
/** An argument the host reads (an enumeration's word). */
export const COL_HOST: i32 = -2;

/** The count of LF bytes in [p, p + len): eight bytes at a time (an exact zero-byte test of x ^ 0x0a..0a, then popcnt). */
export function count_lf(p: usize, len: i32): i32 {
  let n: i32 = 0;
  const end = p + <usize>len;
  const LF8: u64 = 0x0a0a0a0a0a0a0a0a;
  const LOW7: u64 = 0x7f7f7f7f7f7f7f7f;
  for (; p + 8 <= end; p += 8) {
    const y = load<u64>(p) ^ LF8;
    const zero = ~(((y & LOW7) + LOW7) | y | LOW7); // the high bit of each byte of y that is zero
    n += <i32>popcnt(zero);
  }
  for (; p < end; p++) if (load<u8>(p) === 10) n++;
  return n;
}

/** Copy n bytes from src to dst eight at a time: may write up to 7 bytes past dst + n and read past src + n (callers leave that room). */
// @ts-ignore: decorator
@inline function copyOver(dst: usize, src: usize, n: usize): void {
  for (let i: usize = 0; i < n; i += 8) store<u64>(dst + i, load<u64>(src + i));
}

/** A byte trim() certainly keeps at a cell's end: printable ASCII (evaluate.ts keptByTrim). */
// @ts-ignore: decorator
@inline function kept(c: u32): bool {
  return c > 32 && c < 127;
}

/**
 * The lines of bytes [inp, inp + len) (a chunk of a CSV after its header) as records of three i32 at recs:
 * start, end (offsets from inp; end before a CR that precedes the LF), flag (0: every argument read; LINE_SLOW;
 * LINE_CELLS), and, for flag 0, the na arguments of the record at args + 8 * na * record: from column cols[i],
 * or defaults[i] (cols[i] = COL_DEFAULT). Comment lines ('#' first) have no record. Returns the record count, or
 * SCAN_FALL_BACK for a line longer than maxLine or a line of plain cells that are not `width` (evaluate.ts
 * evaluateBytes has the same rules, written in TypeScript for the lines it reads).
 */
export function scan(inp: usize, len: i32, width: i32, na: i32, cols: usize, defaults: usize, recs: usize, args: usize, cs: usize, maxLine: i32): i32 {
  let recsN = 0;
  let pos: i32 = 0;
  while (pos < len) {
    // One pass over the line: its LF, its commas (each with a byte trim() keeps on both sides), any byte beyond ASCII.
    const start = pos;
    let flag = 0;
    let n = 0;
    store<i32>(cs, start);
    let lf = pos;
    for (; lf < len; lf++) {
      const c = <u32>load<u8>(inp + lf);
      if (c === 10) break;
      if (c === 44) {
        if (++n >= width || lf === start || !kept(load<u8>(inp + lf - 1)) || lf + 1 >= len || !kept(load<u8>(inp + lf + 1))) flag = LINE_SLOW;
        else store<i32>(cs + (<usize>n << 2), lf + 1);
      } else if (c >= 128) flag = LINE_SLOW;
    }
    const end = lf < len && lf > pos && load<u8>(inp + lf - 1) === 13 ? lf - 1 : lf;
    pos = lf + 1;
    if (end - start > maxLine) return SCAN_FALL_BACK;
    if (end > start && load<u8>(inp + start) === 35) continue; // '#': a comment
    if (end === start || !kept(load<u8>(inp + start)) || !kept(load<u8>(inp + end - 1))) flag = LINE_SLOW;
    if (flag === 0) {
      if (n + 1 !== width) return SCAN_FALL_BACK;
      store<i32>(cs + (<usize>width << 2), end + 1);
      const at = args + ((<usize>recsN * <usize>na) << 3);
      for (let i = 0; i < na; i++) {
        const col = load<i32>(cols + (<usize>i << 2));
        if (col === COL_DEFAULT) {
          store<f64>(at + (<usize>i << 3), load<f64>(defaults + (<usize>i << 3)));
          continue;
        }
        if (col === COL_HOST) {
          flag = LINE_CELLS;
          break;
        }
        const a = load<i32>(cs + (<usize>col << 2));
        const b = load<i32>(cs + (<usize>(col + 1) << 2)) - 1;
        if (parse(inp + a, inp + b) !== PARSE_OK) {
          flag = LINE_CELLS;
          break;
        }
        store<f64>(at + (<usize>i << 3), load<f64>(VALUE));
      }
    }
    const r = recs + <usize>recsN * 12;
    store<i32>(r, start);
    store<i32>(r, end, 4);
    store<i32>(r, flag, 8);
    recsN++;
  }
  return recsN;
}

/**
 * The output of `rows` rows at dst; returns the end. Row r is the bytes [start, end) of its record (offsets
 * from inp), then its values (n f64 at vals + 8 * n * r) as format_rows writes them when its status entry is
 * ok, else ",NaN" n times and ",", then its status text. Status entries: st[r] (u8) indexes 64-byte entries at
 * table: byte 0 is 1 for an ok status, byte 1 the text's length (the word and LF), then the text.
 */
export function assemble(inp: usize, rows: i32, recs: usize, n: i32, vals: usize, st: usize, table: usize, dst: usize): usize {
  for (let r = 0; r < rows; r++) {
    const rec = recs + <usize>r * 12;
    const a = load<i32>(rec);
    const len = load<i32>(rec, 4) - a;
    copyOver(dst, inp + <usize>a, <usize>len);
    dst += <usize>len;
    const entry = table + (<usize>load<u8>(st + <usize>r) << 6);
    if (load<u8>(entry) !== 0) {
      const v = vals + ((<usize>r * <usize>n) << 3);
      for (let i = 0; i < n; i++) {
        store<u8>(dst++, 44);
        dst = format(load<f64>(v + (<usize>i << 3)), dst);
      }
    } else {
      for (let i = 0; i < n; i++) dst = word(dst, 0x4e614e2c, 4); // ",NaN"
    }
    store<u8>(dst++, 44);
    const tl = <usize>load<u8>(entry, 1);
    copyOver(dst, entry + 2, tl);
    dst += tl;
  }
  return dst;
}
