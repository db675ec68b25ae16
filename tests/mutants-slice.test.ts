/**
 * The mutation check in small: the catalogue (mutants/catalogue.json) still fits the code (every pattern occurs
 * exactly once in its file, every named test file exists, at least 40 mutants across kernels, the harness's
 * checking code, parsing and the invariant monitor), and a fixed slice of fast mutants (those marked `slice`: the
 * NaN guard deleted, the number pattern loosened, the golden script's refusal disabled) is each caught by its named
 * tests in a scratch copy. The whole catalogue runs with `npm run mutants` (scripts/mutants.mjs).
 */
import { describe, it, expect } from "vitest";
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { readCatalogue, runMutant } from "../scripts/mutants.mjs";
import { ROOT } from "../harness/core/paths.js";

const catalogue = readCatalogue();

describe("mutant catalogue", () => {
  it("fits the code: each pattern once in its file, each named test present", () => {
    const misfits: string[] = [];
    for (const m of catalogue) {
      const path = join(ROOT, m.file);
      const n = existsSync(path) ? readFileSync(path, "utf8").split(m.pattern).length - 1 : 0;
      if (n !== 1) misfits.push(`${m.id}: pattern found ${n} times in ${m.file}`);
      for (const t of m.tests) if (!existsSync(join(ROOT, t))) misfits.push(`${m.id}: no test file ${t}`);
      if (!m.why || m.tests.length === 0) misfits.push(`${m.id}: no reason or no tests`);
    }
    expect(misfits).toEqual([]);
  });

  it("has at least 40 mutants, over kernels, checking code, parsing and the monitor, with unique ids", () => {
    expect(catalogue.length).toBeGreaterThanOrEqual(40);
    expect(new Set(catalogue.map((m) => m.id)).size).toBe(catalogue.length);
    const files = new Set(catalogue.map((m) => m.file));
    for (const f of ["assembly/kepler_elliptic.ts", "assembly/monitor.ts", "harness/verify/check.ts", "harness/core/float.ts"]) expect(files.has(f), f).toBe(true);
    expect(catalogue.filter((m) => m.file.startsWith("assembly/")).length).toBeGreaterThanOrEqual(30);
  });
});

describe("a slice of the mutants, each in a scratch copy", () => {
  const slice = catalogue.filter((m) => m.slice);
  it("is two or three fast mutants", () => expect(slice.length).toBeGreaterThanOrEqual(2));
  for (const m of slice) {
    it(`${m.id} is caught by ${m.tests.join(", ")}`, async () => {
      const r = await runMutant(m, ROOT);
      expect(r, m.why).toMatchObject({ verdict: "caught" });
    }, 600_000);
  }
});
