/**
 * `areal sweep` and `areal merge` as a batch job runs them (bin/areal.mjs as a child process): shards written
 * by separate processes merge into the file of one run; bad grids, shards and file lists exit 2 with the
 * field, flag or file named.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal } from "./helpers.js";

let dir: string;

function file(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

const GRID = JSON.stringify({
  inputs: { M: { from: 1e-6, to: 1e6, count: 3000, spacing: "log" } },
  random: { count: 1000, seed: 3 },
  checks: 3,
  worst: 2,
});

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-sweep-"));
});

describe("areal sweep and merge", () => {
  it("three shards from three processes merge into the single run's file", () => {
    const grid = file("grid.json", GRID);
    const all = join(dir, "all.json");
    const one = areal("sweep", "kepler-parabolic", "--grid", grid, "--out", all, "--workers", "1");
    expect(one.code).toBe(0);
    expect(one.err).toMatch(/shard 1\/1: 4000 cases \(4000 ok\)/);
    const parts: string[] = [];
    for (const k of [1, 2, 3]) {
      const p = join(dir, `part-${k}.json`);
      expect(areal("sweep", "kepler-parabolic", "--grid", grid, "--shard", `${k}/3`, "--out", p).code).toBe(0);
      parts.push(p);
    }
    const merged = join(dir, "merged.json");
    const m = areal("merge", ...parts.reverse(), "--out", merged);
    expect(m.code).toBe(0);
    expect(readFileSync(merged, "utf8")).toBe(readFileSync(all, "utf8"));
    const doc = JSON.parse(readFileSync(all, "utf8")) as { cases: number; error: { max: number }; reference: { checked: number } };
    expect(doc.cases).toBe(4000);
    expect(doc.reference.checked).toBeGreaterThanOrEqual(3);
    // A missing shard: exit 2, nothing written.
    const none = join(dir, "none.json");
    const bad = areal("merge", parts[0]!, parts[1]!, "--out", none);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/missing shard 1\/3/);
    expect(existsSync(none)).toBe(false);
  });

  it("bad grid, shard and usage: exit 2, the field or flag named", () => {
    const out = join(dir, "x.json");
    const g = file("g.json", GRID);
    expect(areal("sweep", "kepler-parabolic", "--grid", file("b1.json", '{"inputs":{"M":{"from":0,"to":1,"count":3,"spacing":"log"}}}'), "--out", out).err).toMatch(/b1\.json: inputs\.M: log spacing needs from and to of one sign/);
    const badShard = areal("sweep", "kepler-parabolic", "--grid", g, "--shard", "4/3", "--out", out);
    expect(badShard.code).toBe(2);
    expect(badShard.err).toMatch(/--shard: '4\/3'/);
    expect(areal("sweep", "kepler-parabolic", "--out", out).err).toMatch(/--grid/);
    expect(existsSync(out)).toBe(false);
  });

  it("--resume keeps a part that already holds its whole shard, and reruns a broken or foreign one", () => {
    const grid = file("grid-r.json", GRID);
    const part = join(dir, "resume-2.json");
    const args = ["sweep", "kepler-parabolic", "--grid", grid, "--shard", "2/3", "--workers", "1", "--out", part, "--resume"];
    expect(areal(...args).code).toBe(0);
    const first = readFileSync(part, "utf8");
    const again = areal(...args);
    expect(again.code).toBe(0);
    expect(again.err).toMatch(/already holds it \(1333 cases\); kept/);
    writeFileSync(part, first.slice(0, first.length / 2)); // a half-written part (a task killed mid-write elsewhere)
    const broken = areal(...args);
    expect(broken.err).not.toMatch(/already holds it/);
    expect(readFileSync(part, "utf8")).toBe(first);
    const other = areal("sweep", "kepler-parabolic", "--grid", grid, "--shard", "3/3", "--workers", "1", "--out", part, "--resume");
    expect(other.err).not.toMatch(/already holds it/); // shard 3's run replaces shard 2's file
  });
});
