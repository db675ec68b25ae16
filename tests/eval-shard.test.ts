/**
 * `areal eval --shard k/n`: the rows starting in byte range k of n of the input; part 1 carries the header, so
 * the parts joined in order are exactly the bytes of one run over the whole file, for any n, with one worker or
 * two, and with more shards than rows (empty parts). Run through bin/areal.mjs as a job array would.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal } from "./helpers.js";
import { shardBytes } from "../harness/run/evaluate.js";

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-eval-shard-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function joined(input: string, n: number, workers: string): Buffer {
  const parts: Buffer[] = [];
  for (let k = 1; k <= n; k++) {
    const out = join(dir, `part-${n}-${workers}-${k}.csv`);
    const r = areal("eval", "kepler-elliptic", "--input", input, "--shard", `${k}/${n}`, "--workers", workers, "--out", out);
    expect(r.code, r.err).toBe(0);
    parts.push(readFileSync(out));
  }
  return Buffer.concat(parts);
}

describe("eval --shard", () => {
  it("the parts joined in order are the bytes of one run (n = 3 and 7, one and two workers, rows of uneven length)", () => {
    const rows = ["id,e,M"];
    for (let i = 0; i < 3000; i++) rows.push(`${"x".repeat(i % 37)}${i},${(i % 97) / 97.5},${(i - 1500) * 0.0137}`);
    const input = join(dir, "in.csv");
    writeFileSync(input, rows.join("\n") + "\n");
    const whole = join(dir, "whole.csv");
    expect(areal("eval", "kepler-elliptic", "--input", input, "--workers", "1", "--out", whole).code).toBe(0);
    const want = readFileSync(whole);
    for (const [n, w] of [[3, "1"], [7, "1"], [3, "2"]] as const) expect(Buffer.compare(joined(input, n, w), want), `n = ${n}, workers ${w}`).toBe(0);
  });

  it("more shards than rows: empty parts, still the same bytes; a bad shard names the flag", () => {
    const input = join(dir, "small.csv");
    writeFileSync(input, "e,M\n0.1,1\n0.2,2\n");
    const whole = join(dir, "small-out.csv");
    expect(areal("eval", "kepler-elliptic", "--input", input, "--out", whole).code).toBe(0);
    expect(Buffer.compare(joined(input, 9, "1"), readFileSync(whole))).toBe(0);
    expect(areal("eval", "kepler-elliptic", "--input", input, "--shard", "4/3").err).toMatch(/--shard: '4\/3'/);
  });

  it("the byte ranges tile the data exactly", () => {
    for (const [first, size, n] of [[10, 1000, 3], [4, 5, 9], [0, 2 ** 40 + 7, 1000]] as const) {
      let at: number = first;
      for (let k = 1; k <= n; k++) {
        const { lo, hi } = shardBytes(first, size, k, n);
        expect(lo).toBe(at);
        expect(hi).toBeGreaterThanOrEqual(lo);
        at = hi;
      }
      expect(at).toBe(size);
    }
  });
});
