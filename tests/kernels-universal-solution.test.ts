/**
 * The universal-variable solution as other kernels reach it (assembly/universal.ts: solveUniversal(mu, r0, v0, dt)
 * returns a status and universalGet(UV_...) reads chi, alpha, the anchor's r0 and sigma0, sqrt(mu), dt', U0..U3,
 * r, the iterations and the anchor state). The accessor is not a module export, so the test reaches it in the
 * host-JS build of the same source (harness/module/jsbuild.ts), where every module-level name is visible.
 * Checks, on a spread of vectors/propagate.csv and on hairpin hyperbolas anchored at periapsis:
 *  1. the Lagrange coefficients written in the header (f = 1 - U2/r0, g = (r0 U1 + sigma0 U2)/sqrt(mu),
 *     fdot = -sqrt(mu) U1/(r r0), gdot = (r0 U0 + sigma0 U1)/r) applied to the anchor state give propagate's
 *     outputs bit for bit (same build, same source): the interface carries exactly what propagate uses, and
 *     propagate itself is checked against the decimal.js reference by tests/twobody-accuracy.test.ts;
 *  2. the universal functions satisfy U0 = 1 - alpha U2 and U1 = chi - alpha U3 (U_n = chi^n/n! - alpha U_(n+2),
 *     R. H. Battin, "An Introduction to the Mathematics and Methods of Astrodynamics", AIAA 1987, 4.5; recalled
 *     from memory), r = r0 U0 + sigma0 U1 + U2 and the universal Kepler equation r0 U1 + sigma0 U2 + U3 =
 *     sqrt(mu) dt' to a few ulp of their largest term;
 *  3. an anchored solution's anchor is periapsis: a . b = 0 and sigma0 = 0 (Battin 1987, 4.5).
 */
import { describe, it, expect } from "vitest";
import { loadJsBuild, loadJsModule } from "../harness/module/jsbuild.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { findRoutine } from "../harness/module/routines.js";

type Fn = (...a: number[]) => number;
const EPS = 2 ** -52;

interface Universal {
  solve: Fn;
  get: (slot: string) => number;
}

function universalModule(): Universal {
  const ex = loadJsModule("universal").exports as Record<string, unknown>;
  const get = ex.universalGet as Fn;
  return { solve: ex.solveUniversal as Fn, get: (slot) => get(ex[slot] as number) };
}

/** Rows of vectors/propagate.csv, spread over the file. */
function propagateRows(n: number): number[][] {
  const v = readVectors(vectorPath("propagate"));
  const cols = findRoutine("propagate")!.inputs.map((i) => v.columns.indexOf(i.name));
  const step = Math.max(1, Math.floor(v.values.length / n));
  return v.values.filter((_, i) => i % step === 0).map((row) => cols.map((c) => row[c]!));
}

/** Hyperbolas coming in from far out and swinging past periapsis (they take the periapsis anchor). */
const HAIRPINS: number[][] = [
  [398600.4418, -1e6, 7000, 0, 10, 0, 0, 1e5],
  [398600.4418, -3e5, 6800, 500, 6, 0.01, 0, 6e4],
  [398600.4418, 2e6, -9000, 300, -12, 0.05, 0.001, 2.2e5],
];

/** The end state from the solution, by the header's Lagrange coefficients. */
function lagrange(u: Universal): number[] {
  const [sq, r0, s0, u0, u1, u2, r] = ["UV_SQMU", "UV_R0", "UV_SIGMA0", "UV_U0", "UV_U1", "UV_U2", "UV_R"].map(u.get) as [number, number, number, number, number, number, number];
  const f = 1 - u2 / r0;
  const g = (r0 * u1 + s0 * u2) / sq;
  const fd = (-sq * (u1 / r)) / r0;
  const gd = (r0 * u0 + s0 * u1) / r;
  const a = ["UV_AX", "UV_AY", "UV_AZ"].map(u.get);
  const b = ["UV_BX", "UV_BY", "UV_BZ"].map(u.get);
  return [0, 1, 2].map((i) => f * a[i]! + g * b[i]!).concat([0, 1, 2].map((i) => fd * a[i]! + gd * b[i]!));
}

describe("solveUniversal / universalGet: the interface other kernels use", () => {
  const cases = [...propagateRows(300), ...HAIRPINS];

  it("the Lagrange coefficients of the header on the solution give propagate's outputs bit for bit", () => {
    const u = universalModule();
    const k = loadJsBuild("js");
    let compared = 0;
    let anchored = 0;
    for (const x of cases) {
      const st = k.call("propagate", x);
      expect(u.solve(...x)).toBe(st);
      if (st >= 16) continue;
      const got = Array.from(k.out.slice(0, 7));
      expect(lagrange(u), `propagate(${x.join(", ")})`).toEqual(got.slice(0, 6));
      expect(u.get("UV_ITER")).toBe(got[6]);
      anchored += u.get("UV_ANCHORED");
      compared++;
    }
    expect(compared).toBeGreaterThan(250);
    expect(anchored).toBeGreaterThanOrEqual(HAIRPINS.length);
  });

  it("U0 = 1 - alpha U2, U1 = chi - alpha U3, r and the universal Kepler equation hold to a few ulp", () => {
    const u = universalModule();
    const bad: string[] = [];
    for (const x of cases) {
      if (u.solve(...x) !== 0) continue;
      const [chi, al, r0, s0, sq, dt, u0, u1, u2, u3, r] = ["UV_CHI", "UV_ALPHA", "UV_R0", "UV_SIGMA0", "UV_SQMU", "UV_DT", "UV_U0", "UV_U1", "UV_U2", "UV_U3", "UV_R"].map(u.get) as number[];
      const near = (lhs: number, rhs: number, scale: number, ulps: number): boolean => Math.abs(lhs - rhs) <= ulps * EPS * scale;
      if (!near(u0!, 1 - al! * u2!, 1 + Math.abs(al! * u2!), 8)) bad.push(`U0 ${x.join(",")}`);
      if (!near(u1!, chi! - al! * u3!, Math.abs(chi!) + Math.abs(al! * u3!), 8)) bad.push(`U1 ${x.join(",")}`);
      if (!near(r!, r0! * u0! + s0! * u1! + u2!, Math.abs(r0! * u0!) + Math.abs(s0! * u1!) + Math.abs(u2!), 4)) bad.push(`r ${x.join(",")}`);
      const terms = Math.abs(r0! * u1!) + Math.abs(s0! * u2!) + Math.abs(u3!) + Math.abs(sq! * dt!);
      // Laguerre-Conway stops once a step is below 2^-26 chi; the cubic convergence leaves the residual at rounding.
      if (!near(r0! * u1! + s0! * u2! + u3!, sq! * dt!, terms, 64)) bad.push(`Kepler ${x.join(",")}`);
    }
    expect(bad, bad.slice(0, 10).join("\n")).toEqual([]);
  });

  it("an anchored solution's anchor is periapsis (a . b = 0, sigma0 = 0)", () => {
    const u = universalModule();
    for (const x of HAIRPINS) {
      expect(u.solve(...x)).toBe(0);
      expect(u.get("UV_ANCHORED")).toBe(1);
      expect(u.get("UV_SIGMA0")).toBe(0);
      const a = ["UV_AX", "UV_AY", "UV_AZ"].map(u.get);
      const b = ["UV_BX", "UV_BY", "UV_BZ"].map(u.get);
      const dot = a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
      expect(Math.abs(dot)).toBeLessThan(1e-14 * Math.hypot(...a) * Math.hypot(...b));
      expect(Math.hypot(...a)).toBeCloseTo(u.get("UV_R0"), 6);
    }
  });

  it("a failure leaves the iteration count at 0 and its status as propagate's (NaN dt, mu <= 0, rectilinear)", () => {
    const u = universalModule();
    expect(u.solve(398600.4418, 7000, 0, 0, 0, 7.5, 0, NaN)).toBe(16);
    expect(u.get("UV_ITER")).toBe(0);
    expect(u.solve(-1, 7000, 0, 0, 0, 7.5, 0, 60)).toBe(17);
    expect(u.solve(398600.4418, 7000, 0, 0, 7.5, 0, 0, 60)).toBe(19);
  });
});
