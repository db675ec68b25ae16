/**
 * The report's invariant-drift section carries the symplectic defect of the transition matrix beside energy and
 * angular momentum, when the module has the transition exports. Checked against a property of the methods, not
 * against the code's own figures: verlet and yoshida4 are symplectic maps, so the defect of their tangent map stays
 * at round-off, while rk4 is not and drifts (Hairer, Lubich, Wanner, "Geometric Numerical Integration", 2nd ed.
 * 2006, VI.3, recalled from memory). A module without the transition exports gets the two invariants only.
 */
import { describe, it, expect } from "vitest";
import { release } from "./helpers.js";
import { drift } from "../harness/report/data.js";
import type { Kernels } from "../harness/module/load.js";

describe("report: invariant drift with the symplectic defect", () => {
  it("has a symplectic-defect series per method: round-off for verlet and yoshida4, growing for rk4", () => {
    const d = drift(release(), 10);
    if (typeof d === "string") throw new Error(d);
    const symp = d.points.filter((p) => p.invariant === "symplectic defect");
    expect(new Set(symp.map((p) => p.method))).toEqual(new Set(["rk4", "verlet", "yoshida4", "butcher6"]));
    const max = (m: string): number => d.summary[m]!.symp_max!;
    // Unit orbit, 1,000 steps: a few eps times max|Phi~|^2 (Phi~ grows about linearly in time) for the symplectic
    // methods; rk4's defect grows with its error constant and is orders of magnitude above. Measured 2026-12-05
    // (release build, 10 orbits): verlet 3.3e-11, yoshida4 1.0e-10, butcher6 7.7e-7, rk4 7.1e-4.
    expect(max("verlet")).toBeLessThan(1e-9);
    expect(max("yoshida4")).toBeLessThan(1e-9);
    expect(max("rk4")).toBeGreaterThan(1e3 * Math.max(max("verlet"), max("yoshida4")));
    // The series' largest value is the monitor's running maximum (the plotted blocks cover every step).
    for (const m of ["rk4", "verlet"]) {
      const series = Math.max(...symp.filter((p) => p.method === m).map((p) => p.deviation));
      expect(series).toBe(max(m));
    }
  });

  it("a module without the transition exports gets energy and angular momentum only", () => {
    const k = release();
    const without: Kernels = { ...k, has: (n: string) => n !== "integrate_phi" && k.has(n) };
    const d = drift(without, 2);
    if (typeof d === "string") throw new Error(d);
    expect(new Set(d.points.map((p) => p.invariant))).toEqual(new Set(["energy", "angular momentum"]));
    expect(d.summary.rk4!.symp_max).toBeUndefined();
  });
});
