/** The exact-float helpers every comparison depends on, against facts of IEEE 754 binary64 (common practice). */
import { describe, it, expect } from "vitest";
import { ulpDistance, ulpDistance32, exactHex, toBitsHex, fromBitsHex, parseNumber, shortest, sameBits, ulpOf } from "../harness/core/float.js";
import { Decimal } from "decimal.js";
import { exact, decimalAt, toDouble } from "../harness/verify/reference/decimal.js";

describe("float helpers", () => {
  it("ULP distance counts representable doubles", () => {
    expect(ulpDistance(1, 1 + 2 ** -52)).toBe(1);
    expect(ulpDistance(1, 1 - 2 ** -53)).toBe(1);
    expect(ulpDistance(0, 5e-324)).toBe(1);
    expect(ulpDistance(-5e-324, 5e-324)).toBe(2);
    expect(ulpDistance(0, -0)).toBe(0);
    expect(ulpDistance(NaN, NaN)).toBe(0);
    expect(ulpDistance(NaN, 1)).toBe(Infinity);
    expect(ulpDistance(2, 2 + 4 * 2 ** -51)).toBe(4);
    expect(ulpDistance32(1, 1 + 2 ** -23)).toBe(1);
  });

  it("exactHex gives the exact value (decimal.js parses it without rounding)", () => {
    const D = Decimal.clone({ precision: 80 });
    expect(new D(exactHex(0.1)).toFixed(60)).toBe("0.100000000000000005551115123125782702118158340454101562500000");
    expect(new D(exactHex(5e-324)).toExponential(5)).toBe("4.94066e-324");
    expect(exactHex(-1.5)).toBe("-0x1.8000000000000p0");
  });

  it("the references read every double exactly, including exponents where decimal.js's hex parser is off", () => {
    const D = decimalAt(60);
    // 0x1.086bced637035p-24 = 0x1086bced637035 * 2^-76, exactly 6.15653406895579665516866842318866037686575509724207222461700439453125e-8
    // (the digits follow from integer arithmetic: 0x1086bced637035 * 5^76 / 10^76). decimal.js 10.6.0 parses the hex
    // string as ...797171616..., half an ulp away; exact() must not.
    const x = 6.156534068955797e-8;
    const want = new D("4651745622061109").times(new D(5).pow(76)).div(new D(10).pow(76));
    expect(exact(D, x).minus(want).abs().div(want).toNumber()).toBeLessThan(1e-58);
    for (const y of [x, 0.1, 5e-324, 2 ** -1022, -1.7976931348623157e308, 1 / 3, -2.5e-310]) expect(toDouble(exact(D, y))).toBe(y);
  });

  it("bit patterns and shortest decimals round-trip", () => {
    for (const x of [0.1, -0, 5e-324, 1.7976931348623157e308, Math.PI, -2.5e-310]) {
      expect(sameBits(fromBitsHex(toBitsHex(x)), x)).toBe(true);
      expect(sameBits(parseNumber(shortest(x))!, x)).toBe(true);
    }
    expect(parseNumber("0x3ff0000000000000")).toBe(1);
    expect(parseNumber("NaN")).toBeNaN();
    expect(parseNumber("-inf")).toBe(-Infinity);
    expect(parseNumber("1.5.2")).toBeUndefined();
    expect(parseNumber("")).toBeUndefined();
    expect(parseNumber("abc")).toBeUndefined();
    expect(ulpOf(1)).toBe(2 ** -52);
    expect(sameBits(0, -0)).toBe(false);
  });
});
