/**
 * The elliptic solver's one-step claim (kepler_elliptic.ts header): every vector case and seeded random cases,
 * the e -> 1, M -> 0 corner included, take exactly one correction step (0 for the special cases e = 0, M = 0,
 * |M| >= 2^53 and |M| below KEPLER_LINEAR_MAX). It holds because both starters (the table's cubics, Markley's in
 * the corner cells) are within 2^-11 of the root and the step is of fifth order (Householder; the stopping rule
 * is 2^-11 relative). A starter table that does not reach that accuracy, or a corner cell read from the table,
 * breaks it. scripts/kepler-steps.mjs runs the same count on 3,000,000 cases.
 * Sources: F. L. Markley, Celest. Mech. Dyn. Astron. 63 (1995) 101-111 (starter); the cases' roots are not
 * needed here (accuracy: tests/kepler-accuracy.test.ts against the 60-digit references).
 */
import { describe, it, expect } from "vitest";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { slotsOf } from "../harness/module/routines.js";
import { Rng } from "../harness/core/rng.js";
import { release, single } from "./helpers.js";

const S = slotsOf("kepler_elliptic", "E", "iterations");

describe("kepler_elliptic takes one correction step", () => {
  it("on every row of the kepler-elliptic suite (release build) and of kepler-elliptic-f32in (f32 build)", () => {
    for (const [k, suite] of [[release(), "kepler-elliptic"], [single(), "kepler-elliptic-f32in"]] as const) {
      const v = readVectors(vectorPath(suite));
      const bad: string[] = [];
      for (const row of v.values) {
        const e = row[col(v, "e")]!;
        const M = row[col(v, "M")]!;
        expect(k.call("kepler_elliptic", [e, M])).toBe(0);
        if (k.out[S.iterations]! > 1) bad.push(`e=${e} M=${M}: ${k.out[S.iterations]} steps`);
      }
      expect(bad.slice(0, 10), `${bad.length} cases`).toEqual([]);
    }
  });

  it("on 200,000 seeded random cases: e uniform and 1 - 10^-U(0,16); M uniform in [-pi, pi], 10^U(-12,0), 10^U(0,4)", () => {
    const k = release();
    const rng = new Rng(20261205);
    const bad: string[] = [];
    for (let c = 0; c < 200_000; c++) {
      const e = c % 2 === 0 ? rng.uniform() : Math.min(1 - 10 ** (-16 * rng.uniform()), 1 - 2 ** -53);
      const kind = Math.floor(c / 2) % 3;
      const sign = rng.uniform() < 0.5 ? -1 : 1;
      const M = kind === 0 ? rng.between(-Math.PI, Math.PI) : sign * 10 ** (kind === 1 ? -12 * rng.uniform() : 4 * rng.uniform());
      expect(k.call("kepler_elliptic", [e, M])).toBe(0);
      if (k.out[S.iterations]! > 1) bad.push(`e=${e} M=${M}: ${k.out[S.iterations]} steps`);
    }
    expect(bad.slice(0, 10), `${bad.length} cases`).toEqual([]);
  });
});
