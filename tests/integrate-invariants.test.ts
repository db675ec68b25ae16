/**
 * Conservation laws under a central force, measured by the on-board monitor on every step:
 *  - angular momentum h = r x v is exactly conserved by each Verlet kick (the kick is along r) and drift (along v),
 *    so Verlet and Yoshida's composition keep it at round-off (at most 1e-12 after 100,000 steps);
 *  - a symplectic method keeps the energy error bounded, with no secular growth (Yoshida 1990; E. Hairer,
 *    C. Lubich, G. Wanner, "Geometric Numerical Integration", 2006, ch. IX, backward error analysis; recalled from
 *    memory), so the largest error over the last tenth of 10,000 orbits matches the first tenth; RK4 and the
 *    Butcher order-6 method are not symplectic and drift (measured and printed here).
 * Earth GM 398600.4418 km^3/s^2 (WGS 84, NIMA TR8350.2).
 */
import { describe, it, expect } from "vitest";
import { release, DEG } from "./helpers.js";
import { stateFromElements, METHODS, slot, type Method } from "./integrate-helpers.js";

const MU = 398600.4418;

// Invented test orbit: a = 7200 km, e = 0.1, i = 28.5 deg.
const A = 7200;
const [R0, V0] = stateFromElements(MU, A, 0.1, 28.5 * DEG, 40 * DEG, 75 * DEG, 0);
const PERIOD = 2 * Math.PI * Math.sqrt(A ** 3 / MU);

describe("angular momentum at round-off for the symplectic methods", () => {
  const k = release();
  for (const method of ["verlet", "yoshida4"] as const) {
    it(`${method}: |h - h0| / |h0| <= 1e-12 on every one of 100,000 steps`, () => {
      const N = 100_000;
      const h = PERIOD / 100; // 1,000 orbits
      expect(k.call("integrate", [MU, ...R0, ...V0, h, N, METHODS[method], 0, 0, 1, 0, 1e-12, 0, 0])).toBe(0);
      console.log(`${method}: max h deviation over ${N} steps ${k.out[slot("h_dev")]!.toExponential(3)}, areal velocity ${k.out[slot("areal_dev")]!.toExponential(3)}`);
      expect(k.out[slot("h_dev")]).toBeLessThanOrEqual(1e-12);
      expect(k.out[slot("areal_dev")]).toBeLessThanOrEqual(1e-12);
      expect(k.out[slot("h_step")]).toBe(-1); // no step over the 1e-12 budget
    });
  }
});

describe("energy over 10,000 orbits (64 steps an orbit)", () => {
  const k = release();
  const ORBITS = 10_000;
  const PER = 64;
  const total = ORBITS * PER;
  const tenth = total / 10;

  function windows(method: Method): { first: number; last: number; hmax: number; emax: number } {
    expect(k.call("integrate_begin", [MU, ...R0, ...V0, PERIOD / PER, METHODS[method], 0, 0, 1, 0, 0, 0, 0])).toBe(0);
    let first = 0;
    let last = 0;
    const step = k.exports.integrate_step as (n: number) => number; // called directly: 640,000 calls
    const out = k.out;
    const ENERGY_NOW = slot("energy_dev_now");
    let bad = 0;
    for (let i = 1; i <= total; i++) {
      bad |= step(1);
      const d = out[ENERGY_NOW]!; // this step's energy deviation
      if (i <= tenth) first = Math.max(first, d);
      else if (i > total - tenth) last = Math.max(last, d);
    }
    expect(bad).toBe(0);
    return { first, last, hmax: k.out[slot("h_dev")]!, emax: k.out[slot("energy_dev")]! };
  }

  for (const method of ["verlet", "yoshida4"] as const) {
    it(`${method}: bounded, the last tenth's largest error within 10% of the first tenth's`, () => {
      const w = windows(method);
      console.log(`${method}: energy first tenth ${w.first.toExponential(3)}, last tenth ${w.last.toExponential(3)}, h max ${w.hmax.toExponential(3)}`);
      expect(w.last).toBeLessThanOrEqual(1.1 * w.first);
      expect(w.hmax).toBeLessThanOrEqual(1e-12);
    });
  }

  for (const method of ["rk4", "butcher6"] as const) {
    it(`${method}: secular drift, measured (the last tenth's largest error is several times the first tenth's)`, () => {
      const w = windows(method);
      console.log(`${method}: energy first tenth ${w.first.toExponential(3)}, last tenth ${w.last.toExponential(3)} (x${(w.last / w.first).toFixed(1)}), h max ${w.hmax.toExponential(3)}`);
      // Not a requirement on RK methods but a check that the measurement can tell drift from a bounded error.
      expect(w.last).toBeGreaterThan(3 * w.first);
    });
  }
});
