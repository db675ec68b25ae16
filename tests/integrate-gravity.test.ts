/**
 * The zonal gravity kernel (assembly/gravity.ts) against an independent reference: the potential of an
 * axisymmetric body written with Legendre polynomials, V = -mu/r [1 - sum_n J_n (R/r)^n P_n(z/r)] (for example
 * D. A. Vallado, "Fundamentals of Astrodynamics and Applications", ch. 8; recalled from memory), with P_n from
 * Bonnet's recurrence, evaluated in decimal.js at 60 digits, and the acceleration as its numerical gradient
 * (central differences with a 1e-20 relative offset: truncation ~1e-40, far below double precision). The
 * reference never uses the kernel's closed-form acceleration.
 * Constants: GM 398600.4418 km^3/s^2, R = 6378.137 km (WGS 84, NIMA TR8350.2); J2 = 1.0826266836e-3 (EGM96 C20);
 * J3 = -2.5326564853e-6 (EGM96 normalised C30 = 0.957254173792e-6 times -sqrt(7); C30 recalled from memory).
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { Dec, exact, toDouble } from "../harness/verify/reference/decimal.js";
import { Rng } from "../harness/core/rng.js";

const MU = 398600.4418;
const RE = 6378.137;
const J2 = 1.0826266836e-3;
const J3 = -2.5326564853e-6;

function potentialRef(mu: Dec, R: Dec, J: readonly Dec[], x: Dec, y: Dec, z: Dec): Dec {
  const r = x.times(x).plus(y.times(y)).plus(z.times(z)).sqrt();
  const s = z.div(r);
  // Bonnet: (n+1) P_{n+1} = (2n+1) s P_n - n P_{n-1}
  let pPrev = new Dec(1);
  let p = s;
  let sum = new Dec(0);
  const q = R.div(r);
  let qn = q;
  for (let n = 1; n < J.length; n++) {
    if (n >= 2) {
      const next = new Dec(2 * n - 1).times(s).times(p).minus(new Dec(n - 1).times(pPrev)).div(n);
      pPrev = p;
      p = next;
    }
    qn = n === 1 ? q : qn.times(q);
    sum = sum.plus(J[n]!.times(qn).times(p));
  }
  return mu.div(r).neg().times(new Dec(1).minus(sum));
}

function accelRef(j2: number, j3: number, pos: readonly number[]): { a: number[]; V: number } {
  const mu = exact(Dec, MU);
  const R = exact(Dec, RE);
  const J = [new Dec(0), new Dec(0), exact(Dec, j2), exact(Dec, j3)];
  const P = pos.map((c) => exact(Dec, c));
  const r = P[0]!.times(P[0]!).plus(P[1]!.times(P[1]!)).plus(P[2]!.times(P[2]!)).sqrt();
  const d = r.times("1e-20");
  const a = [0, 1, 2].map((i) => {
    const plus = P.map((c, j) => (j === i ? c.plus(d) : c));
    const minus = P.map((c, j) => (j === i ? c.minus(d) : c));
    const g = potentialRef(mu, R, J, plus[0]!, plus[1]!, plus[2]!).minus(potentialRef(mu, R, J, minus[0]!, minus[1]!, minus[2]!)).div(d.times(2));
    return toDouble(g.neg());
  });
  return { a, V: toDouble(potentialRef(mu, R, J, P[0]!, P[1]!, P[2]!)) };
}

function points(n: number): number[][] {
  const rng = new Rng(20261202);
  const out: number[][] = [[7000, 0, 0], [0, 0, 7000], [0, 0, -6500], [4000, -3000, 5000]];
  while (out.length < n) {
    const r = 6400 + 40000 * rng.uniform() ** 2;
    const u = 2 * rng.uniform() - 1;
    const lon = 2 * Math.PI * rng.uniform();
    const c = Math.sqrt(1 - u * u);
    out.push([r * c * Math.cos(lon), r * c * Math.sin(lon), r * u]);
  }
  return out;
}

describe("gravity_zonal against the 60-digit gradient of the Legendre potential", () => {
  const k = release();
  const models: [string, number, number][] = [["point mass", 0, 0], ["J2 only", J2, 0], ["J3 only", 0, J3], ["J2 + J3", J2, J3]];
  for (const [label, j2, j3] of models) {
    it(`${label}: acceleration within 1e-15 of |a|, zonal part within 1e-8 where it exceeds 1e-7 |a|; potential within 4e-16`, () => {
      let worstTotal = 0;
      let worstZonal = 0;
      let worstV = 0;
      for (const p of points(40)) {
        const [st, ax, ay, az, V] = run(k, "gravity_zonal", [MU, j2, j3, RE, ...p], 4);
        expect(st).toBe(0);
        const ref = accelRef(j2, j3, p);
        const pm = accelRef(0, 0, p).a;
        const got = [ax!, ay!, az!];
        const an = Math.hypot(...ref.a);
        const err = Math.hypot(...got.map((g, i) => g - ref.a[i]!));
        worstTotal = Math.max(worstTotal, err / an);
        if (j2 !== 0 || j3 !== 0) {
          const zonalRef = ref.a.map((c, i) => c - pm[i]!);
          const zonalGot = got.map((c, i) => c - pm[i]!);
          const zn = Math.hypot(...zonalRef);
          if (zn > 1e-7 * an) worstZonal = Math.max(worstZonal, Math.hypot(...zonalGot.map((g, i) => g - zonalRef[i]!)) / zn);
        }
        worstV = Math.max(worstV, Math.abs(V! - ref.V) / Math.abs(ref.V));
      }
      console.log(`${label}: worst relative error: acceleration ${worstTotal.toExponential(2)}, zonal part ${worstZonal.toExponential(2)}, potential ${worstV.toExponential(2)}`);
      expect(worstTotal).toBeLessThan(1e-15); // a few ulp: the kernel rounds each term once or twice
      expect(worstZonal).toBeLessThan(1e-8); // the zonal terms themselves, seen through the rounding of the total
      expect(worstV).toBeLessThan(4e-16);
    });
  }

  it("statuses: non-finite, out of domain, the centre itself", () => {
    for (const k2 of [release(), single()]) {
      expect(run(k2, "gravity_zonal", [NaN, J2, 0, RE, 7000, 0, 0])[0]).toBe(16);
      expect(run(k2, "gravity_zonal", [MU, J2, 0, RE, 7000, Infinity, 0])[0]).toBe(16);
      expect(run(k2, "gravity_zonal", [0, J2, 0, RE, 7000, 0, 0])[0]).toBe(17);
      expect(run(k2, "gravity_zonal", [MU, J2, 0, -1, 7000, 0, 0])[0]).toBe(17);
      expect(run(k2, "gravity_zonal", [MU, J2, 0, RE, 0, 0, 0])[0]).toBe(19);
      expect(run(k2, "gravity_zonal", [MU, J2, 0, RE, 1e-200, 0, 0])[0]).toBe(k2.realBytes === 8 ? 21 : 19);
    }
  });
});
