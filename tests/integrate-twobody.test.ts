/**
 * The fixed-step integrators (assembly/integrators.ts) on the two-body problem, against an independent
 * high-precision reference: Kepler's equation in the eccentric-anomaly difference and the Lagrange f and g
 * functions (for example H. D. Curtis, "Orbital Mechanics for Engineering Students", ch. 3; D. A. Vallado,
 * "Fundamentals of Astrodynamics and Applications", ch. 2; recalled from memory), solved in decimal.js at 40
 * digits with the input doubles taken exactly. Earth GM 398600.4418 km^3/s^2 (WGS 84, NIMA TR8350.2).
 */
import { describe, it, expect } from "vitest";
import { release, single, DEG } from "./helpers.js";
import { decimalAt, exact, toDouble, type Dec } from "../harness/verify/reference/decimal.js";
import type { Kernels } from "../harness/module/load.js";
import { stateFromElements, METHODS, slot, read, POS, VEL, STATE, type Vec, type Method } from "./integrate-helpers.js";
import { referencePropagate } from "../harness/verify/reference/twobody.js";

const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)
const ORDER: Record<Method, number> = { rk4: 4, verlet: 2, yoshida4: 4, butcher6: 6 };

/** Two-body state after time N * h (the product taken exactly), by Kepler's equation in Delta E; ellipses only. */
function keplerReference(mu: number, r0: Vec, v0: Vec, h: number, N: number): [Vec, Vec] {
  const D = decimalAt(40);
  const R = r0.map((x) => exact(D, x)) as [Dec, Dec, Dec];
  const V = v0.map((x) => exact(D, x)) as [Dec, Dec, Dec];
  const m = exact(D, mu);
  const t = exact(D, h).times(N);
  const dot = (a: Dec[], b: Dec[]): Dec => a[0]!.times(b[0]!).plus(a[1]!.times(b[1]!)).plus(a[2]!.times(b[2]!));
  const r = dot(R, R).sqrt();
  const alpha = new D(2).div(r).minus(dot(V, V).div(m)); // 1/a
  const a = new D(1).div(alpha);
  const sqrtMuA = m.times(a).sqrt();
  const n = m.times(alpha.pow(3)).sqrt();
  const ec = new D(1).minus(r.times(alpha)); // e cos E0
  const es = dot(R, V).div(sqrtMuA); // e sin E0
  const nt = n.times(t);
  let x = nt; // Delta E
  for (let it = 0; it < 100; it++) {
    const f = x.minus(ec.times(D.sin(x))).plus(es.times(new D(1).minus(D.cos(x)))).minus(nt);
    const df = new D(1).minus(ec.times(D.cos(x))).plus(es.times(D.sin(x)));
    const dx = f.div(df);
    x = x.minus(dx);
    if (dx.abs().lt("1e-36")) break;
  }
  const s = D.sin(x);
  const omc = new D(1).minus(D.cos(x));
  const f = new D(1).minus(a.div(r).times(omc));
  const g = t.minus(x.minus(s).div(n));
  const Rn = R.map((ri, j) => f.times(ri).plus(g.times(V[j]!)));
  const rn = dot(Rn, Rn).sqrt();
  const fd = sqrtMuA.neg().times(s).div(rn.times(r));
  const gd = new D(1).minus(a.div(rn).times(omc));
  const Vn = R.map((ri, j) => fd.times(ri).plus(gd.times(V[j]!)));
  return [Rn.map(toDouble) as Vec, Vn.map(toDouble) as Vec];
}

function run(k: Kernels, r0: Vec, v0: Vec, h: number, N: number, method: Method): [number, Vec, Vec] {
  const st = k.call("integrate", [MU, ...r0, ...v0, h, N, METHODS[method], 0, 0, 1, 0, 0, 0, 0]);
  const o = read(k, ...STATE);
  return [st, o.slice(0, 3) as Vec, o.slice(3, 6) as Vec];
}

const dist = (a: Vec, b: Vec): number => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);

// Test orbit: a = 8000 km, e = 0.15, i = 40 deg, RAAN 20 deg, argp 60 deg, nu 10 deg (invented).
const A = 8000;
const [R0, V0] = stateFromElements(MU, A, 0.15, 40 * DEG, 20 * DEG, 60 * DEG, 10 * DEG);
const PERIOD = 2 * Math.PI * Math.sqrt(A ** 3 / MU);
const SPAN = 1.25 * PERIOD; // a span that does not end where it started
// Steps per span for the step-halving pairs, chosen so that the error is far above round-off and the
// leading error term dominates (the asymptotic range of each method).
const HALVING: Record<Method, [number, number]> = { rk4: [400, 800], verlet: [400, 800], yoshida4: [200, 400], butcher6: [160, 320] };

describe("two-body final state against the decimal Kepler reference", () => {
  const k = release();
  for (const method of Object.keys(METHODS) as Method[]) {
    it(`${method}: observed order within 0.3 of ${ORDER[method]} by step halving`, () => {
      const errs: number[] = [];
      for (const N of HALVING[method]) {
        const [st, r, v] = run(k, R0, V0, SPAN / N, N, method);
        expect(st).toBe(0);
        const [rr] = keplerReference(MU, R0, V0, SPAN / N, N);
        errs.push(dist(r, rr));
        void v;
      }
      const order = Math.log2(errs[0]! / errs[1]!);
      console.log(`${method}: position error ${errs.map((e) => e.toExponential(3)).join(" -> ")} km, observed order ${order.toFixed(3)}`);
      expect(Math.abs(order - ORDER[method])).toBeLessThanOrEqual(0.3);
    });
  }

  it("every method converges to the reference at fine steps (1e-6 km, 1e-9 km/s; Verlet, 2nd order, 1e-4 km and 1e-7 km/s)", () => {
    const fine: Record<Method, number> = { rk4: 6400, verlet: 200000, yoshida4: 6400, butcher6: 800 };
    const tolR: Record<Method, number> = { rk4: 1e-6, verlet: 1e-4, yoshida4: 1e-6, butcher6: 1e-6 };
    for (const method of Object.keys(METHODS) as Method[]) {
      const N = fine[method];
      const [st, r, v] = run(k, R0, V0, SPAN / N, N, method);
      expect(st).toBe(0);
      const [rr, vr] = keplerReference(MU, R0, V0, SPAN / N, N);
      console.log(`${method} N=${N}: |dr| ${dist(r, rr).toExponential(3)} km, |dv| ${dist(v, vr).toExponential(3)} km/s`);
      expect(dist(r, rr)).toBeLessThan(tolR[method]);
      expect(dist(v, vr)).toBeLessThan(tolR[method] * 1e-3);
    }
  });

  it("the decimal Kepler reference here agrees with the project's two-body reference (harness/reference/twobody.ts)", () => {
    for (const N of [160, 800]) {
      const [rr, vr] = keplerReference(MU, R0, V0, SPAN / N, N);
      const other = referencePropagate([MU, ...R0, ...V0, (SPAN / N) * N]);
      // The times differ by the rounding of N * h (at most an ulp of the span): far below 1e-9 km.
      expect(dist(rr, other.slice(0, 3) as Vec)).toBeLessThan(1e-9);
      expect(dist(vr, other.slice(3, 6) as Vec)).toBeLessThan(1e-12);
    }
  });

  it("agrees with the universal-variable kernel `propagate`", () => {
    expect(k.has("propagate")).toBe(true);
    const N = 800;
    const [, r, v] = run(k, R0, V0, SPAN / N, N, "butcher6");
    expect(k.call("propagate", [MU, ...R0, ...V0, (SPAN / N) * N])).toBeLessThan(16);
    const ru = read(k, ...POS) as Vec;
    const vu = read(k, ...VEL) as Vec;
    expect(dist(r, ru)).toBeLessThan(1e-6);
    expect(dist(v, vu)).toBeLessThan(1e-9);
  });
});

describe("determinism and the stepping interface", () => {
  it("the same inputs give the same bits; N single steps equal one call of N steps", () => {
    const k = release();
    for (const method of Object.keys(METHODS) as Method[]) {
      const N = 500;
      const h = SPAN / N;
      const a = run(k, R0, V0, h, N, method);
      const b = run(k, R0, V0, h, N, method);
      expect(b).toEqual(a);
      expect(k.call("integrate_begin", [MU, ...R0, ...V0, h, METHODS[method], 0, 0, 1, 0, 0, 0, 0])).toBe(0);
      for (let i = 0; i < N; i++) expect(k.call("integrate_step", [1])).toBe(0);
      expect(read(k, ...STATE)).toEqual([...a[1], ...a[2]]);
      expect(k.out[slot("k")]).toBe(N);
      expect(k.out[slot("t")]).toBe(N * h);
    }
  });

  it("verlet and yoshida4 are time-reversible: N steps forward then N back return to the start", () => {
    const k = release();
    for (const method of ["verlet", "yoshida4"] as const) {
      const N = 2000;
      const h = SPAN / N;
      const [, r1, v1] = run(k, R0, V0, h, N, method);
      const [, r2, v2] = run(k, r1, v1, -h, N, method);
      expect(dist(r2, R0) / A).toBeLessThan(1e-11);
      expect(dist(v2, V0)).toBeLessThan(1e-11);
    }
  });

  it("the single-precision build runs the same methods to f32 accuracy", () => {
    const k = single();
    const [rr] = keplerReference(MU, R0, V0, SPAN / 800, 800);
    for (const method of Object.keys(METHODS) as Method[]) {
      const [st, r] = run(k, R0, V0, SPAN / 800, 800, method);
      expect(st).toBe(0);
      // f32 round-off (2^-24 relative) accumulates over 800 steps: a few km at 8000 km is the scale.
      expect(dist(r, rr) / A).toBeLessThan(1e-3);
    }
  });
});
