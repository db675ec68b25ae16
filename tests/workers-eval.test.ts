/**
 * `areal eval` streamed through worker threads: the output of 2 and 3 workers is byte-identical to one worker
 * and to the whole-text path (evaluateCsv), whatever the chunking; a bad cell or a ragged row late in the file
 * gives evaluateCsv's message with the right line number and leaves no output file behind.
 * Needs the compiled harness (dist/, `npm run build`): the worker threads run dist/harness/worker-entry.js.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { release } from "./helpers.js";
import { evaluateCsv, evaluateFile } from "../harness/evaluate.js";
import { findRoutine } from "../harness/routines.js";
import { CsvFileStream, chunkTable } from "../harness/stream.js";
import { parseCsv, CsvError } from "../harness/csv.js";
import { Rng } from "../harness/rng.js";

const BIN = fileURLToPath(new URL("../bin/areal.mjs", import.meta.url));
const elliptic = findRoutine("kepler-elliptic")!;
let dir: string;
let bigPath: string;
let bigText: string;

/** About 3000 rows: CRLF and LF lines, comments and blank lines between rows, out-of-domain rows, hex cells. */
function makeInput(rows: number): string {
  const rng = new Rng(20261202);
  const lines = ["# invented test cases", "", "id,e,M"];
  for (let i = 0; i < rows; i++) {
    const e = i % 97 === 0 ? 1.25 : i % 5 === 0 ? 1 - Math.pow(10, -rng.between(1, 15)) : rng.uniform();
    const M = i % 7 === 0 ? "0x3ff0000000000000" : String(rng.between(-10, 10));
    lines.push(`${i},${e},${M}${i % 3 === 0 ? "\r" : ""}`);
    if (i % 250 === 0) lines.push("# a comment between rows");
    if (i % 333 === 0) lines.push("");
  }
  return lines.join("\n") + "\n";
}

async function run(input: string, out: string, workers: number, chunkBytes: number): Promise<string> {
  await evaluateFile(elliptic, input, "cases.csv", { workers, load: { build: "f64" }, kernels: release(), out, chunkBytes });
  return readFileSync(out, "utf8");
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-workers-"));
  bigText = makeInput(3000);
  bigPath = join(dir, "cases.csv");
  writeFileSync(bigPath, bigText);
});

describe("eval with worker threads", () => {
  it("1, 2 and 3 workers and the whole-text path give the same bytes, for several chunk sizes", async () => {
    const whole = evaluateCsv(elliptic, bigText, "cases.csv", release()).csv;
    expect(whole.split("\n")[0]).toBe("id,e,M,E,iterations,status");
    expect(whole).toMatch(/,out-of-domain\n/);
    for (const chunk of [997, 1 << 20]) {
      const one = await run(bigPath, join(dir, `one-${chunk}.csv`), 1, chunk);
      expect(one).toBe(whole);
      for (const w of [2, 3]) expect(await run(bigPath, join(dir, `w${w}-${chunk}.csv`), w, chunk)).toBe(whole);
    }
  });

  it("a bad cell late in the file: evaluateCsv's message and line, no output, no temporary file", async () => {
    const lines = bigText.split("\n");
    const at = lines.length - 40; // 0-based index: line at + 1
    lines[at] = "2999,0.5,1.0.0";
    const text = lines.join("\n");
    const p = join(dir, "late-bad.csv");
    writeFileSync(p, text);
    let want = "";
    try {
      evaluateCsv(elliptic, text, "cases.csv", release());
    } catch (err) {
      want = (err as Error).message;
    }
    expect(want).toBe(`cases.csv:${at + 1}: column 'M' holds '1.0.0', which is not a number`);
    const outDir = mkdtempSync(join(dir, "out-"));
    for (const w of [1, 2]) {
      await expect(run(p, join(outDir, "r.csv"), w, 4096)).rejects.toThrow(want);
      expect(readdirSync(outDir)).toEqual([]);
    }
  });

  it("a ragged row late in the file gives parseCsv's message with its line", async () => {
    const text = bigText + "7000,0.5\n";
    const p = join(dir, "ragged.csv");
    writeFileSync(p, text);
    let want = "";
    try {
      parseCsv(text, "cases.csv");
    } catch (err) {
      want = (err as Error).message;
    }
    expect(want).toMatch(/^cases\.csv:\d+: 2 cells, the header has 3 columns$/);
    await expect(run(p, join(dir, "ragged-out.csv"), 2, 2048)).rejects.toThrow(want);
    expect(existsSync(join(dir, "ragged-out.csv"))).toBe(false);
  });

  it("the CLI: --workers 1 and 2 print the same bytes on stdout; --workers 0 names the flag", () => {
    const a = spawnSync(process.execPath, [BIN, "eval", "kepler-elliptic", "-i", bigPath, "--workers", "1"], { encoding: "utf8" });
    const b = spawnSync(process.execPath, [BIN, "eval", "kepler-elliptic", "-i", bigPath, "--workers", "2"], { encoding: "utf8" });
    expect(a.status).toBe(0);
    expect(b.stdout).toBe(a.stdout);
    expect(a.stderr).toBe(""); // not a terminal: no progress line
    const bad = spawnSync(process.execPath, [BIN, "eval", "kepler-elliptic", "-i", bigPath, "--workers", "0"], { encoding: "utf8" });
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--workers: '0'/);
  });
});

describe("the streaming reader", () => {
  it("finds the header after comments and blank lines, numbers lines as parseCsv does, keeps CR inside an unterminated last line out of cells", () => {
    const text = "# a\r\n\r\n#b\ne,M\r\n0.1,1\r\n\r\n# c\n0.2,2\r";
    const p = join(dir, "small.csv");
    writeFileSync(p, text);
    const s = new CsvFileStream(p, "small.csv", 3);
    const head = s.head();
    const t = parseCsv(text, "small.csv");
    expect(head.columns).toEqual(t.columns);
    expect(head.comments).toEqual(t.comments);
    const rows: string[][] = [];
    const lines: number[] = [];
    let line = head.nextLine;
    for (let c = s.nextChunk(); c !== undefined; c = s.nextChunk()) {
      const ct = chunkTable(Buffer.from(c).toString("utf8"), line, head.columns, "small.csv");
      rows.push(...ct.rows.map((r) => [...r]));
      lines.push(...ct.lines);
      line += ct.lineCount;
    }
    s.close();
    expect(rows).toEqual(t.rows);
    expect(lines).toEqual(t.lines);
  });

  it("an empty file and a file of comments only give parseCsv's message", () => {
    for (const [name, text] of [["empty.csv", ""], ["comments.csv", "# only\n\n# comments\n"]] as const) {
      const p = join(dir, name);
      writeFileSync(p, text);
      const s = new CsvFileStream(p, name);
      expect(() => s.head()).toThrow(CsvError);
      expect(() => new CsvFileStream(p, name).head()).toThrow(`${name}: empty file (no header line)`);
      s.close();
    }
  });
});
