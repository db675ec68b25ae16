/**
 * The main thread as one of eval's workers (run/evaluate.ts localRanges, KeptBytes): a range it runs while an
 * earlier range is still out keeps its own output bytes, so the next range it runs (which writes the codec's
 * memory again) leaves them as they were; a range written at once is handed over as it is; a buffer given back
 * is reused. Expected bytes come from evaluateCsv over the same lines (the string path's own output).
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release } from "./helpers.js";
import { evaluateCsv, localRanges, prepareEval, KeptBytes } from "../harness/run/evaluate.js";
import { findRoutine } from "../harness/module/routines.js";
import { RangeReader } from "../harness/core/stream.js";

const elliptic = findRoutine("kepler-elliptic")!;
const HEADER = "e,M\n";

describe("eval: the main thread's ranges", () => {
  let path = "";
  let rows: string[] = [];
  beforeAll(() => {
    rows = Array.from({ length: 400 }, (_, i) => `${(i % 97) / 100},${((i * 37) % 611) / 100 - 3}`);
    path = join(mkdtempSync(join(tmpdir(), "areal-eval-local-")), "cases.csv");
    writeFileSync(path, HEADER + rows.map((r) => r + "\n").join(""));
  });
  const expected = (lines: readonly string[]): string => evaluateCsv(elliptic, HEADER + lines.map((r) => r + "\n").join(""), "x.csv", release()).csv.split("\n").slice(1).join("\n");

  it("a range kept while another runs keeps its bytes; one written at once is the codec's view", () => {
    const k = release();
    const own = { reader: new RangeReader(path, HEADER.length, HEADER.length + rows.join("\n").length + 1, "cases.csv"), columns: ["e", "M"], source: "cases.csv" };
    const kept = new KeptBytes();
    const run = localRanges(elliptic, prepareEval(elliptic, ["e", "M"], "cases.csv", k), own, k, kept);
    const half = HEADER.length + rows.slice(0, 200).join("\n").length + 1; // the first byte of row 201
    const end = HEADER.length + rows.join("\n").length + 1;
    const a = run({ start: HEADER.length, end: half }, false);
    const b = run({ start: half, end }, false); // overwrites the codec's memory
    const text = (u: Uint8Array): string => Buffer.from(u).toString("utf8");
    expect(a.rows).toBe(200);
    expect(text(a.bytes) + text(b.bytes)).toBe(expected(rows));
    kept.release(a.bytes);
    const c = run({ start: HEADER.length, end: half }, false);
    expect(c.bytes.buffer).toBe(a.bytes.buffer); // the buffer given back, reused
    expect(text(c.bytes)).toBe(expected(rows.slice(0, 200)));
    const d = run({ start: half, end }, true);
    expect(text(d.bytes)).toBe(expected(rows.slice(200)));
    expect(d.bytes.buffer).not.toBe(c.bytes.buffer); // handed over as the codec's view, not kept
  });
});
