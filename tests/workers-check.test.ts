/**
 * `areal check --workers N`: suites spread over worker threads give the same table and the same JSON as one
 * worker (through bin/areal.mjs as a child process).
 */
import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const BIN = fileURLToPath(new URL("../bin/areal.mjs", import.meta.url));

describe("areal check with workers", () => {
  it("--workers 1 and --workers 2 print the same table and write the same JSON", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-check-"));
    const run = (w: string): { out: string; json: string; code: number | null } => {
      const json = join(dir, `w${w}.json`);
      const suites = ["kepler-elliptic", "kepler-hyperbolic", "kepler-parabolic", "time-of-flight"].flatMap((s) => ["--suite", s]);
      const r = spawnSync(process.execPath, [BIN, "check", ...suites, "--workers", w, "--json", json, "-v"], { encoding: "utf8" });
      return { out: r.stdout, json: readFileSync(json, "utf8"), code: r.status };
    };
    const a = run("1");
    const b = run("2");
    expect(a.code).toBe(0);
    expect(a.out).toMatch(/kepler-hyperbolic/);
    expect(b.out).toBe(a.out);
    expect(b.json).toBe(a.json);
  });
});
