/**
 * Zonal gravity in the integrators: the secular drift of the node and the periapsis under J2 over 30 days
 * against the first-order averaged rates
 *    dRAAN/dt = -1.5 n J2 (R/p)^2 cos i,     dargp/dt = 0.75 n J2 (R/p)^2 (5 cos^2 i - 1)
 * (H. D. Curtis, "Orbital Mechanics for Engineering Students", ch. 4, section on the effects of the Earth's
 * oblateness; D. A. Vallado, "Fundamentals of Astrodynamics and Applications", ch. 9; both recalled from memory),
 * the 0.9856 deg/day regression of a sun-synchronous orbit (360 deg in a 365.2422-day year; common practice),
 * and the conservation of the energy with the J2 potential and of h_z.
 * Constants: GM 398600.4418 km^3/s^2 and R = 6378.137 km (WGS 84, NIMA TR8350.2); J2 = 1.0826266836e-3 from
 * EGM96's normalised C20 = -0.484165371736e-3 (J2 = -sqrt(5) C20).
 * The formulas are first order in J2 and use the initial osculating elements in place of mean elements, so they
 * hold to about J2 (R/a)^2 relative (~1e-3); the tolerances below are a few times that.
 */
import { describe, it, expect } from "vitest";
import { release, DEG } from "./helpers.js";
import { stateFromElements, elementsOf, unwrap, slope, METHODS, slot, read, POS, VEL, type Vec, type Method } from "./integrate-helpers.js";
import type { Kernels } from "../harness/module/load.js";

const MU = 398600.4418;
const RE = 6378.137;
const J2 = 1.0826266836e-3;
const DAY = 86400;

function rates(a: number, e: number, inc: number): { raan: number; argp: number } {
  const n = Math.sqrt(MU / a ** 3);
  const p = a * (1 - e * e);
  const f = n * J2 * (RE / p) ** 2;
  return { raan: -1.5 * f * Math.cos(inc), argp: 0.75 * f * (5 * Math.cos(inc) ** 2 - 1) };
}

interface Fit {
  raan: number;
  argp: number;
  energyDev: number;
  hzDev: number;
  /** Largest |E_pm - E_pm0| / |E0| of the point-mass-only energy (computed here, without the J2 potential). */
  pointMassEnergyDev: number;
  /** Largest relative difference between the monitor's energy and the energy computed here with the J2 potential. */
  energyAgreement: number;
}

/** Integrate `days` with J2 only, sampling the osculating elements every `every` steps; fit the angle rates. */
function runJ2(k: Kernels, r0: Vec, v0: Vec, method: Method, step: number, days: number, every: number): Fit {
  const N = Math.round((days * DAY) / step);
  expect(k.call("integrate_begin", [MU, ...r0, ...v0, step, METHODS[method], J2, 0, RE, 0, 0, 0, 0])).toBe(0);
  const out = k.out;
  const e0 = out[slot("energy")]!;
  const energyJ2 = (r: Vec, v: Vec): number => {
    const rm = Math.hypot(...r);
    const s = r[2] / rm;
    const p2 = (3 * s * s - 1) / 2; // Legendre P2
    return (v[0] ** 2 + v[1] ** 2 + v[2] ** 2) / 2 - (MU / rm) * (1 - J2 * (RE / rm) ** 2 * p2);
  };
  const energyPm = (r: Vec, v: Vec): number => (v[0] ** 2 + v[1] ** 2 + v[2] ** 2) / 2 - MU / Math.hypot(...r);
  const epm0 = energyPm(r0, v0);
  let agree = Math.abs(e0 - energyJ2(r0, v0)) / Math.abs(e0);
  let pmDev = 0;
  const t: number[] = [];
  const raan: number[] = [];
  const argp: number[] = [];
  const step1 = k.exports.integrate_step as (n: number) => number;
  for (let i = 0; i <= N; i += every) {
    if (i > 0) expect(step1(every)).toBe(0);
    const r = read(k, ...POS) as Vec;
    const v = read(k, ...VEL) as Vec;
    const el = elementsOf(MU, r, v);
    t.push(out[slot("t")]!);
    raan.push(el.raan);
    argp.push(el.argp);
    agree = Math.max(agree, Math.abs(out[slot("energy")]! - energyJ2(r, v)) / Math.abs(e0));
    pmDev = Math.max(pmDev, Math.abs(energyPm(r, v) - epm0) / Math.abs(e0));
  }
  return {
    raan: slope(t, unwrap(raan)),
    argp: slope(t, unwrap(argp)),
    energyDev: out[slot("energy_dev")]!,
    hzDev: out[slot("h_dev")]!,
    pointMassEnergyDev: pmDev,
    energyAgreement: agree,
  };
}

const perDay = (x: number): number => (x / DEG) * DAY;

describe("J2 secular rates over 30 days", () => {
  const k = release();
  // Invented test orbit: a = 7500 km, e = 0.05, i = 50 deg.
  const A = 7500;
  const E = 0.05;
  const INC = 50 * DEG;
  const [r0, v0] = stateFromElements(MU, A, E, INC, 30 * DEG, 45 * DEG, 0);
  const want = rates(A, E, INC);
  // Steps small enough that the method's own spurious apsidal precession (a phase error of order h^p an orbit; Verlet
  // at 20 s shows 15% of the J2 rate, yoshida4 at 60 s 4%) stays well below the 1% tolerance.
  const steps: Record<Method, number> = { rk4: 60, verlet: 3, yoshida4: 30, butcher6: 120 };
  const every: Record<Method, number> = { rk4: 5, verlet: 100, yoshida4: 10, butcher6: 3 };
  for (const method of Object.keys(METHODS) as Method[]) {
    it(`${method}: node and periapsis rates within 1% of the first-order formulas; energy and h_z conserved`, () => {
      const f = runJ2(k, r0, v0, method, steps[method], 30, every[method]);
      const eR = f.raan / want.raan - 1;
      const eW = f.argp / want.argp - 1;
      console.log(`${method} (step ${steps[method]} s): dRAAN/dt ${perDay(f.raan).toFixed(5)} deg/day (formula ${perDay(want.raan).toFixed(5)}, rel. err ${eR.toExponential(2)}); ` +
        `dargp/dt ${perDay(f.argp).toFixed(5)} (formula ${perDay(want.argp).toFixed(5)}, rel. err ${eW.toExponential(2)}); ` +
        `energy dev ${f.energyDev.toExponential(2)}, h_z dev ${f.hzDev.toExponential(2)}, point-mass energy dev ${f.pointMassEnergyDev.toExponential(2)}`);
      expect(Math.abs(eR)).toBeLessThan(0.01);
      expect(Math.abs(eW)).toBeLessThan(0.01);
      // The monitor's energy includes the J2 potential: it agrees with the energy computed here from the state...
      expect(f.energyAgreement).toBeLessThan(1e-13);
      // ...and that energy is conserved far better than the point-mass energy, which J2 changes at the 1e-4 level.
      expect(f.pointMassEnergyDev).toBeGreaterThan(1e-5);
      expect(f.energyDev).toBeLessThan(f.pointMassEnergyDev / 10);
      if (method === "verlet" || method === "yoshida4") expect(f.hzDev).toBeLessThanOrEqual(1e-12);
      else expect(f.hzDev).toBeLessThan(f.pointMassEnergyDev / 10); // RK methods: h_z drifts with the truncation error
    });
  }

  it("yoshida4: the energy error with J2 is the method's own: it falls 2^4-fold when the step is halved (one day)", () => {
    const d1 = runJ2(k, r0, v0, "yoshida4", 120, 1, 10).energyDev;
    const d2 = runJ2(k, r0, v0, "yoshida4", 60, 1, 20).energyDev;
    console.log(`yoshida4 with J2: energy deviation ${d1.toExponential(3)} (120 s) -> ${d2.toExponential(3)} (60 s), order ${Math.log2(d1 / d2).toFixed(2)}`);
    expect(Math.abs(Math.log2(d1 / d2) - 4)).toBeLessThan(0.3);
  });

  it("a 700 km sun-synchronous orbit (i = 98.19 deg) regresses about 0.9856 deg/day", () => {
    const a = RE + 700;
    const [r, v] = stateFromElements(MU, a, 0.001, 98.19 * DEG, 0, 90 * DEG, 0);
    const f = runJ2(k, r, v, "yoshida4", 60, 30, 5);
    const got = perDay(f.raan);
    console.log(`sun-synchronous: dRAAN/dt ${got.toFixed(5)} deg/day (want 0.9856), h_z dev ${f.hzDev.toExponential(2)}`);
    expect(Math.abs(got / 0.9856 - 1)).toBeLessThan(0.01);
  });
});
