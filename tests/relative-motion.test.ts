/**
 * relative_motion (assembly/relative.ts, Yamanaka & Ankersen 2002) against things outside it: the vector suite
 * (differences of 60-digit nonlinear propagations, harness/verify/reference/relative.ts), the Clohessy-Wiltshire
 * (1960) closed form written out here, the reference again next to e = 0 (no cliff), the f32 build against the
 * f64 build, statuses, and the CLI.
 */
import { describe, it, expect } from "vitest";
import { writeFileSync, mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release, single, run, areal } from "./helpers.js";
import { runSuite } from "../harness/verify/check.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { relativeMotionSpec } from "../harness/verify/specs/relative.js";
import { stateOf } from "../harness/verify/specs/twobody.js";
import { GM_EARTH as MU } from "../harness/core/constants.js";
import { referenceRelativeMotion } from "../harness/verify/reference/relative.js";

const norm = (x: readonly number[]): number => Math.hypot(...x);
/** max(|r - r_ref| / |r_ref|, |v - v_ref| / |v_ref|). */
function relErr(got: readonly number[], want: readonly number[]): number {
  const d = got.map((g, i) => g - want[i]!);
  return Math.max(norm(d.slice(0, 3)) / norm(want.slice(0, 3)), norm(d.slice(3)) / norm(want.slice(3)));
}

/**
 * Clohessy & Wiltshire (1960), "Terminal Guidance System for Satellite Rendezvous", J. Aerospace Sciences 27,
 * the homogeneous solution of their linearised equations for a circular chief of mean motion n, written in
 * this project's axes (x radial, y in-track, z cross-track; recalled from memory, the standard form).
 */
function cw(n: number, t: number, s: readonly number[]): number[] {
  const [x0, y0, z0, vx0, vy0, vz0] = s as [number, number, number, number, number, number];
  const S = Math.sin(n * t), C = Math.cos(n * t);
  return [
    (4 - 3 * C) * x0 + (S / n) * vx0 + (2 / n) * (1 - C) * vy0,
    6 * (S - n * t) * x0 + y0 - (2 / n) * (1 - C) * vx0 + ((4 * S - 3 * n * t) / n) * vy0,
    z0 * C + (vz0 / n) * S,
    3 * n * S * x0 + C * vx0 + 2 * S * vy0,
    -6 * n * (1 - C) * x0 - 2 * S * vx0 + (4 * C - 3) * vy0,
    -z0 * n * S + vz0 * C,
  ];
}

/** A chief of the given e and periapsis radius, inclined and rotated (nu0 in radians), and its period. */
function chief(e: number, rp: number, nu: number): { s: number[]; T: number; n: number } {
  const p = rp * (1 + e), a = p / (1 - e * e);
  const T = 2 * Math.PI * Math.sqrt((a * a * a) / MU);
  return { s: stateOf({ mu: MU, p, e, i: 0.9, raan: 1.1, argp: 2.3, nu, cls: "leo", planar: false }), T, n: (2 * Math.PI) / T };
}

describe("relative-motion suite against the decimal.js reference", () => {
  it("f64: every case within the limit (vectors/limits.json)", () => {
    const r = runSuite(relativeMotionSpec, release());
    expect(r.reasons).toEqual([]);
    expect(r.statusFailures).toBe(0);
    expect(r.cases).toBe(480);
  });

  it("covers e = 0 to 0.999, 0.01 to 6 orbits, both signs of dt", () => {
    const v = readVectors(vectorPath("relative-motion"));
    for (const t of ["circular", "near-circular", "moderate", "eccentric", "high-e", "extreme"]) {
      expect(v.tags).toContain(`${t}-short`);
      expect(v.tags).toContain(`${t}-long`);
    }
    expect(v.values.some((row) => row[13]! < 0)).toBe(true);
  });
});

describe("circular chief: Clohessy & Wiltshire (1960) as the special case", () => {
  for (const rp of [6778, 42164]) {
    it(`r = ${rp} km, 0.05 to 5.3 orbits, eight relative states: within 1e-12 (relative, position and velocity)`, () => {
      const c = chief(0, rp, 0.4);
      for (const frac of [0.05, 0.25, 0.5, 0.97, 1, 2.5, 5.3]) {
        for (let j = 0; j < 8; j++) {
          const s = [0.3, -1.2, 0.5, 0.2 * c.n, -0.7 * c.n, 0.4 * c.n].map((q, i) => (i === j % 6 ? q * -3 : q) * (j >= 6 ? 100 : 1));
          const [st, ...got] = run(release(), "relative_motion", [MU, ...c.s, ...s, frac * c.T], 6);
          expect(st).toBe(0);
          expect(relErr(got, cw(c.n, frac * c.T, s))).toBeLessThan(1e-12);
        }
      }
    });
  }

  it("the reference agrees with Clohessy-Wiltshire too (the check on the check)", () => {
    const c = chief(0, 7000, 1.0);
    const s = [0.3, -1.2, 0.5, 0.2 * c.n, -0.7 * c.n, 0.4 * c.n];
    expect(relErr(referenceRelativeMotion([MU, ...c.s, ...s, 1.7 * c.T]), cw(c.n, 1.7 * c.T, s))).toBeLessThan(1e-13);
  });
});

describe("no cliff at e = 0", () => {
  it("e = 1e-15 .. 1e-3 (chief from elements): within 1e-12 of the reference, continuous into the circle", () => {
    for (const e of [1e-15, 1e-12, 1e-9, 1e-6, 1e-3]) {
      const c = chief(e, 7000, 2.0);
      const s = [0.3, -1.2, 0.5, 0.2 * c.n, -0.7 * c.n, 0.4 * c.n];
      for (const frac of [0.3, 3.3]) {
        const x = [MU, ...c.s, ...s, frac * c.T];
        const [st, ...got] = run(release(), "relative_motion", x, 6);
        expect(st).toBe(0);
        expect(relErr(got, referenceRelativeMotion(x))).toBeLessThan(1e-12);
      }
    }
  });
});

describe("f32 build", () => {
  it("compiles the same source: ok and within 1e-3 of the f64 result (LEO, e = 0.1, a quarter orbit)", () => {
    const c = chief(0.1, 7000, 0.5);
    const s = [0.3, -1.2, 0.5, 0.2 * c.n, -0.7 * c.n, 0.4 * c.n];
    const x = [MU, ...c.s, ...s, 0.25 * c.T].map(Math.fround);
    const [s32, ...g32] = run(single(), "relative_motion", x, 6);
    const [s64, ...g64] = run(release(), "relative_motion", x, 6);
    expect([s32, s64]).toEqual([0, 0]);
    expect(relErr(g32, g64)).toBeLessThan(1e-3);
  });

  it("never ok with a non-finite output at the ends of the range", () => {
    for (const k of [release(), single()]) {
      for (const big of [1e30, 3e38, 1e300]) {
        for (const x of [
          [MU, 7000, 0, 0, 0, 7.5, 0, big, 0, 0, 0, 0, 0, 100],
          [MU, 7000, 0, 0, 0, 7.5, 0, 1, 0, 0, 0, 0, 0, big],
          [big, 7000, 0, 0, 0, 7.5, 0, 1, 0, 0, 0, 0, 0, 100],
          [MU, big, 0, 0, 0, 7.5, 0, 1, 0, 0, 0, 0, 0, 100],
        ]) {
          const [st, ...out] = run(k, "relative_motion", x, 6);
          if (st < 16) expect(out.every(Number.isFinite)).toBe(true);
        }
      }
    }
  });
});

describe("statuses", () => {
  const ok = [MU, 7000, 0, 0, 0, 7.5, 0.1, 0.1, 0, 0, 0, 0, 0, 600];
  for (const k of [release(), single()]) {
    it(`${k.label}: non-finite -> 16; mu <= 0, r = 0, e >= 1 -> 17; rectilinear chief -> 19`, () => {
      for (let i = 0; i < ok.length; i++) {
        const a = ok.slice();
        a[i] = NaN;
        expect(k.call("relative_motion", a)).toBe(16);
      }
      const set = (i: number, v: number): number[] => ok.map((q, j) => (j === i ? v : q));
      expect(k.call("relative_motion", set(0, 0))).toBe(17);
      expect(k.call("relative_motion", set(0, -1))).toBe(17);
      expect(k.call("relative_motion", [MU, 0, 0, 0, ...ok.slice(4)])).toBe(17);
      expect(k.call("relative_motion", set(5, Math.sqrt((2 * MU) / 7000) * 1.0001))).toBe(17); // hyperbolic
      expect(k.call("relative_motion", set(5, Math.sqrt((2 * MU) / 7000)))).toBe(17); // e = 1 (within rounding)
      expect(k.call("relative_motion", [MU, 7000, 0, 0, 3, 0, 0, ...ok.slice(7)])).toBe(19);
      expect(k.call("relative_motion", ok)).toBe(0);
    });
  }
});

describe("CLI", () => {
  it("`areal eval relative-motion -i cases.csv` takes the routine's named columns", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-rel-"));
    const f = join(dir, "cases.csv");
    writeFileSync(f, "mu,rcx,rcy,rcz,vcx,vcy,vcz,x0,y0,z0,vx0,vy0,vz0,dt\n398600.4418,7000,0,0,0,7.546,0,0.1,0,0,0,0,0,600\n");
    const r = areal("eval", "relative-motion", "-i", f);
    expect(r.code).toBe(0);
    const [head, row] = r.out.trim().split("\n");
    expect(head).toBe("mu,rcx,rcy,rcz,vcx,vcy,vcz,x0,y0,z0,vx0,vy0,vz0,dt,x,y,z,vx,vy,vz,status");
    expect(row!.endsWith(",ok")).toBe(true);
  });
});
