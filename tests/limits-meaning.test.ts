/**
 * Every limit means something on every row a build is checked on: no row accepts an error of 100% relative or
 * more (2^52 ulps on f64, 2^23 on f32; 1 on an absolute comparison, radians or a dimensionless element), unless
 * vectors/limits.json lists that row under `beyond_full_scale` with the reason and README.md names it. A listed
 * row must still need it (the list cannot go stale), and an output whose reference reaches zero (e of a nearly
 * circular orbit) is compared absolutely, not relatively.
 */
import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { SPECS } from "../harness/verify/specs/index.js";
import { caseLimit } from "../harness/verify/check.js";
import { limitsFor } from "../harness/verify/limits.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";
import { findRoutine } from "../harness/module/routines.js";
import type { Comparison } from "../harness/verify/specs/types.js";

/** The limit of a case as a fraction of the full scale of the output (1 = anything within 100% passes). */
function fullScaleFraction(c: Comparison, lim: number, build: "f64" | "f32"): number {
  if (c.metric === "rel") return lim;
  if (c.metric === "ulp") return lim * (build === "f32" ? 2 ** -23 : 2 ** -52);
  return lim;
}

/** Rows a build is checked on: on f32 only those whose inputs are exact normal f32 values (as check.ts). */
function checkedRows(values: readonly (readonly number[])[], argCols: readonly number[], build: "f64" | "f32"): number[] {
  const rows: number[] = [];
  values.forEach((row, i) => {
    if (build === "f32" && argCols.some((q) => Math.fround(row[q]!) !== row[q] || (row[q] !== 0 && Math.abs(row[q]!) < 2 ** -126))) return;
    rows.push(i);
  });
  return rows;
}

describe("limits that mean something on every row", () => {
  const readme = readFileSync(new URL("../README.md", import.meta.url), "utf8");
  for (const spec of SPECS) {
    for (const build of ["f64", "f32"] as const) {
      it(`${spec.suite} (${build})`, () => {
        const v = readVectors(vectorPath(spec.suite));
        const lim = limitsFor(spec.suite, build);
        const argCols = findRoutine(spec.routine)!.inputs.map((inp) => col(v, inp.name));
        const rows = checkedRows(v.values, argCols, build);
        for (const c of spec.compare) {
          const listed = new Set(lim.beyond_full_scale?.[c.output]?.rows ?? []);
          const [ci, ri, wi] = [c.cond ? col(v, c.cond) : -1, c.revs ? col(v, c.revs) : -1, col(v, c.ref)];
          const over: number[] = [];
          for (const r of rows) {
            const row = v.values[r]!;
            const l = caseLimit(c, lim, ci >= 0 ? row[ci]! : undefined, ri >= 0 ? row[ri]! : 0, row[wi]!);
            if (fullScaleFraction(c, l, build) >= 1) over.push(r);
          }
          expect(over.filter((r) => !listed.has(r)), `${spec.suite} ${build} ${c.output}: rows whose limit is 100% or more`).toEqual([]);
          expect([...listed].filter((r) => !over.includes(r)), `${spec.suite} ${build} ${c.output}: listed rows that no longer need it`).toEqual([]);
          // README names the suite and, in the same sentence, the output.
          if (listed.size > 0) expect(readme, `README names ${spec.suite} ${c.output}`).toMatch(new RegExp(`\`${spec.suite}\`[^.]*\\b${c.output}\\b`));
        }
      });
    }
  }

  it("e of a nearly circular orbit is compared absolutely (a relative limit accepted any e there)", () => {
    for (const spec of SPECS.filter((s) => s.routine === "elements")) {
      const e = spec.compare.find((c) => c.output === "e")!;
      expect(e.metric).toBe("abs");
      expect(e.condRelative).toBe(true);
    }
  });
});
