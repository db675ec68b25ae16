/**
 * Status behaviour of the two-body kernels: bad input gives a failure status (never a NaN with ok), in the
 * documented order; the circular / equatorial conventions give their statuses; and a seeded fuzz over wild
 * inputs never sees a success status with a non-finite output.
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { statusCode } from "../harness/module/status.js";
import { Rng } from "../harness/core/rng.js";
import type { Kernels } from "../harness/module/load.js";

const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)
const code = (w: string): number => statusCode(w)!;
const STATUS = {
  OK: code("ok"),
  OK_CIRCULAR: code("ok-circular"),
  OK_EQUATORIAL: code("ok-equatorial"),
  OK_CIRCULAR_EQUATORIAL: code("ok-circular-equatorial"),
  ERR_NONFINITE: code("nonfinite-input"),
  ERR_DOMAIN: code("out-of-domain"),
  ERR_DEGENERATE: code("degenerate"),
  ERR_UNREACHABLE: code("unreachable"),
};
const LEO = [7000, 0, 0, 0, 7.5, 1];
const STATE_KERNELS = ["propagate", "elements", "equinoctial", "invariants"] as const;

/** Call a state kernel (propagate takes dt as well). */
function callState(k: Kernels, name: string, mu: number, s: readonly number[], dt = 600): number {
  return k.call(name, name === "propagate" ? [mu, ...s, dt] : [mu, ...s]);
}

describe("bad input gives a failure status", () => {
  for (const build of [release, single]) {
    for (const name of STATE_KERNELS) {
      it(`${name} (${build === release ? "f64" : "f32"})`, () => {
        const k = build();
        // Non-finite values in any argument, before anything else (mu <= 0 together with a NaN is still NONFINITE).
        for (let j = 0; j < 6; j++) {
          for (const bad of [NaN, Infinity, -Infinity]) {
            const s = LEO.slice();
            s[j] = bad;
            expect(callState(k, name, MU, s)).toBe(STATUS.ERR_NONFINITE);
            expect(callState(k, name, -1, s)).toBe(STATUS.ERR_NONFINITE);
          }
        }
        expect(callState(k, name, NaN, LEO)).toBe(STATUS.ERR_NONFINITE);
        if (name === "propagate") expect(callState(k, name, MU, LEO, NaN)).toBe(STATUS.ERR_NONFINITE);
        // mu <= 0 and r = 0.
        expect(callState(k, name, 0, LEO)).toBe(STATUS.ERR_DOMAIN);
        expect(callState(k, name, -MU, LEO)).toBe(STATUS.ERR_DOMAIN);
        expect(callState(k, name, MU, [0, 0, 0, 1, 2, 3])).toBe(STATUS.ERR_DOMAIN);
        // Rectilinear motion: v parallel to r, v = 0.
        expect(callState(k, name, MU, [7000, 0, 0, 3, 0, 0])).toBe(STATUS.ERR_DEGENERATE);
        expect(callState(k, name, MU, [7000, -2000, 500, 0, 0, 0])).toBe(STATUS.ERR_DEGENERATE);
        expect(callState(k, name, MU, [3000, 4000, 0, -0.6, -0.8, 0])).toBe(STATUS.ERR_DEGENERATE);
      });
    }
  }

  it("state, state_p and from_equinoctial reject bad elements", () => {
    const k = release();
    const el = [MU, 7000, 0.1, 1, 2, 3, 0.5];
    expect(k.call("state", [MU, 7000, 0.1, 1, 2, 3, NaN])).toBe(STATUS.ERR_NONFINITE);
    expect(k.call("state", [0, 7000, 0.1, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN);
    expect(k.call("state", [MU, -7000, 0.1, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN); // a < 0 with e < 1
    expect(k.call("state", [MU, 7000, 1.5, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN); // a > 0 with e > 1
    expect(k.call("state", [MU, 7000, 1, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN); // parabola needs p
    expect(k.call("state", [MU, 7000, -0.1, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN);
    expect(k.call("state", el)).toBe(STATUS.OK);
    expect(k.call("state_p", [MU, 0, 0.1, 1, 2, 3, 0.5])).toBe(STATUS.ERR_DOMAIN);
    expect(k.call("state_p", [MU, 14000, 2, 1, 2, 3, 2.2])).toBe(STATUS.ERR_UNREACHABLE); // beyond the asymptote
    expect(k.call("state_p", [MU, 14000, 1, 1, 2, 3, 3.1])).toBe(STATUS.OK);
    expect(k.call("from_equinoctial", [MU, 7000, 0.1, 0, 0, 0, Infinity])).toBe(STATUS.ERR_NONFINITE);
    expect(k.call("from_equinoctial", [MU, -7000, 0.1, 0, 0, 0, 1])).toBe(STATUS.ERR_DOMAIN);
    expect(k.call("from_equinoctial", [MU, 7000, -2, 0, 0, 0, 0])).toBe(STATUS.ERR_UNREACHABLE); // 1 + f cos L < 0
  });

  it("the equinoctial set is singular for a retrograde equatorial state (i = pi)", () => {
    expect(release().call("equinoctial", [MU, 7000, 0, 0, 0, -7.5, 0])).toBe(STATUS.ERR_DEGENERATE);
    expect(release().call("equinoctial", [MU, 7000, 0, 0, 0, 7.5, 0])).toBe(STATUS.OK);
  });
});

describe("conventions for undefined angles", () => {
  const k = release();
  const vc = Math.sqrt(MU / 7000);

  it("circular inclined: OK_CIRCULAR, argp = 0, nu = argument of latitude", () => {
    // r along the ascending node direction rotated by u = 0.75 rad in a plane with i = 0.5, RAAN = 0.
    const u = 0.75;
    const i = 0.5;
    const r = [7000 * Math.cos(u), 7000 * Math.sin(u) * Math.cos(i), 7000 * Math.sin(u) * Math.sin(i)];
    const v = [-vc * Math.sin(u), vc * Math.cos(u) * Math.cos(i), vc * Math.cos(u) * Math.sin(i)];
    const [st, a, e, inc, raan, argp, nu] = run(k, "elements", [MU, ...r, ...v], 7);
    expect(st).toBe(STATUS.OK_CIRCULAR);
    expect(argp).toBe(0);
    expect(Math.abs(nu! - u)).toBeLessThan(1e-14);
    expect(Math.abs(inc! - i)).toBeLessThan(1e-14);
    expect(Math.min(raan!, 2 * Math.PI - raan!)).toBeLessThan(1e-14);
    expect(e!).toBeLessThan(1e-14);
    expect(Math.abs(a! - 7000) / 7000).toBeLessThan(1e-14);
  });

  it("equatorial eccentric: OK_EQUATORIAL, RAAN = 0, argp = longitude of periapsis (both senses of motion)", () => {
    // Periapsis at longitude 1.2 rad, e = 0.2, prograde; the same orbit mirrored in y runs clockwise (i = pi),
    // its periapsis sits 1.2 rad clockwise from x, and measured in the direction of motion that is again 1.2.
    const w = 1.2;
    const s0 = run(k, "state", [MU, 9000, 0.2, 0, 0, w, 0.3], 6).slice(1);
    const pro = run(k, "elements", [MU, ...s0], 7);
    expect(pro[0]).toBe(STATUS.OK_EQUATORIAL);
    expect(pro[3]).toBe(0);
    expect(pro[4]).toBe(0);
    expect(Math.abs(pro[5]! - w)).toBeLessThan(1e-14);
    const mirrored = [s0[0]!, -s0[1]!, 0, s0[3]!, -s0[4]!, 0];
    const retro = run(k, "elements", [MU, ...mirrored], 7);
    expect(retro[0]).toBe(STATUS.OK_EQUATORIAL);
    expect(retro[3]).toBe(Math.PI);
    expect(Math.abs(retro[5]! - w)).toBeLessThan(1e-14);
    // Passing the returned values back to `state` rebuilds the state (the convention is self-consistent).
    const back = run(k, "state", [MU, retro[1]!, retro[2]!, retro[3]!, retro[4]!, retro[5]!, retro[6]!], 6).slice(1);
    back.forEach((x, j) => expect(Math.abs(x - mirrored[j]!)).toBeLessThan(1e-11 * (j < 3 ? 9000 : 8)));
  });

  it("circular equatorial: OK_CIRCULAR_EQUATORIAL, nu = true longitude", () => {
    const lon = 2.5;
    const [st, , , inc, raan, argp, nu] = run(k, "elements", [MU, 7000 * Math.cos(lon), 7000 * Math.sin(lon), 0, -vc * Math.sin(lon), vc * Math.cos(lon), 0], 7);
    expect(st).toBe(STATUS.OK_CIRCULAR_EQUATORIAL);
    expect([inc, raan, argp]).toEqual([0, 0, 0]);
    expect(Math.abs(nu! - lon)).toBeLessThan(1e-14);
  });

  it("an exact parabola reports a = 0 and its p", () => {
    // v = sqrt(2 mu / r) with mu = 2, r = 1: v^2 = 4 exactly, so 1/a = 2/r - v^2/mu = 0 exactly.
    const [st, a, e, , , , , p] = run(k, "elements", [2, 1, 0, 0, 0, 2, 0], 7);
    expect(st).toBe(STATUS.OK_EQUATORIAL);
    expect(a).toBe(0);
    expect(e).toBe(1);
    expect(p).toBe(2);
  });
});

describe("never a success status with a non-finite output (seeded fuzz)", () => {
  const wild = (rng: Rng): number => {
    const u = rng.uniform();
    if (u < 0.05) return 0;
    if (u < 0.1) return [5e-324, 1e-300, 1e300, 1.7976931348623157e308][rng.below(4)]! * (rng.uniform() < 0.5 ? -1 : 1);
    return (rng.uniform() < 0.5 ? -1 : 1) * rng.logUniform(-20, 20);
  };
  const outputs: Record<string, number> = { propagate: 6, elements: 7, equinoctial: 6, invariants: 11, state: 6, state_p: 6, from_equinoctial: 6 };

  for (const build of [release, single]) {
    it(`every two-body kernel (${build === release ? "f64" : "f32"})`, () => {
      const k = build();
      const rng = new Rng(20261215);
      let oks = 0;
      for (let n = 0; n < 4000; n++) {
        for (const [name, nOut] of Object.entries(outputs)) {
          const args = Array.from({ length: name === "propagate" ? 8 : 7 }, () => wild(rng));
          if (rng.uniform() < 0.5) args[0] = Math.abs(args[0]!);
          const st = k.call(name, args);
          if (st < 16) {
            oks++;
            for (let j = 0; j < nOut; j++) if (!Number.isFinite(k.out[j]!)) throw new Error(`${name}(${args.join(", ")}) -> status ${st} with slot ${j} = ${k.out[j]}`);
          }
        }
      }
      expect(oks).toBeGreaterThan(1000);
    });
  }
});
