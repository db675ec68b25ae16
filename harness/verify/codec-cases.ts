/**
 * Cases for checking the codec (core/codec.ts) against the JavaScript engine's String() and Number(): doubles
 * of every kind and decimal strings of every kind, from a seeded generator. tests/codec.test.ts runs a slice
 * in `npm test`; scripts/codec-long.mjs (`npm run test:codec-long`) runs many more.
 */
import { Rng } from "../core/rng.js";

const F = new Float64Array(1);
const U = new Uint32Array(F.buffer);
const LO = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 0 : 1; // index of the low word

/** The double with high word hi and low word lo. */
function fromWords(hi: number, lo: number): number {
  U[1 - LO] = hi >>> 0;
  U[LO] = lo >>> 0;
  return F[0]!;
}

/** The neighbours of x (the doubles one ulp below and above), for edges. */
function around(x: number): number[] {
  F[0] = x;
  const hi = U[1 - LO]!;
  const lo = U[LO]!;
  const up = lo === 0xffffffff ? fromWords(hi + 1, 0) : fromWords(hi, lo + 1);
  const down = lo === 0 ? fromWords(hi - 1, 0xffffffff) : fromWords(hi, lo - 1);
  return [down, x, up];
}

/**
 * Doubles of every kind, about 7.5 n of them (and a few thousand fixed): random bit patterns (every exponent),
 * random integers of every size, powers of ten and two and their neighbours, subnormals (the smallest ones
 * each, the others at random), the edges of the fixed form (1e21 and 1e-7, with neighbours), the largest and
 * smallest normal, random values of 17 digits, and both signs of each.
 */
export function* doublesOfEveryKind(rng: Rng, n: number): Generator<number> {
  for (const x of [0, -0, NaN, -NaN, Infinity, -Infinity, Number.MAX_VALUE, Number.MIN_VALUE, 2 ** -1022, 2 ** 53, 2 ** 53 + 2, 2 ** 63, 2 ** 64]) yield x;
  for (let e = -1074; e <= 1023; e++) for (const x of around(2 ** e)) yield x;
  for (let e = -325; e <= 308; e++) for (const x of around(Number(`1e${e}`))) yield x;
  for (const edge of [1e21, 1e-7, 1e-6, 1e20]) for (const x of around(edge)) for (const s of [x, -x]) yield s;
  for (let c = 1; c <= 3000; c++) yield fromWords(0, c); // the smallest subnormals, each
  for (let i = 0; i < n; i++) {
    yield fromWords(rng.nextU32(), rng.nextU32()); // random bits: every exponent, NaNs too
    yield fromWords(rng.nextU32() & 0x000fffff, rng.nextU32()); // a random subnormal
    const x = rng.uniform() * 2 - 1;
    yield x;
    yield Number(x.toPrecision(17)) * 10 ** Math.floor(rng.between(-30, 30));
    yield Math.floor(rng.uniform() * 2 ** Math.floor(rng.between(1, 70))); // an integer of some size
    yield -rng.logUniform(1e-300, 1e300);
    yield Number(`${Math.floor(rng.uniform() * 1e6)}e${Math.floor(rng.between(-330, 310))}`); // short digits
    if (i % 2 === 0) yield rng.uniform() * 1e-6;
  }
}

/** The count of significant digits of a decimal string (leading zeros not counted; trailing ones are). */
export function significantDigits(s: string): number {
  const m = s.replace(/^[+-]/, "").split(/[eE]/)[0]!.replace(".", "");
  return m.replace(/^0+/, "").length;
}

/** A string of n random digits. */
function digits(rng: Rng, n: number): string {
  let s = "";
  for (let i = 0; i < n; i++) s += String(rng.below(10));
  return s;
}

/** The exact decimal of the point halfway between x (positive, finite) and the next double up. */
function halfway(x: number): string {
  F[0] = x;
  const bits = (BigInt(U[1 - LO]!) << 32n) | BigInt(U[LO]!);
  const be = Number((bits >> 52n) & 0x7ffn);
  const m = (bits & ((1n << 52n) - 1n)) | (be === 0 ? 0n : 1n << 52n);
  const e = Math.max(be, 1) - 1075 - 1; // x = m 2^(e + 1); the midpoint (2m + 1) 2^e
  const odd = 2n * m + 1n;
  return e >= 0 ? (odd << BigInt(e)).toString() : `${(odd * 5n ** BigInt(-e)).toString()}e-${-e}`;
}

/**
 * Decimal strings of every kind, about 10 n: String() of random doubles (shortest), 16- and 17-digit forms,
 * exponent forms of 1 to 21 digits, fixed forms, the exact midpoints between doubles and their neighbours
 * (the ties, decided by round-half-even), long digit strings with exponents (to 40 digits), values near the
 * under- and overflow limits, and signs, leading zeros and points placed every way.
 */
export function* decimalsOfEveryKind(rng: Rng, n: number): Generator<string> {
  for (const s of ["0", "-0", "+0", "0.0", "5.", ".5", "+.5", "-.5e-3", "0e5", "9007199254740993", "9007199254740992.5", "4.9e-324", "2.4703282292062328e-324", "2.4703282292062327e-324", "1.7976931348623157e308", "1.7976931348623158e308", "1.7976931348623159e308", "2.2250738585072011e-308", "2.2250738585072012e-308", "00000000000000000000000001", "0.0000000000000000000000001"]) yield s;
  for (let i = 0; i < n; i++) {
    const x = fromWords(rng.nextU32() & 0x7fefffff, rng.nextU32()); // positive, finite
    yield String(x);
    yield x.toPrecision(17);
    yield `-${x.toPrecision(16)}`;
    yield x.toExponential(rng.below(21));
    const y = rng.uniform() * 10 ** Math.floor(rng.between(-8, 22));
    yield y.toFixed(rng.below(20));
    const h = halfway(i % 4 === 0 ? x : rng.uniform() * 10 ** Math.floor(rng.between(-20, 25)));
    yield h;
    yield h.replace(/(\d)(e|$)/, (_, d: string, e: string) => `${d}1${e}`); // just above the midpoint (one more digit)
    const nd = 1 + rng.below(40);
    const ds = digits(rng, nd);
    const dot = rng.below(nd + 1);
    yield `${ds.slice(0, dot)}.${ds.slice(dot)}e${Math.floor(rng.between(-345, 330))}`.replace(/^\.e/, "0.e");
    yield `0.${"0".repeat(rng.below(5))}${digits(rng, 1 + rng.below(19))}e${Math.floor(rng.between(-320, -300))}`; // near the subnormals
  }
}
