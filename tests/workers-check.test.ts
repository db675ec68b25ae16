/**
 * `areal check --workers N`: suites spread over worker threads give the same table and the same JSON as one
 * worker (through bin/areal.mjs as a child process), and the same results in-process with the pool forced on
 * (the built-in vector files are below the size at which check starts workers at all).
 */
import { describe, it, expect } from "vitest";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release, areal } from "./helpers.js";
import { runSuitesOn, CHECK_WORKERS_MIN_BYTES } from "../harness/verify/check.js";
import { selectSpecs } from "../harness/verify/generate.js";
import { vectorPath } from "../harness/verify/vectors.js";
import { statSync } from "node:fs";


describe("areal check with workers", () => {
  it("--workers 1 and --workers 2 print the same table and write the same JSON", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-check-"));
    const run = (w: string): { out: string; json: string; code: number | null } => {
      const json = join(dir, `w${w}.json`);
      const suites = ["kepler-elliptic", "kepler-hyperbolic", "kepler-parabolic", "time-of-flight"].flatMap((s) => ["--suite", s]);
      const r = areal("check", ...suites, "--workers", w, "--json", json, "-v");
      return { out: r.out, json: readFileSync(json, "utf8"), code: r.code };
    };
    const a = run("1");
    const b = run("2");
    expect(a.code).toBe(0);
    expect(a.out).toMatch(/kepler-hyperbolic/);
    expect(b.out).toBe(a.out);
    expect(b.json).toBe(a.json);
  });
});

describe("runSuitesOn", () => {
  const specs = selectSpecs(["kepler-elliptic", "kepler-hyperbolic", "state", "propagate", "lambert"]);

  it("with the pool forced on (no size threshold), 2 and 3 workers give the one-thread results in suite order", async () => {
    const one = await runSuitesOn(specs, release(), { build: "f64" }, 1, 0);
    expect(one.map((r) => r.suite)).toEqual(specs.map((s) => s.suite));
    for (const w of [2, 3]) expect(JSON.stringify(await runSuitesOn(specs, release(), { build: "f64" }, w, 0))).toBe(JSON.stringify(one));
  });

  it("limits other than areal's own travel with each worker's job (a zero-ulp policy fails the same suites in every thread count)", async () => {
    // Hostile policy: no error allowed at all. The elliptic and hyperbolic suites have cases at 1-2 ulp (their
    // kernel headers), so both must fail, in the pool exactly as in one thread.
    const strict = (): { max_ulp: number; max_rel: number; max_abs: number } => ({ max_ulp: 0, max_rel: 0, max_abs: 0 });
    const one = await runSuitesOn(specs, release(), { build: "f64" }, 1, 0, strict);
    const two = await runSuitesOn(specs, release(), { build: "f64" }, 2, 0, strict);
    expect(one.filter((r) => !r.pass).map((r) => r.suite)).toEqual(expect.arrayContaining(["kepler-elliptic", "kepler-hyperbolic"]));
    expect(JSON.stringify(two)).toBe(JSON.stringify(one));
  });

  it("below the size threshold it stays in this thread (the built-in files are small)", async () => {
    const bytes = specs.reduce((s, x) => s + statSync(vectorPath(x.suite)).size, 0);
    expect(bytes).toBeLessThan(CHECK_WORKERS_MIN_BYTES);
    // A module source no worker could load: used only if a pool starts.
    const r = await runSuitesOn(specs, release(), { module: "/nonexistent/module.wasm" }, 2);
    expect(r).toHaveLength(specs.length);
    await expect(runSuitesOn(specs, release(), { module: "/nonexistent/module.wasm" }, 2, 0)).rejects.toThrow();
  });
});
