/**
 * The codec module (codec/index.ts, harness/core/codec.ts) against the JavaScript engine: format gives the bytes
 * of String(x) (ECMA-262 Number::toString; "-0" for negative zero, as float.ts shortest) and parse the double of
 * Number(s) (ECMA-262 StringToNumber, correctly rounded), on a seeded slice of every kind of double and decimal.
 * The long run of the same checks is `npm run test:codec-long` (scripts/codec-long.mjs). The tables
 * (codec/tables.ts) are checked against their definitions with BigInt, and Schubfach's integer logarithms
 * against exact BigInt comparisons.
 */
import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { codec, PARSE_OK, PARSE_NOT_DECIMAL, PARSE_UNSURE } from "../harness/core/codec.js";
import { shortest } from "../harness/core/float.js";
import { Rng } from "../harness/core/rng.js";
import { doublesOfEveryKind, decimalsOfEveryKind, significantDigits } from "../harness/verify/codec-cases.js";

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

describe("codec format", () => {
  it("writes the bytes of String() for about 300,000 doubles of every kind (random bits, integers, powers of 10 and 2, subnormals, the 1e21 and 1e-7 edges, 17-digit values)", () => {
    const cd = codec();
    let n = 0;
    const bad: string[] = [];
    for (const x of doublesOfEveryKind(new Rng(20261205), 40000)) {
      n++;
      const got = cd.formatOne(x);
      if (got !== shortest(x) && bad.length < 5) bad.push(`${shortest(x)} written as ${got}`);
    }
    expect(bad).toEqual([]);
    expect(n).toBeGreaterThan(250000);
  });
});

describe("codec parse", () => {
  it("gives the double of Number() for about 300,000 decimals of every kind, deciding every one of up to 19 significant digits", () => {
    const cd = codec();
    let n = 0;
    let unsureShort = 0;
    let unsureLong = 0;
    const bad: string[] = [];
    for (const s of decimalsOfEveryKind(new Rng(20261206), 30000)) {
      n++;
      const [code, v] = cd.parseText(s);
      const x = Number(s);
      if (code === PARSE_OK) {
        if (!Object.is(v, x) && bad.length < 5) bad.push(`${s}: ${v}, Number() ${x}`);
      } else if (code === PARSE_NOT_DECIMAL) {
        if (DECIMAL.test(s) && bad.length < 5) bad.push(`${s}: not a decimal?`);
      } else {
        expect(code).toBe(PARSE_UNSURE);
        const lost = x === 0 || !Number.isFinite(x); // the host names these as lost values
        if (!lost) {
          if (significantDigits(s) <= 19) unsureShort++;
          else unsureLong++;
        }
      }
    }
    expect(bad).toEqual([]);
    expect(unsureShort).toBe(0); // Eisel-Lemire decides every decimal of up to 19 digits
    // longer ones only where the first 19 digits and one more straddle a rounding boundary: the exact midpoints
    // between doubles and their neighbours (2 of the 9 kinds), and about 1 in 200 of the other long strings
    expect(unsureLong).toBeLessThan(n / 8);
    expect(n).toBeGreaterThan(250000);
  });

  it("reads only the decimal form: words, hex patterns, spaces, empty parts are not decimals", () => {
    const cd = codec();
    for (const s of ["", "+", "-", ".", "e5", "1e", "1e+", "1.2.3", "nan", "inf", "0x3ff0000000000000", " 1", "1 ", "1,2", "--1", "1e5.5", "١"]) {
      expect(cd.parseText(s)[0], s).toBe(PARSE_NOT_DECIMAL);
    }
  });

  it("answers unsure for values that under- or overflow (the host names the loss), and reads zeros of any exponent", () => {
    const cd = codec();
    for (const s of ["1e400", "-1e400", "1e-400", "2e-324", "1e99999999"]) expect(cd.parseText(s)[0], s).toBe(PARSE_UNSURE);
    for (const s of ["0e99999999", "-0.000e-5", "0"]) {
      const [code, v] = cd.parseText(s);
      expect(code, s).toBe(PARSE_OK);
      expect(Object.is(v, Number(s)), s).toBe(true);
    }
  });
});

/** The (hi, lo) pairs of one table of codec/tables.ts, as BigInts. */
function table(name: string): bigint[] {
  const text = readFileSync(new URL("../codec/tables.ts", import.meta.url), "utf8");
  const body = text.split(`export const ${name}: StaticArray<u64> = [`)[1]!.split("];")[0]!;
  return [...body.matchAll(/0x([0-9a-f]{16})/g)].map((m) => BigInt("0x" + m[1]));
}
const bitLength = (n: bigint): number => n.toString(2).length;

describe("codec tables (codec/tables.ts) against their definitions", () => {
  it("G: 2^125 <= g < 2^126 and (g - 1) 2^r <= 10^-k < g 2^r, r = floor(log2 10^-k) - 125, for every k in [-324, 292] (Giulietti 2020, section 9)", () => {
    const g = table("G");
    expect(g.length).toBe(2 * (292 + 324 + 1));
    for (let k = -324; k <= 292; k++) {
      const i = 2 * (k + 324);
      expect(g[i + 1]! < 1n << 63n).toBe(true);
      const v = (g[i]! << 63n) + g[i + 1]!;
      expect(bitLength(v), `k = ${k}`).toBe(126);
      // 10^-k = N / D; floor(log2 10^-k) exactly; 2^r = A / B
      const N = k <= 0 ? 10n ** BigInt(-k) : 1n;
      const D = k <= 0 ? 1n : 10n ** BigInt(k);
      const lg = k <= 0 ? bitLength(N) - 1 : -bitLength(D); // 10^k (k > 0) is not a power of 2
      const r = BigInt(lg - 125);
      const A = r >= 0n ? 1n << r : 1n;
      const B = r >= 0n ? 1n : 1n << -r;
      expect((v - 1n) * A * D <= N * B && N * B < v * A * D, `k = ${k}`).toBe(true);
    }
  });

  it("POW5: the 128 leading bits of 5^q, truncated for q >= 0, within one unit above for q < 0 (Lemire 2021, section 5)", () => {
    const p = table("POW5");
    expect(p.length).toBe(2 * (308 + 342 + 1));
    for (let q = -342; q <= 308; q++) {
      const i = 2 * (q + 342);
      const v = (p[i]! << 64n) + p[i + 1]!;
      expect(bitLength(v), `q = ${q}`).toBe(128);
      if (q >= 0) {
        const x = 5n ** BigInt(q);
        const s = bitLength(x) - 128; // v = floor(x / 2^s), or x 2^-s for s < 0
        if (s <= 0) expect(v, `q = ${q}`).toBe(x << BigInt(-s));
        else expect(v * (1n << BigInt(s)) <= x && x < (v + 1n) * (1n << BigInt(s)), `q = ${q}`).toBe(true);
      } else {
        const d = 5n ** BigInt(-q);
        // v ~ 2^b / 5^-q with b = 127 + bitLength(5^-q), which puts the quotient in (2^127, 2^128)
        const exact = (1n << BigInt(127 + bitLength(d))) / d; // floor
        expect(v === exact || v === exact + 1n, `q = ${q}`).toBe(true);
        if (q >= -27) expect(v, `q = ${q}`).toBe(exact + 1n); // rounded up where 5^-q < 2^64
      }
    }
  });

  it("is what the generator writes (scripts/gen-codec-tables.mjs --check)", async () => {
    const { render } = await import("../scripts/gen-codec-tables.mjs");
    expect(render()).toBe(readFileSync(new URL("../codec/tables.ts", import.meta.url), "utf8"));
  });

  it("Schubfach's integer logarithms (constants in codec/index.ts, recalled from memory) are exact over the range used", () => {
    const src = readFileSync(new URL("../codec/index.ts", import.meta.url), "utf8");
    const c = (re: RegExp): bigint => BigInt(re.exec(src)![1]!);
    const m10 = c(/<i64>q \* (\d+)\) >> 41/);
    const m34 = c(/<i64>q \* \d+ - (\d+)\) >> 41/);
    const m2 = c(/<i64>e \* (\d+)\) >> 38/);
    const floorDiv = (a: bigint, s: bigint): bigint => a >> s; // BigInt >> is a floor for negatives too
    for (let q = -1100; q <= 1100; q++) {
      const Q = BigInt(q);
      // floor(q log10 2) = the largest m with 10^m <= 2^q
      const want10 = (m: bigint): boolean => (m >= 0n ? (q >= 0 ? 10n ** m <= 1n << Q : false) : q >= 0 ? true : 1n << -Q <= 10n ** -m);
      const f10 = floorDiv(Q * m10, 41n);
      expect(want10(f10) && !want10(f10 + 1n), `flog10pow2(${q})`).toBe(true);
      // floor(q log10 2 + log10(3/4)): the largest m with 4 10^m <= 3 2^q
      const want34 = (m: bigint): boolean => {
        const [a, b] = [m >= 0n ? 4n * 10n ** m : 4n, m >= 0n ? 1n : 10n ** -m]; // 4 10^m = a / b
        const [x, y] = [Q >= 0n ? 3n << Q : 3n, Q >= 0n ? 1n : 1n << -Q]; // 3 2^q = x / y
        return a * y <= x * b;
      };
      const f34 = floorDiv(Q * m10 - m34, 41n);
      expect(want34(f34) && !want34(f34 + 1n), `flog10threeQuartersPow2(${q})`).toBe(true);
      if (q >= -400 && q <= 400) {
        // floor(e log2 10) = the largest m with 2^m <= 10^e
        const want2 = (m: bigint): boolean => {
          const [a, b] = [m >= 0n ? 1n << m : 1n, m >= 0n ? 1n : 1n << -m];
          const [x, y] = [Q >= 0n ? 10n ** Q : 1n, Q >= 0n ? 1n : 10n ** -Q];
          return a * y <= x * b;
        };
        const f2 = floorDiv(Q * m2, 38n);
        expect(want2(f2) && !want2(f2 + 1n), `flog2pow10(${q})`).toBe(true);
      }
    }
  });
});
