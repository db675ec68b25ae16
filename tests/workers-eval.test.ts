/**
 * `areal eval` streamed through worker threads: the output of 2 and 3 workers is byte-identical to one worker,
 * to the whole-text path (evaluateCsv) and to a plain evaluation written here from parseCsv (the whole table
 * in memory, one direct kernel call per row), whatever the chunking; a bad cell or a ragged row late in the
 * file gives parseCsv's message with the right line number and leaves no output file behind; generated
 * texts (fast-check) with space around cells, CR, comments, blank lines and text columns give the plain
 * evaluation's bytes.
 * Needs the compiled harness (dist/, `npm run build`): the worker threads run dist/harness/run/worker-entry.js.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release, areal } from "./helpers.js";
import { evaluateCsv, evaluateFile } from "../harness/run/evaluate.js";
import { findRoutine } from "../harness/module/routines.js";
import { CsvFileStream, readOwnedLines } from "../harness/core/stream.js";
import { parseCsv, CsvError, cell } from "../harness/core/csv.js";
import { parseNumber } from "../harness/core/float.js";
import { statusWord, isOk } from "../harness/module/status.js";
import fc from "fast-check";
import { Rng } from "../harness/core/rng.js";

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

/**
 * The plain evaluation the streamed one must equal: parseCsv's table (trimmed cells, comments and blank lines
 * dropped), each row's e and M through parseNumber, one kernel call, outputs as shortest decimals (NaN on a
 * failure status). Throws parseCsv's error, or a message in evaluate's wording for a bad number.
 */
function plainEval(text: string, source: string): string {
  const t = parseCsv(text, source);
  const k = release();
  const ie = t.columns.indexOf("e");
  const iM = t.columns.indexOf("M");
  const num = (r: number, c: number): number => {
    const v = parseNumber(t.rows[r]![c]!);
    if (v === undefined) throw new CsvError(`${source}:${t.lines[r]}: column '${t.columns[c]}' holds '${t.rows[r]![c]}', which is not a number`);
    return v;
  };
  const args = t.rows.map((_, r) => [num(r, ie), num(r, iM)]);
  let out = [...t.columns, ...elliptic.outputs, "status"].join(",") + "\n";
  args.forEach((a, r) => {
    const st = k.call(elliptic.exportName, a);
    const outs = elliptic.outputs.map((_, i) => (isOk(st) ? cell(k.out[i]!) : "NaN"));
    out += [...t.rows[r]!, ...outs, statusWord(st)].join(",") + "\n";
  });
  return out;
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
    expect(whole).toBe(plainEval(bigText, "cases.csv"));
    expect(whole.split("\n")[0]).toBe("id,e,M,E,iterations,status");
    expect(whole).toMatch(/,out-of-domain\n/);
    for (const chunk of [997, 1 << 20]) {
      const one = await run(bigPath, join(dir, `one-${chunk}.csv`), 1, chunk);
      expect(one).toBe(whole);
      for (const w of [2, 3]) expect(await run(bigPath, join(dir, `w${w}-${chunk}.csv`), w, chunk)).toBe(whole);
    }
  });

  it("a bad cell late in the file: its line and column named, no output, no temporary file", async () => {
    const lines = bigText.split("\n");
    const at = lines.length - 40; // 0-based index: line at + 1
    lines[at] = "2999,0.5,1.0.0";
    const text = lines.join("\n");
    const p = join(dir, "late-bad.csv");
    writeFileSync(p, text);
    const want = `cases.csv:${at + 1}: column 'M' holds '1.0.0', which is not a number`;
    expect(() => evaluateCsv(elliptic, text, "cases.csv", release())).toThrow(want);
    expect(() => plainEval(text, "cases.csv")).toThrow(want);
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
    const a = areal("eval", "kepler-elliptic", "-i", bigPath, "--workers", "1");
    const b = areal("eval", "kepler-elliptic", "-i", bigPath, "--workers", "2");
    expect(a.code).toBe(0);
    expect(b.out).toBe(a.out);
    expect(a.err).toBe(""); // not a terminal: no progress line
    const bad = areal("eval", "kepler-elliptic", "-i", bigPath, "--workers", "0");
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--workers: '0'/);
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
    // The chunks are the text after the header line, whole lines each (3-byte chunks: one or two lines).
    let rest = "";
    for (let c = s.nextChunk(); c !== undefined; c = s.nextChunk()) {
      const part = Buffer.from(c).toString("utf8");
      expect(part.endsWith("\n") || rest.length + part.length === text.length - text.indexOf("e,M\r\n") - 5).toBe(true);
      rest += part;
    }
    s.close();
    expect(head.nextLine).toBe(5);
    expect(rest).toBe(text.slice(text.indexOf("e,M\r\n") + 5));
    // Rows, CR and line numbers: the plain evaluation's bytes, and a bad cell on line 8 is named as line 8.
    expect(evaluateCsv(elliptic, text, "small.csv", release()).csv).toBe(plainEval(text, "small.csv"));
    expect(t.lines).toEqual([5, 8]);
    const bad = text.replace("0.2,2\r", "0.2,x\r");
    expect(() => evaluateCsv(elliptic, bad, "small.csv", release())).toThrow("small.csv:8: column 'M' holds 'x', which is not a number");
  });

  it("readOwnedLines: consecutive byte ranges of any size own whole lines that tile the file after the header", () => {
    const lineArb = fc.tuple(fc.string({ maxLength: 40 }).map((x) => x.replace(/\n/g, "")), fc.constantFrom("\n", "\r\n"));
    fc.assert(
      fc.property(fc.array(lineArb, { maxLength: 30 }), fc.boolean(), fc.integer({ min: 1, max: 64 }), (ls, cut, step) => {
        let text = "h,e,M\n" + ls.map(([l, e]) => l + e).join("");
        if (cut && text.endsWith("\n")) text = text.slice(0, -1);
        const p = join(dir, "owned.csv");
        writeFileSync(p, text);
        const bytes = Buffer.from(text);
        const first = bytes.indexOf(0x0a) + 1;
        const pieces: Buffer[] = [];
        let at = first;
        for (let start = first; start < bytes.length; start += step) {
          const own = readOwnedLines(p, first, bytes.length, start, Math.min(bytes.length, start + step));
          expect(own.begin).toBe(at); // no gap, no overlap
          if (own.finish > own.begin) expect(own.finish === bytes.length || bytes[own.finish - 1] === 0x0a).toBe(true);
          pieces.push(own.bytes);
          at = own.finish;
        }
        expect(Buffer.concat(pieces).equals(bytes.subarray(first))).toBe(true);
      }),
      { numRuns: 200, seed: 20261202 },
    );
  });

  it("a file of several reads (3.5 MB, over three of the reader's 1 MB reads): the chunks are its bytes after the header, in order, and one worker's output equals the whole-text path's", async () => {
    const text = makeInput(120000);
    expect(text.length).toBeGreaterThan(3 * (1 << 20));
    const p = join(dir, "several-reads.csv");
    writeFileSync(p, text);
    const s = new CsvFileStream(p, "several-reads.csv");
    s.head();
    const parts: Buffer[] = [];
    for (let c = s.nextChunk(); c !== undefined; c = s.nextChunk()) parts.push(Buffer.from(c)); // a copy: the reader reuses its buffer
    s.close();
    expect(Buffer.concat(parts).toString("utf8")).toBe(text.slice(text.indexOf("id,e,M\n") + 7));
    const out = join(dir, "several-reads.out.csv");
    await evaluateFile(elliptic, p, "several-reads.csv", { workers: 1, load: { build: "f64" }, kernels: release(), out });
    expect(readFileSync(out, "utf8")).toBe(evaluateCsv(elliptic, text, "several-reads.csv", release()).csv);
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

describe("generated CSV texts (fast-check, seeded): the streamed evaluation equals the plain one", () => {
  // A row: an id (text, some of it beyond ASCII), e and M written in several legal ways, with spaces or tabs
  // around cells, LF or CRLF; comment and blank lines in between; sometimes no final line end.
  const num = fc.oneof(
    fc.double({ min: -4, max: 4, noNaN: true }).map(String),
    fc.double({ min: 0, max: 1.2, noNaN: true }).map((x) => x.toExponential()),
    fc.constantFrom("0x3fe0000000000000", "nan", "-inf", "+1.", ".5", "1e-3", "0", "-0"),
  );
  const pad = fc.constantFrom("", "", "", " ", "\t", "  ");
  const cellArb = fc.tuple(pad, num, pad).map(([a, x, b]) => a + x + b);
  const id = fc.constantFrom("a", "Wren-1", "r\u00e9gion", "\u5c0f", "7", "x y");
  const row = fc.tuple(id, cellArb, cellArb, fc.constantFrom("\n", "\r\n")).map(([i, e, m, end]) => `${i},${e},${m}${end}`);
  const filler = fc.constantFrom("\n", "# note\n", "  \n", "\t\r\n", "#,,\n");
  const body = fc.array(fc.oneof({ weight: 6, arbitrary: row }, { weight: 1, arbitrary: filler }), { maxLength: 40 });
  const text = fc.tuple(fc.constantFrom("", "# head comment\n\n"), body, fc.boolean()).map(([pre, b, cut]) => {
    const t = pre + "id,e,M\n" + b.join("");
    return cut && t.endsWith("\n") ? t.slice(0, -1) : t;
  });

  it("same bytes as plainEval for the whole text and for 16-byte chunks with 1 and 2 workers", async () => {
    const k = release();
    let n = 0;
    await fc.assert(
      fc.asyncProperty(text, async (t) => {
        const want = plainEval(t, "g.csv");
        expect(evaluateCsv(elliptic, t, "g.csv", k).csv).toBe(want);
        const p = join(dir, `gen-${n}.csv`);
        writeFileSync(p, t);
        const w = 1 + (n++ % 2);
        expect(await run(p, join(dir, `gen-${n}-out.csv`), w, 16)).toBe(want);
      }),
      { numRuns: 60, seed: 20261202 },
    );
  });

  it("one bad cell anywhere: the same message as the plain evaluation", () => {
    const k = release();
    fc.assert(
      fc.property(text, fc.nat(), fc.constantFrom("1.0.0", "e5", "0x12", "--1", ""), (t, at, badCell) => {
        const lines = t.split("\n");
        const rowsAt = lines.map((l, i) => [l, i] as const).filter(([l], i) => i > lines.findIndex((x) => x.startsWith("id,e,M")) && /^[^#,]*,[^,]*,[^,]*$/.test(l) && l.trim() !== "");
        if (rowsAt.length === 0) return;
        const [l, i] = rowsAt[at % rowsAt.length]!;
        lines[i] = l.replace(/,[^,]*$/, "," + badCell + (l.endsWith("\r") ? "\r" : ""));
        const bad = lines.join("\n");
        let want = "";
        try {
          plainEval(bad, "g.csv");
        } catch (err) {
          want = (err as Error).message;
        }
        expect(want).toMatch(new RegExp(`^g\\.csv:${i + 1}: column 'M' holds`));
        expect(() => evaluateCsv(elliptic, bad, "g.csv", k)).toThrow(want);
      }),
      { numRuns: 100, seed: 20261202 },
    );
  });
});
