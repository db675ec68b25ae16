/**
 * `npm run golden` writes the golden bits only after every accuracy suite passes on the same build: in a scratch
 * copy of the project (never the working tree) with one limit made impossible, scripts/golden.mjs refuses, names
 * the failing suite and writes nothing; with the limits as committed it writes files identical to the committed ones.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { spawnSync } from "node:child_process";
import { readFileSync, writeFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { scratchCopy, removeScratch } from "../scripts/mutants.mjs";
import { ROOT } from "../harness/core/paths.js";

let dir = "";
beforeAll(() => {
  dir = scratchCopy(ROOT);
});
afterAll(() => {
  if (dir) removeScratch(dir);
});

const golden = (root: string) => Object.fromEntries(readdirSync(join(root, "vectors", "golden")).map((f) => [f, readFileSync(join(root, "vectors", "golden", f), "utf8")]));
const runGolden = () => spawnSync(process.execPath, [join(dir, "scripts", "golden.mjs")], { cwd: dir, encoding: "utf8" });

describe("golden files only from a build that passes every accuracy suite", () => {
  it("a failing suite: refused, named, nothing written", () => {
    const path = join(dir, "vectors", "limits.json");
    const original = readFileSync(path, "utf8");
    const limits = JSON.parse(original);
    limits["kepler-parabolic"].f64.max_ulp = 0; // measured 1 ulp: now some case fails
    writeFileSync(path, JSON.stringify(limits, null, 2));
    for (const f of readdirSync(join(dir, "vectors", "golden"))) writeFileSync(join(dir, "vectors", "golden", f), "stale\n");
    try {
      const r = runGolden();
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(/refused/);
      expect(r.stderr).toMatch(/kepler-parabolic: fail/);
      expect(r.stderr).not.toMatch(/kepler-elliptic:/);
      for (const text of Object.values(golden(dir))) expect(text).toBe("stale\n");
    } finally {
      writeFileSync(path, original);
    }
  });

  it("every suite passing: the files written equal the committed ones", () => {
    const r = runGolden();
    expect(r.status, r.stderr).toBe(0);
    expect(golden(dir)).toEqual(golden(ROOT));
  });
});
