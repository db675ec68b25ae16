/**
 * The byte path of `areal eval` (evaluate.ts evaluateBytes, core/codec.ts) against the string functions it
 * replaces: the codec's parse gives the bits of Number() (a correctly rounded conversion, ECMA-262
 * StringToNumber) on every decimal it converts, and says "unsure" or "not a decimal" otherwise; its format writes
 * the bytes of String() (shortest round trip, ECMA-262 Number::toString); evaluateBytes gives the bytes, the
 * statuses and the messages of evaluateLines (the string path) on generated texts with every kind of line.
 * tests/codec.test.ts checks the codec on many more numbers.
 */
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { codec, PARSE_NOT_DECIMAL as NOT_DECIMAL, PARSE_UNSURE as NOT_EXACT } from "../harness/core/codec.js";
import { shortest } from "../harness/core/float.js";
import { evaluateBytes, evaluateLines, prepareEval } from "../harness/run/evaluate.js";
import { findRoutine } from "../harness/module/routines.js";
import { Rng } from "../harness/core/rng.js";
import { release } from "./helpers.js";

/** The grammar of a decimal cell (float.ts DECIMAL), written out again here. */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const enc = new TextEncoder();

function read(s: string): { code: number; v: number } {
  const [code, v] = codec().parseText(s);
  return { code, v };
}

/** Decimal strings of every shape: shortest forms, fixed and exponent forms, long digit runs, zeros. */
function decimals(n: number): string[] {
  const rng = new Rng(20261205);
  const out = ["0", "-0", "+0", "0.0", "-0.000", "5.", ".5", "+.5", "-.5e-3", "0e5", "0e99999", "1e400", "1e-400", "9007199254740993", "9007199254740992", "900719925474099.3",
    "1e22", "1e23", "1e-22", "1e-23", "123456789012345e22", "1234567890123456e-22", "00000000000000000000000001", "0.0000000000000000000000001", "1.000000000000000000000", "4.9e-324", "1.7976931348623157e308"];
  for (let i = 0; i < n; i++) {
    const x = (rng.uniform() - 0.5) * Math.pow(10, Math.floor(rng.between(-30, 30)));
    out.push(String(x), x.toPrecision(1 + (i % 21)), x.toExponential(i % 20), Math.abs(x) < 1e20 ? x.toFixed(i % 20) : String(x));
    let digits = "";
    const nd = 1 + Math.floor(rng.uniform() * 24);
    for (let d = 0; d < nd; d++) digits += String(Math.floor(rng.uniform() * 10));
    const dot = Math.floor(rng.uniform() * (nd + 1));
    out.push(`${digits.slice(0, dot)}.${digits.slice(dot)}e${Math.floor(rng.between(-40, 40))}`.replace(/^\.e/, "0.e"), digits);
  }
  return out;
}

describe("the codec's parse", () => {
  it("gives the bits of Number() on every decimal it converts, and declines only decimals (checked on about 120,000 strings)", () => {
    let converted = 0;
    for (const s of decimals(20000)) {
      const { code, v } = read(s);
      if (code === 0) {
        expect(Object.is(v, Number(s)), s).toBe(true);
        converted++;
      } else {
        expect(code, s).toBe(DECIMAL.test(s) ? NOT_EXACT : NOT_DECIMAL);
      }
    }
    expect(converted).toBeGreaterThan(30000); // the fast path is taken, not only declined
  });

  it("gives the bits of Number() on decimals of 16 to 20 digits next to the midpoints between doubles (near ties)", () => {
    const rng = new Rng(20261206);
    const f = new Float64Array(1);
    const u = new BigUint64Array(f.buffer);
    let converted = 0;
    let n = 0;
    for (let i = 0; i < 4000; i++) {
      f[0] = rng.between(1e-4, 1e3) * (i % 2 ? 1 : 1e-3);
      const bits = u[0]!;
      const E = Number((bits >> 52n) & 0x7ffn) - 1075; // x = M * 2^E
      const M = (bits & ((1n << 52n) - 1n)) | (1n << 52n);
      // the midpoint above x, (2M + 1) * 2^(E - 1), exactly in decimal: (2M + 1) * 5^(1 - E) / 10^(1 - E)
      const k = 1 - E;
      const digits = ((2n * M + 1n) * 5n ** BigInt(k)).toString();
      const point = digits.length - k; // digits before the decimal point
      for (const keep of [16, 17, 18, 19, 20]) {
        for (const bump of [-1n, 0n, 1n]) {
          const d = (BigInt(digits.slice(0, keep)) + bump).toString();
          const s = point > 0 ? `${d.slice(0, point)}.${d.slice(point)}` : `0.${"0".repeat(-point)}${d}`;
          const { code, v } = read(s);
          n++;
          if (code === 0) {
            expect(Object.is(v, Number(s)), s).toBe(true);
            converted++;
          } else expect(code, s).toBe(NOT_EXACT);
        }
      }
    }
    expect(converted).toBeGreaterThan(n / 4); // the exact path is taken, not only declined
  });

  it("declines what is not a decimal (the string path names or reads it)", () => {
    for (const s of ["", "+", "-", ".", "e5", "1e", "1e+", "--1", "1.2.3", " 1", "1 ", "nan", "inf", "0x3ff0000000000000", "1,5", "1_000", "١"]) {
      expect(read(s).code, s).toBe(NOT_DECIMAL);
    }
  });

  it("agrees with Number() on arbitrary strings of digits, points, signs and exponents (fast-check)", () => {
    const ch = fc.constantFrom(..."0123456789.+-eE".split(""), "0", "1", "9");
    fc.assert(
      fc.property(fc.array(ch, { minLength: 1, maxLength: 30 }), (cs) => {
        const s = cs.join("");
        const { code, v } = read(s);
        if (code === 0) return DECIMAL.test(s) && Object.is(v, Number(s));
        return code === (DECIMAL.test(s) ? NOT_EXACT : NOT_DECIMAL);
      }),
      { numRuns: 20000, seed: 20261205 },
    );
  });
});

describe("the codec's format", () => {
  it("writes the bytes of String() (shortest round trip; -0 as -0)", () => {
    const rng = new Rng(7);
    const xs = [0, -0, NaN, Infinity, -Infinity, 1, -1, 9, 10, 2147483647, -2147483648, 2147483648, -2147483649, 1e21, 123456789012, 0.1, 5e-324, 1.7976931348623157e308];
    for (let i = 0; i < 20000; i++) xs.push((rng.uniform() - 0.5) * Math.pow(10, rng.between(-20, 25)), Math.round(rng.between(-1e6, 1e6)));
    let got = "";
    let want = "";
    for (const x of xs) {
      got += codec().formatOne(x) + "\n";
      want += shortest(x) + "\n";
    }
    expect(got).toBe(want);
  });
});

describe("evaluateBytes", () => {
  const elliptic = findRoutine("kepler-elliptic")!;
  const columns = ["id", "e", "M", "note"];
  const cells = {
    e: ["0.5", "0", "0.999999", "1.25", " 0.25", "0.75 ", "0x3fe0000000000000", "5e-1", ".3", "0.33973073967186773", "1e-400"],
    M: ["1", "-3.1", "1e-300", "2.8465381346520994832", "nan", "inf", "-inf", "+7", "73", "-0", "x", "1e400", "1.5\r"],
    note: ["a", "", "é", "b c", " ", "#", "\uFEFFz"],
  };
  const line = fc.oneof(
    { weight: 8, arbitrary: fc.tuple(fc.nat(99), fc.constantFrom(...cells.e), fc.constantFrom(...cells.M), fc.constantFrom(...cells.note)).map(([i, e, M, n]) => `${i},${e},${M},${n}`) },
    { weight: 1, arbitrary: fc.constantFrom("", "# comment", "  ", "\r", "1,2,3", "1,0.5,1,x,y", ",,,", " # not a comment,1,1,a") },
  );
  const k = release();
  const plan = prepareEval(elliptic, columns, "g.csv", k);

  it("gives evaluateLines' bytes and statuses, or its message, on generated texts (fast-check)", () => {
    fc.assert(
      fc.property(fc.array(line, { maxLength: 40 }), fc.boolean(), (lines, lastLf) => {
        const text = lines.join("\n") + (lastLf ? "\n" : "");
        let want: { text: string; rows: number; lineCount: number; statuses: Record<string, number> } | undefined;
        let wantErr: string | undefined;
        try {
          want = evaluateLines(elliptic, plan, columns.length, "g.csv", k, text, 5);
        } catch (err) {
          wantErr = (err as Error).message;
        }
        if (wantErr !== undefined) {
          expect(() => evaluateBytes(elliptic, plan, columns.length, "g.csv", k, enc.encode(text), 5)).toThrow(wantErr);
          return;
        }
        const got = evaluateBytes(elliptic, plan, columns.length, "g.csv", k, enc.encode(text), 5);
        expect(new TextDecoder().decode(got.bytes)).toBe(want!.text);
        expect([got.rows, got.lineCount, got.statuses]).toEqual([want!.rows, want!.lineCount, want!.statuses]);
      }),
      { numRuns: 3000, seed: 20261205 },
    );
  });
});

describe("evaluateBytes on a table wider than the codec's layout", () => {
  it("reads it through the string path: the same bytes as evaluateLines (17,000 columns)", () => {
    const elliptic = findRoutine("kepler-elliptic")!;
    const extra = Array.from({ length: 16998 }, (_, i) => `c${i}`);
    const columns = ["e", "M", ...extra];
    const k = release();
    const plan = prepareEval(elliptic, columns, "wide.csv", k);
    const text = `0.5,1,${extra.map(() => "7").join(",")}\n0.25,-2,${extra.map(() => "x").join(",")}\n`;
    const want = evaluateLines(elliptic, plan, columns.length, "wide.csv", k, text, 2);
    const got = evaluateBytes(elliptic, plan, columns.length, "wide.csv", k, enc.encode(text), 2);
    expect(new TextDecoder().decode(got.bytes)).toBe(want.text);
    expect(got.rows).toBe(2);
  });
});
