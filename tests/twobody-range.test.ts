/**
 * Range of the two-body kernels and of gravity_zonal: states whose squares or products leave the normal range
 * (|r|^2, |h|^2, v^2, mu / p subnormal or overflowing) give the right answer or a failure status, never a
 * success with a wrong value. Expected values: the decimal.js references of harness/reference/twobody.ts (60
 * digits from the exact inputs; the equinoctial one through the classical angles), closed forms evaluated
 * with decimal.js (`exact()`, named beside each case), and the scaling law of the two-body problem
 * (dimensional analysis: lengths times L and times times T multiply r by L, v by L / T, mu by L^3 / T^2, and
 * then a, p by L, energy by L^2 / T^2, h by L^2 / T, leaving e and every angle unchanged).
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import { statusCode, isOk } from "../harness/module/status.js";
import { limitsFor } from "../harness/verify/limits.js";
import { Dec, exact, toDouble } from "../harness/verify/reference/decimal.js";
import { referenceElements, referenceEquinoctial, referenceInvariants, referenceState, referenceStateP } from "../harness/verify/reference/twobody.js";

const OVERFLOW = statusCode("overflow")!;
const WGS84_MU = 398600.4418; // km^3/s^2, WGS 84 (NIMA TR8350.2)
/** An inclined, eccentric orbit near the Earth, invented for these tests (km, km/s). */
const BASE = [WGS84_MU, 7000, 100, 1300, -1.1, 7.4, 1.0] as const;
const TWO_PI = 2 * Math.PI;

function ulp(x: number): number {
  const a = Math.abs(x);
  if (a === 0) return 5e-324;
  const e = Math.max(Math.floor(Math.log2(a)), -1022);
  return 2 ** (e - 52);
}
const angleDiff = (a: number, b: number): number => {
  const d = Math.abs(a - b) % TWO_PI;
  return Math.min(d, TWO_PI - d);
};

/** Elements against a reference row [a, e, i, raan, argp, nu, p, status, cond x 7], with the suite's limits. */
function expectElements(got: readonly number[], ref: readonly number[], what: string): void {
  const lim = limitsFor("elements", "f64");
  for (let j = 0; j < 7; j++) {
    const want = ref[j]!;
    const cond = ref[8 + j]!;
    const isAngle = j >= 2 && j <= 5;
    const tol = isAngle ? Math.max(lim.max_abs!, lim.cond_factor! * cond) + 4 * ulp(TWO_PI) : Math.max(lim.max_rel!, lim.cond_factor! * cond) * Math.abs(want) + 2 * ulp(want);
    const err = isAngle ? angleDiff(got[j]!, want) : Math.abs(got[j]! - want);
    expect(err, `${what}: slot ${j} got ${got[j]}, want ${want}`).toBeLessThanOrEqual(tol);
  }
}

/** Relative distance of two 3-vectors. */
function relVec(a: readonly number[], b: readonly number[]): number {
  const s = Math.max(...b.map(Math.abs));
  const d = [0, 1, 2].map((j) => (a[j]! - b[j]!) / s);
  const n = [0, 1, 2].map((j) => b[j]! / s);
  return Math.hypot(...d) / Math.hypot(...n);
}

describe("the shrunk fuzz cases (release f64)", () => {
  it("invariants(1, 0, 0, 1.57e-162, 1, 0, 0): energy -6.36e161 (was -4.50e161 from a subnormal |r|^2)", () => {
    const k = release();
    const x = [1, 0, 0, 1.5717277847026288e-162, 1, 0, 0];
    expect(k.call("invariants", x)).toBe(0);
    const ref = referenceInvariants(x);
    // Closed form beside the reference: energy = 1/2 - 1 / r_z.
    const P = Dec;
    const closed = toDouble(new P(0.5).minus(new P(1).div(exact(P, x[3]!))));
    expect(ref[0]).toBe(closed);
    for (let j = 0; j < 11; j++) expect(Math.abs(k.out[j]! - ref[j]!), `slot ${j}`).toBeLessThanOrEqual(2 * ulp(ref[j]!));
  });

  it("elements and equinoctial(2^53, 1, 0, 0, 0, 0, 1.57e-162): p = |h|^2 / mu is below the smallest subnormal, so ERR_OVERFLOW (was ok with p = 0)", () => {
    const k = release();
    const x = [2 ** 53, 1, 0, 0, 0, 0, 1.5717277847026288e-162];
    // Closed form: h = r x v = (0, -v_z, 0), p = v_z^2 / mu, evaluated exactly.
    const p = exact(Dec, x[6]!).pow(2).div(exact(Dec, x[0]!));
    expect(p.lt(new Dec(2).pow(-1075))).toBe(true);
    expect(k.call("elements", x)).toBe(OVERFLOW);
    expect(k.call("equinoctial", x)).toBe(OVERFLOW);
  });

  it("gravity_zonal(398600.4418, 0, 0, 1, 1.797e308, 0, 0): potential -mu / x = -2.2e-303 (was 0: x^2 overflowed)", () => {
    const k = release();
    const x = [WGS84_MU, 0, 0, 1, 1.7976931348623157e308, 0, 0];
    expect(k.call("gravity_zonal", x)).toBe(0);
    // Closed form (point mass on the x axis): V = -mu / x; |a| = mu / x^2 = 1.2e-611 rounds to 0.
    const V = toDouble(exact(Dec, x[0]!).div(exact(Dec, x[4]!)).neg());
    expect(Math.abs(k.out[3]! - V)).toBeLessThanOrEqual(ulp(V));
    expect(exact(Dec, x[0]!).div(exact(Dec, x[4]!).pow(2)).lt(new Dec(2).pow(-1075))).toBe(true);
    expect([k.out[0], k.out[1], k.out[2]].map((x) => Math.abs(x!))).toEqual([0, 0, 0]);
  });

  it("elements(3.644e87, 0, 0, 5.477e-42, 0, 2.987e141, 1.497e95): argp = pi/2 (was atan2(inf, inf) = pi/4)", () => {
    const k = release();
    const x = [3.6441290401938015e87, 0, 0, 5.476838825121511e-42, 0, 2.9868319155013313e141, 1.4965356800959194e95];
    expect(isOk(k.call("elements", x))).toBe(true);
    const got = Array.from(k.out.slice(0, 7));
    const ref = referenceElements(x);
    expect(ref[4]).toBe(Math.PI / 2);
    expectElements(got, ref, "elements");
  });
});

describe("an orbit in extreme units: right answer or ERR_OVERFLOW, never a wrong success", () => {
  const k = release();
  const refEl = referenceElements([...BASE]);
  const refEq = referenceEquinoctial([...BASE]);
  const refInv = referenceInvariants([...BASE]);
  // Units: lengths x 2^a, times x 2^b (exact powers of two); only states whose inputs stay normal doubles.
  const units: [number, number][] = [];
  for (let a = -1000; a <= 1000; a += 50) for (let b = -1500; b <= 1500; b += 100) units.push([a, b]);
  const scaled = units.map(([a, b]) => {
    const L = (x: number, e: number): number => x * 2 ** Math.trunc(e / 2) * 2 ** (e - Math.trunc(e / 2));
    return { a, b, x: [L(BASE[0], 3 * a - 2 * b), L(BASE[1], a), L(BASE[2], a), L(BASE[3], a), L(BASE[4], a - b), L(BASE[5], a - b), L(BASE[6], a - b)] };
  }).filter((c) => c.x.every((v) => Math.abs(v) >= 2 ** -1022 && Number.isFinite(v)));

  it(`elements, equinoctial and invariants on ${"the"} scaled states`, () => {
    let ok = 0;
    let refused = 0;
    for (const { a, b, x } of scaled) {
      const what = `lengths x 2^${a}, times x 2^${b}`;
      const se = k.call("elements", x);
      if (isOk(se)) {
        ok++;
        const got = Array.from(k.out.slice(0, 7));
        const want = refEl.slice(0, 7).map((v, j) => (j === 0 || j === 6 ? v * 2 ** a : v));
        expectElements(got, [...want, ...refEl.slice(7)], `elements, ${what}`);
      } else {
        refused++;
        expect(se, what).toBe(OVERFLOW);
      }
      const sq = k.call("equinoctial", x);
      expect(isOk(sq) ? "ok" : sq, what).toBe(isOk(se) ? "ok" : OVERFLOW);
      if (isOk(sq)) {
        expect(Math.abs(k.out[0]! / 2 ** a - refEq[0]!)).toBeLessThanOrEqual(1e-14 * refEq[0]!);
        for (let j = 1; j < 5; j++) expect(Math.abs(k.out[j]! - refEq[j]!), `${what}: slot ${j}`).toBeLessThanOrEqual(1e-14);
        expect(angleDiff(k.out[5]!, refEq[5]!)).toBeLessThanOrEqual(1e-14);
      }
      const si = k.call("invariants", x);
      if (isOk(si)) {
        const scale = [2 * (a - b), 2 * a - b, 2 * a - b, 2 * a - b, 2 * a - b, 0, 0, 0, 0, 2 * a - b, 0];
        for (let j = 0; j < 11; j++) {
          const want = refInv[j]! * 2 ** scale[j]!;
          // e vector components are absolute (their scale is 1); the rest relative.
          const tol = j >= 5 && j <= 8 ? 1e-14 : 1e-14 * Math.abs(want);
          expect(Math.abs(k.out[j]! - want), `invariants, ${what}: slot ${j}`).toBeLessThanOrEqual(tol);
        }
      } else {
        expect(si, what).toBe(OVERFLOW);
      }
    }
    // Every scaling of this orbit is within reach (mu / (r v^2) stays near 1; refusals are for results out of range).
    expect(ok + refused).toBe(scaled.length);
    expect(ok).toBeGreaterThan(0.9 * scaled.length);
  });

  it("mu / (|r| |v|^2) beyond 2^598 (potential over kinetic energy) is refused: elements(2^700, 1, 0, 0, 0, 1, 0)", () => {
    // The documented limit of the scaled path (invariants.ts, "Range"): no power-of-two scaling puts both v' and mu' in the window.
    for (const name of ["elements", "equinoctial", "invariants"]) expect(k.call(name, [2 ** 700, 1, 0, 0, 0, 1, 0]), name).toBe(OVERFLOW);
    expect(isOk(k.call("elements", [2 ** 590, 1, 0, 0, 0, 1, 0]))).toBe(true);
  });

  it("the smallest and largest units reached: r^2 subnormal, and r^2 and v^2 overflowing", () => {
    // |r| ~ 2^-517: |r|^2 ~ 2^-1034 is subnormal (lengths and times x 2^-530).
    const tiny = [BASE[0] * 2 ** -530, ...BASE.slice(1, 4).map((v) => v * 2 ** -530), ...BASE.slice(4)];
    expect(tiny[1]! ** 2 < 2 ** -1022).toBe(true);
    expect(isOk(k.call("elements", tiny))).toBe(true);
    expectElements(Array.from(k.out.slice(0, 7)), referenceElements(tiny), "tiny units");
    // |r| ~ 2^613, |v| ~ 2^603: both squares overflow (lengths x 2^600, times x 1 ... mu x 2^600 after times x 2^600).
    const huge = [BASE[0] * 2 ** 600, ...BASE.slice(1, 4).map((v) => v * 2 ** 600), ...BASE.slice(4).map((v) => v * 2 ** 600)];
    huge[0] = BASE[0] * 2 ** 1000 * 2 ** 800; // mu x L^3 / T^2 with L = 2^600, T = 1
    if (Number.isFinite(huge[0])) {
      expect(isOk(k.call("elements", huge))).toBe(true);
    } else {
      // mu itself is beyond the doubles: the same orbit with times x 2^600 (v unscaled, mu x 2^600).
      const h2 = [BASE[0] * 2 ** 600, ...BASE.slice(1, 4).map((v) => v * 2 ** 600), ...BASE.slice(4)];
      expect(isOk(k.call("elements", h2))).toBe(true);
      expectElements(Array.from(k.out.slice(0, 7)), referenceElements(h2), "huge units");
    }
  });
});

describe("elements -> state with mu / p or p out of the normal range", () => {
  const k = release();
  const lim = limitsFor("state", "f64");
  it("state_p(1.2345e-301, 1.5e18, ...): mu / p = 8.2e-320 is subnormal (was its square root: v off in the 5th digit)", () => {
    const x = [1.2345e-301, 1.5e18, 0.3, 0.5, 1, 2, 0.7];
    expect(k.call("state_p", x)).toBe(0);
    const ref = referenceStateP(x);
    expect(relVec(Array.from(k.out.slice(0, 3)), ref.slice(0, 3))).toBeLessThanOrEqual(Math.max(lim.max_rel!, lim.cond_factor! * ref[6]!));
    expect(relVec(Array.from(k.out.slice(3, 6)), ref.slice(3, 6))).toBeLessThanOrEqual(Math.max(lim.max_rel!, lim.cond_factor! * ref[7]!));
  });

  it("from_equinoctial with the same mu / p agrees with state_p of the same orbit (e = 0.3, i = 0.5, O = 1, w = 2, nu = 0.7)", () => {
    const [mu, p, e, i, O, w, nu] = [1.2345e-301, 1.5e18, 0.3, 0.5, 1, 2, 0.7];
    const eq = [mu, p, e * Math.cos(w + O), e * Math.sin(w + O), Math.tan(i / 2) * Math.cos(O), Math.tan(i / 2) * Math.sin(O), O + w + nu];
    expect(k.call("from_equinoctial", eq)).toBe(0);
    const ref = referenceStateP([mu, p, e, i, O, w, nu]);
    // The equinoctial inputs carry their own rounding (a few ulp of the angles): 1e-13.
    expect(relVec(Array.from(k.out.slice(0, 3)), ref.slice(0, 3))).toBeLessThanOrEqual(1e-13);
    expect(relVec(Array.from(k.out.slice(3, 6)), ref.slice(3, 6))).toBeLessThanOrEqual(1e-13);
  });

  // The shrunk fuzz case (elements round trip, mu = 2^-1074 on a hyperbola of e = 5.5e90): sqrt(mu / p) =
  // 2.6e-312 is itself subnormal while v = sqrt(mu / p) (e + cos nu) is not. Before 2026-12 the scale kept 38
  // bits and v came back 2.8e-13 off (relative).
  it("state_p(5e-324, 7.2e298, 5.5e90, ...): the speed scale sqrt(mu / p) is subnormal, v is not", () => {
    const x = [5e-324, 7.22261036395164e298, 5.54882560718114e90, Math.PI / 2, 4.901799199527934, Math.PI / 2, 0.3];
    expect(k.call("state_p", x)).toBe(0);
    const ref = referenceStateP(x);
    // The stored conditioning counts one ulp of each input, and one ulp of mu = 2^-1074 is mu itself (v's cond is
    // 0.41): the input is exact, so the suite's plain relative limit is the one that applies here.
    expect(relVec(Array.from(k.out.slice(0, 3)), ref.slice(0, 3))).toBeLessThanOrEqual(lim.max_rel!);
    expect(relVec(Array.from(k.out.slice(3, 6)), ref.slice(3, 6))).toBeLessThanOrEqual(lim.max_rel!);
  });

  it("from_equinoctial with a subnormal speed scale agrees with state_p of the same orbit", () => {
    const [mu, p, e, i, O, w, nu] = [5e-324, 7.22261036395164e298, 5.54882560718114e90, 0.5, 1, 2, 0.3];
    const eq = [mu, p, e * Math.cos(w + O), e * Math.sin(w + O), Math.tan(i / 2) * Math.cos(O), Math.tan(i / 2) * Math.sin(O), O + w + nu];
    expect(k.call("from_equinoctial", eq)).toBe(0);
    const ref = referenceStateP([mu, p, e, i, O, w, nu]);
    // The equinoctial inputs carry their own rounding (a few ulp of the angles, times e in f and g): 1e-13.
    expect(relVec(Array.from(k.out.slice(0, 3)), ref.slice(0, 3))).toBeLessThanOrEqual(1e-13);
    expect(relVec(Array.from(k.out.slice(3, 6)), ref.slice(3, 6))).toBeLessThanOrEqual(1e-13);
  });

  it("state(1, 2^-1000, 1 - 2^-40, ..., nu = pi): p = a (1 - e^2) is subnormal, r at apoapsis is not", () => {
    const x = [1, 2 ** -1000, 1 - 2 ** -40, 0.5, 1, 2, Math.PI];
    expect(k.call("state", x)).toBe(0);
    const ref = referenceState(x);
    expect(relVec(Array.from(k.out.slice(0, 3)), ref.slice(0, 3))).toBeLessThanOrEqual(Math.max(lim.max_rel!, lim.cond_factor! * ref[6]!));
    expect(relVec(Array.from(k.out.slice(3, 6)), ref.slice(3, 6))).toBeLessThanOrEqual(Math.max(lim.max_rel!, lim.cond_factor! * ref[7]!));
  });

  it("a state whose r would be subnormal is refused (ERR_OVERFLOW), not returned with lost digits", () => {
    // p = 2^-1060 (exact input), mu / p = 2^960: r = p / (1 + e cos nu) is subnormal, v is not.
    expect(k.call("state_p", [2 ** -100, 2 ** -1060, 0.5, 0.1, 0.2, 0.3, 0.4])).toBe(OVERFLOW);
    expect(k.call("from_equinoctial", [2 ** -100, 2 ** -1060, 0.1, 0.1, 0.1, 0.1, 0.4])).toBe(OVERFLOW);
  });
});

describe("equinoctial within 2^-600 of the retrograde equator", () => {
  it("r = (1, 0, 0), v = (0, -1, 2^-600), mu = 1: h = tan(i/2) = 2^601, k = 0, p = 1 (was ERR_DEGENERATE: h_x^2 + h_y^2 underflowed)", () => {
    const k = release();
    const x = [1, 1, 0, 0, 0, -1, 2 ** -600];
    expect(k.call("equinoctial", x)).toBe(0);
    const out = Array.from(k.out.slice(0, 6));
    // Closed form: h = r x v = (0, -2^-600, -1); tan(i/2) = (|h| - h_z) / sqrt(h_x^2 + h_y^2), the node along +x (O = 0).
    const P = Dec;
    const hn = new P(1).plus(new P(2).pow(-1200)).sqrt();
    const t = toDouble(hn.plus(1).div(new P(2).pow(-600)));
    expect(Math.abs(out[3]! - t)).toBeLessThanOrEqual(ulp(t));
    expect(Math.abs(out[4]!)).toBeLessThanOrEqual(1e-300 * t);
    expect(out[0]).toBe(toDouble(hn.pow(2)));
    // And back: the state again (the frame is built from h and k whose squares overflow).
    expect(k.call("from_equinoctial", [1, ...out])).toBe(0);
    expect(relVec(Array.from(k.out.slice(0, 3)), x.slice(1, 4))).toBeLessThanOrEqual(1e-15);
    expect(relVec(Array.from(k.out.slice(3, 6)), x.slice(4, 7))).toBeLessThanOrEqual(1e-15);
  });
});

describe("gravity_zonal beyond the plain formulas' window", () => {
  const k = release();
  const grav = (mu: number, j2: number, R: number, r: readonly number[]): number[] => {
    // Closed form (the zonal field of gravity.ts's header, J3 = 0) at 60 digits from the exact inputs.
    const P = Dec;
    const [x, y, z] = r.map((v) => exact(P, v)) as [Dec, Dec, Dec];
    const m = exact(P, mu);
    const rr = x.pow(2).plus(y.pow(2)).plus(z.pow(2)).sqrt();
    const s2 = z.div(rr).pow(2);
    const q2 = exact(P, R).div(rr).pow(2);
    const J = exact(P, j2);
    const k3 = m.div(rr.pow(3));
    const fxy = k3.neg().times(new P(1).plus(J.times(q2).times(1.5).times(new P(1).minus(s2.times(5)))));
    const fz = k3.neg().times(new P(1).plus(J.times(q2).times(1.5).times(new P(3).minus(s2.times(5)))));
    const V = m.div(rr).neg().times(new P(1).minus(J.times(q2).times(s2.times(3).minus(1).div(2))));
    return [fxy.times(x), fxy.times(y), fz.times(z), V].map(toDouble);
  };
  const cases: [string, number, number, number, number[]][] = [
    ["|r|^2 subnormal (r ~ 5e-160), mu = 1e-300", 1e-300, 0, 1, [3e-160, 4e-160, 0]],
    ["J2 with |r|^2 overflowing (Earth's field in units of 2^-600 km and 2^-600 s)", WGS84_MU * 2 ** 600, 1.0826266836e-3, 6378.137 * 2 ** 600, [7000 * 2 ** 600, -1200 * 2 ** 600, 3100 * 2 ** 600]],
    ["mu and r both tiny (the scaled path, where the plain one also holds)", 1.2345 * 2 ** -1000, 0, 1, [3 * 2 ** -400, 2 ** -401, -5 * 2 ** -402]],
  ];
  for (const [name, mu, j2, R, r] of cases) {
    it(name, () => {
      expect(k.call("gravity_zonal", [mu, j2, 0, R, ...r])).toBe(0);
      const want = grav(mu, j2, R, r);
      const an = Math.hypot(want[0]!, want[1]!, want[2]!);
      for (let j = 0; j < 3; j++) expect(Math.abs(k.out[j]! - want[j]!), `a[${j}]`).toBeLessThanOrEqual(16 * 2 ** -52 * an);
      expect(Math.abs(k.out[3]! - want[3]!)).toBeLessThanOrEqual(16 * 2 ** -52 * Math.abs(want[3]!));
    });
  }
});

describe("single-precision build: the scaled path", () => {
  it("a LEO in SI units (mu = 3.986e14 m^3/s^2 is outside the f32 window) gives the f64 reference's elements", () => {
    const k = single();
    const x = [WGS84_MU * 1e9, 7000e3, 100e3, 1300e3, -1.1e3, 7.4e3, 1.0e3].map(Math.fround);
    expect(isOk(k.call("elements", x))).toBe(true);
    const ref = referenceElements(x);
    const lim = limitsFor("elements", "f32");
    for (let j = 0; j < 7; j++) {
      const isAngle = j >= 2 && j <= 5;
      const err = isAngle ? angleDiff(k.out[j]!, ref[j]!) : Math.abs(k.out[j]! - ref[j]!) / Math.abs(ref[j]!);
      expect(err, `slot ${j}`).toBeLessThanOrEqual(lim.max_rel!);
    }
  });

  it("gravity_zonal with mu / r^3 below the f32 normal range (was 1.3% off)", () => {
    const k = single();
    const x = [1.0077949838361414e-9, 0, 0, 6378.137, 201685869563.57874, -182957545214.75443, 10041651405.1119].map(Math.fround);
    expect(k.call("gravity_zonal", x)).toBe(0);
    const P = Dec;
    const [X, Y, Z] = x.slice(4).map((v) => exact(P, v)) as [Dec, Dec, Dec];
    const r = X.pow(2).plus(Y.pow(2)).plus(Z.pow(2)).sqrt();
    const ax = toDouble(exact(P, x[0]!).times(X).div(r.pow(3)).neg());
    expect(Math.abs(k.out[0]! - ax)).toBeLessThanOrEqual(4 * 2 ** -23 * Math.abs(ax));
  });
});
