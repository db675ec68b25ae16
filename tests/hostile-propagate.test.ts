/**
 * `propagate` with a time step whose size leaves no usable angle: once one ulp of dt exceeds a small fraction
 * of the period (2^-10, assembly/universal.ts PHASE_ULP_MAX), dt no longer says where on the orbit the body is.
 * Before, a circular orbit with dt >= 1e17 returned the initial state with 0 iterations and status ok.
 * Checks against facts outside the kernel: the circular orbit of mu = 1, r = 1 has period 2 pi (Kepler's third
 * law, T = 2 pi sqrt(a^3 / mu)); the spacing of doubles in [2^56, 2^57) is 2^4 = 16 (IEEE 754 binary64, 52
 * fraction bits); the position after dt is (cos dt, sin dt), dt reduced modulo 2 pi with decimal.js at 60 digits.
 */
import { describe, it, expect } from "vitest";
import { Dec as D, exact, piOf } from "../harness/verify/reference/decimal.js";
import { release } from "./helpers.js";
import { slotsOf } from "../harness/module/routines.js";
import { statusWord } from "../harness/module/status.js";

const S = slotsOf("propagate", "rx", "ry", "iterations");

function circular(dt: number): { status: string; rx: number; ry: number } {
  const k = release();
  const st = k.call("propagate", [1, 1, 0, 0, 0, 1, 0, dt]);
  return { status: statusWord(st), rx: k.out[S.rx]!, ry: k.out[S.ry]! };
}

describe("propagate: a time step too large to keep the angle", () => {
  it("dt = 1e17 on the unit circular orbit (ulp 16 > 2 pi): not ok", () => {
    expect(Math.log2(1e17)).toBeGreaterThanOrEqual(56); // 1e17 lies in [2^56, 2^57): its ulp is 16
    expect(circular(1e17).status).toBe("overflow");
    expect(circular(-1e17).status).toBe("overflow");
    expect(circular(1e300).status).toBe("overflow");
  });

  it("dt = 1e14 (ulp 2^-6 = 0.0156, above 2 pi / 1024 = 0.0061): not ok", () => {
    expect(circular(1e14).status).toBe("overflow");
  });

  it("dt = 1e12 (ulp 2^-13, below 2 pi / 1024): ok, on the circle at the angle dt mod 2 pi", () => {
    const r = circular(1e12);
    expect(r.status).toBe("ok");
    const twoPi = piOf(D).times(2);
    const ang = exact(D, 1e12).mod(twoPi);
    // The reduction removes k = 1.6e11 revolutions with the double 2 pi: k ulp(2 pi) = 1.4e-4 rad (universal.ts
    // step 3); 1e-3 rad leaves room for that and nothing else.
    expect(Math.abs(r.rx - D.cos(ang).toNumber())).toBeLessThan(1e-3);
    expect(Math.abs(r.ry - D.sin(ang).toNumber())).toBeLessThan(1e-3);
    expect(Math.abs(Math.hypot(r.rx, r.ry) - 1)).toBeLessThan(1e-9);
  });
});
