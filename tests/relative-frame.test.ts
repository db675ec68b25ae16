/**
 * The rotating-frame kernels (to_relative, from_relative, assembly/relative.ts): against the decimal.js frame
 * mapping (harness/verify/reference/relative.ts), round trips to round-off, an exact fact of the frame (a deputy on the
 * chief's own circular orbit is at rest in it), and the special-case statuses.
 */
import { describe, it, expect } from "vitest";
import { release, single, run } from "./helpers.js";
import { Rng } from "../harness/core/rng.js";
import { Dec, exact, toDouble } from "../harness/verify/reference/decimal.js";
import { toRelativeDec, fromRelativeDec } from "../harness/verify/reference/relative.js";
import type { V3 } from "../harness/verify/reference/vec3.js";

const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)
const EPS = 2 ** -52;
const maxAbs = (x: readonly number[]): number => Math.max(...x.map(Math.abs));
const v3 = (x: readonly number[]): V3 => [exact(Dec, x[0]!), exact(Dec, x[1]!), exact(Dec, x[2]!)];

/** The frame's rate |r x v| / |r|^2. */
const rate = (c: readonly number[]): number =>
  Math.hypot(c[1]! * c[5]! - c[2]! * c[4]!, c[2]! * c[3]! - c[0]! * c[5]!, c[0]! * c[4]! - c[1]! * c[3]!) / (c[0]! ** 2 + c[1]! ** 2 + c[2]! ** 2);

/** A seeded chief state (any orientation, r 6600..45000 km, speed 0.5..1.3 circular) and a deputy near it. */
function draw(rng: Rng): { chief: number[]; deputy: number[]; rel: number[] } {
  const dir = (): number[] => {
    const z = rng.between(-1, 1), t = rng.between(0, 2 * Math.PI), s = Math.sqrt(1 - z * z);
    return [s * Math.cos(t), s * Math.sin(t), z];
  };
  const r = rng.between(6600, 45000);
  const v = Math.sqrt(MU / r) * rng.between(0.5, 1.3);
  const chief = [...dir().map((c) => c * r), ...dir().map((c) => c * v)];
  const sep = 10 ** rng.between(-3, 2); // 1 m to 100 km
  const rel = [...dir().map((c) => c * sep), ...dir().map((c) => c * sep * 1e-3)];
  const deputy = chief.map((c, i) => c + rel[i]!);
  return { chief, deputy, rel };
}

describe("to_relative and from_relative against the decimal.js frame mapping", () => {
  it("200 seeded chief/deputy pairs: every component within 4 ulp of the largest term", () => {
    const k = release();
    const rng = new Rng(20261205);
    for (let n = 0; n < 200; n++) {
      const { chief, deputy, rel } = draw(rng);
      const [st, ...got] = run(k, "to_relative", [...chief, ...deputy], 6);
      expect(st).toBe(0);
      const want = toRelativeDec(v3(chief), v3(chief.slice(3)), v3(deputy), v3(deputy.slice(3))).map(toDouble);
      // Terms: the inputs' differences are exact to an ulp of the chief's components.
      const w = rate(chief);
      const posTerm = maxAbs(chief.slice(0, 3));
      const velTerm = maxAbs(chief.slice(3)) + w * maxAbs(rel.slice(0, 3));
      for (let i = 0; i < 3; i++) expect(Math.abs(got[i]! - want[i]!)).toBeLessThanOrEqual(4 * EPS * posTerm);
      for (let i = 3; i < 6; i++) expect(Math.abs(got[i]! - want[i]!)).toBeLessThanOrEqual(4 * EPS * velTerm);
      const [st2, ...back] = run(k, "from_relative", [...chief, ...want], 6);
      expect(st2).toBe(0);
      const inv = fromRelativeDec(v3(chief), v3(chief.slice(3)), want.map((q) => exact(Dec, q)));
      const wantBack = [...inv.r, ...inv.v].map(toDouble);
      for (let i = 0; i < 6; i++) expect(Math.abs(back[i]! - wantBack[i]!)).toBeLessThanOrEqual(4 * EPS * (i < 3 ? posTerm : velTerm));
    }
  });

  it("round trips: from(to(deputy)) = deputy and to(from(rel)) = rel to a few ulp of the chief's terms", () => {
    const k = release();
    const rng = new Rng(7);
    let worstR = 0, worstV = 0;
    for (let n = 0; n < 1000; n++) {
      const { chief, deputy } = draw(rng);
      const [, ...rel] = run(k, "to_relative", [...chief, ...deputy], 6);
      const [st, ...dep] = run(k, "from_relative", [...chief, ...rel], 6);
      expect(st).toBe(0);
      const rS = maxAbs(chief.slice(0, 3)), vS = maxAbs(chief.slice(3));
      for (let i = 0; i < 3; i++) worstR = Math.max(worstR, Math.abs(dep[i]! - deputy[i]!) / (EPS * rS));
      for (let i = 3; i < 6; i++) worstV = Math.max(worstV, Math.abs(dep[i]! - deputy[i]!) / (EPS * vS));
      const [, ...rel2] = run(k, "to_relative", [...chief, ...dep], 6);
      for (let i = 0; i < 3; i++) expect(Math.abs(rel2[i]! - rel[i]!)).toBeLessThanOrEqual(8 * EPS * rS);
      for (let i = 3; i < 6; i++) expect(Math.abs(rel2[i]! - rel[i]!)).toBeLessThanOrEqual(8 * EPS * vS);
    }
    expect(worstR).toBeLessThanOrEqual(4);
    expect(worstV).toBeLessThanOrEqual(4);
  });
});

describe("facts of the rotating frame (common practice)", () => {
  it("a deputy ahead on the chief's own circular orbit sits at (r (cos a - 1), r sin a, 0), at rest", () => {
    const r = 7000, v = Math.sqrt(MU / r);
    for (const a of [1e-6, 1e-3, 0.1, 1]) {
      // Chief on the x axis moving along y; deputy a radians ahead on the same circle.
      const dep = [r * Math.cos(a), r * Math.sin(a), 0, -v * Math.sin(a), v * Math.cos(a), 0];
      const [st, ...rel] = run(release(), "to_relative", [r, 0, 0, 0, v, 0, ...dep], 6);
      expect(st).toBe(0);
      const want = [r * (Math.cos(a) - 1), r * Math.sin(a), 0, 0, 0, 0];
      for (let i = 0; i < 3; i++) expect(Math.abs(rel[i]! - want[i]!)).toBeLessThanOrEqual(4 * EPS * r);
      for (let i = 3; i < 6; i++) expect(Math.abs(rel[i]!)).toBeLessThanOrEqual(4 * EPS * v);
    }
  });

  it("axes: radial out, in-track along the velocity, cross-track along h (inclined, eccentric chief)", () => {
    const rc = [0, 0, 8000], vc = [0, -7.5, 1.2]; // h = r x v = (60000, 0, 0): z along +X, y = z x x along -Y
    const [, x, y, z] = run(release(), "to_relative", [...rc, ...vc, 0, 0, 8001, ...vc], 6);
    expect([x, y, z]).toEqual([1, 0, 0]);
    const [, x2, y2, z2] = run(release(), "to_relative", [...rc, ...vc, 0, -1, 8000, ...vc], 6);
    expect([x2, y2, z2]).toEqual([0, 1, 0]);
    const [, x3, y3, z3] = run(release(), "to_relative", [...rc, ...vc, 1, 0, 8000, ...vc], 6);
    expect([x3, y3, z3]).toEqual([0, 0, 1]);
  });
});

describe("statuses", () => {
  const ok = [7000, 0, 0, 0, 7.5, 0.1, 7001, 0, 0, 0, 7.5, 0.1];
  for (const name of ["to_relative", "from_relative"]) {
    for (const k of [release(), single()]) {
      it(`${name} (${k.label}): non-finite -> 16, r = 0 -> 17, rectilinear chief -> 19`, () => {
        for (let i = 0; i < 12; i++) {
          for (const bad of [NaN, Infinity]) {
            const a = ok.slice();
            a[i] = bad;
            expect(k.call(name, a)).toBe(16);
          }
        }
        expect(k.call(name, [0, 0, 0, ...ok.slice(3)])).toBe(17);
        expect(k.call(name, [7000, 0, 0, 1, 0, 0, ...ok.slice(6)])).toBe(19);
        expect(k.call(name, ok)).toBe(0);
      });
    }
  }
});
