/**
 * The time of flight from the areal velocity, checked a second way: by quadrature of dt = r^2 / h dnu
 * (r = p / (1 + e cos nu), h = sqrt(mu p)), which uses no anomaly formula at all, and by the area of the
 * ellipse: a full revolution sweeps pi a b in one period 2 pi sqrt(a^3 / mu) (common practice).
 */
import { describe, it, expect } from "vitest";
import { release, run } from "./helpers.js";

const MU = 398600.4418; // km^3/s^2, WGS 84 (NIMA TR8350.2)

/** Composite Gauss-Legendre (5 points) of f over [a, b] in n panels. */
function quad(f: (x: number) => number, a: number, b: number, n = 400): number {
  const xs = [0, -0.5384693101056831, 0.5384693101056831, -0.906179845938664, 0.906179845938664];
  const ws = [0.5688888888888889, 0.47862867049936647, 0.47862867049936647, 0.23692688505618908, 0.23692688505618908];
  let s = 0;
  const h = (b - a) / n;
  for (let i = 0; i < n; i++) {
    const m = a + (i + 0.5) * h;
    for (let j = 0; j < 5; j++) s += ws[j]! * f(m + 0.5 * h * xs[j]!);
  }
  return 0.5 * h * s;
}

describe("time of flight from the areal velocity", () => {
  const cases: [number, number, number, number][] = [
    [7000, 0.001, 0.1, 2.0],
    [12000, 0.5, -1.0, 2.5],
    [9000, 0.95, -2.0, 2.9],
    [9000, 1 - 1e-9, -2.5, 2.5],
    [9000, 1, -2.5, 2.5],
    [9000, 1 + 1e-9, -2.5, 2.5],
    [15000, 1.8, -1.5, 2.0],
    [20000, 5, 0.3, 1.6],
  ];
  for (const [p, e, nu1, nu2] of cases) {
    it(`p = ${p} km, e = ${e}: kernel time equals the quadrature of r^2/h from ${nu1} to ${nu2} rad`, () => {
      const [st, t, area, rate] = run(release(), "time_of_flight", [MU, p, e, nu1, nu2]);
      expect(st).toBe(0);
      const h = Math.sqrt(MU * p);
      const r = (nu: number): number => p / (1 + e * Math.cos(nu));
      const want = quad((nu) => (r(nu) * r(nu)) / h, nu1, nu2);
      expect(Math.abs(t! - want) / want).toBeLessThan(1e-12);
      expect(rate).toBeCloseTo(h / 2, 9);
      expect(Math.abs(area! - t! * rate!) / area!).toBeLessThan(1e-15);
    });
  }

  it("a full revolution takes one period and sweeps pi a b (ellipse)", () => {
    const a = 26500;
    const e = 0.7358490566037735;
    const p = a * (1 - e * e);
    const [st, t, area] = run(release(), "time_of_flight", [MU, p, e, -Math.PI, Math.PI]);
    expect(st).toBe(0);
    const period = 2 * Math.PI * Math.sqrt(a ** 3 / MU);
    expect(Math.abs(t! - period) / period).toBeLessThan(1e-14);
    const b = a * Math.sqrt(1 - e * e);
    expect(Math.abs(area! - Math.PI * a * b) / (Math.PI * a * b)).toBeLessThan(1e-14);
  });

  it("equal times sweep equal areas: twelve steps of one twelfth of a period (Kepler's second law)", () => {
    const k = release();
    const a = 26500;
    const e = 0.7358490566037735;
    const p = a * (1 - e * e);
    const n = Math.sqrt(MU / a ** 3);
    let prev = 0;
    const areas: number[] = [];
    for (let i = 1; i <= 12; i++) {
      const M = (2 * Math.PI * i) / 12;
      const [s1, nu] = run(k, "mean_to_true", [e, M]);
      expect(s1).toBe(0);
      const [s2, t, area] = run(k, "time_of_flight", [MU, p, e, prev, nu!]);
      expect(s2).toBe(0);
      expect(Math.abs(t! - (2 * Math.PI) / n / 12) / t!).toBeLessThan(1e-13);
      areas.push(area!);
      prev = nu!;
    }
    const mean = areas.reduce((x, y) => x + y) / 12;
    for (const A of areas) expect(Math.abs(A - mean) / mean).toBeLessThan(1e-13);
  });
});
