/**
 * `areal eval`: run a routine over a CSV of inputs. The output has every input column, then the routine's
 * outputs and `status`, numbers as shortest round-trip decimals. The output file is written whole or not at
 * all: nothing is written when any cell is bad, however late in the file. `evaluateCsv` takes the text at
 * once; `evaluateFile` streams a file of any size in chunks (stream.ts) through worker threads (workers.ts)
 * into a temporary file renamed at the end, with the same bytes for any number of workers.
 */
import { closeSync, mkdtempSync, openSync, renameSync, rmSync, writeSync, createReadStream } from "node:fs";
import { tmpdir } from "node:os";
import { basename, dirname, join } from "node:path";
import { parseCsv, CsvError, cell, lostOnParse } from "../core/csv.js";
import { parseNumber, singlePrecisionLoss } from "../core/float.js";
import { cannotWrite as cannotWriteFile, makeDirs, outputIsInput } from "../core/atomic.js";
import { armSignalCleanup, removeOnSignal } from "../core/cleanup.js";
import type { Routine, InputSpec } from "../module/routines.js";
import { callRows, withCompiled, type Kernels } from "../module/load.js";
import { statusWord, isOk, abiViolation, abiViolationMessage } from "../module/status.js";
import { ModuleError } from "../module/load.js";
import { codec, codecModule, PARSE_OK, PARSE_UNSURE, COL_DEFAULT, COL_HOST, LINE_CELLS, LINE_SLOW, SCAN_FALL_BACK, type Codec, type ChunkLayout } from "../core/codec.js";
import { CsvFileStream, CHUNK_BYTES, readOwnedLines, RangeReader, isSkippedBeforeHeader, LineTooLong, MAX_LINE_BYTES } from "../core/stream.js";
import { WorkerPool, sharedView, releaseShared, type KernelSource, type SharedBytes } from "../core/pool.js";

export class EvalError extends Error {}

/**
 * The key under which the status counts of an eval also count the ok rows whose run broke an invariant budget
 * (an integration output `*_step`, "the first step over the budget", of 0 or more): a broken budget is a
 * failure of the run that the status alone does not show.
 */
export const BUDGET_BROKEN = "budget-broken";

/**
 * The key under which the status counts of an eval on a single-precision build count the rows whose inputs lost
 * their meaning on the way to f32 (core/float.ts singlePrecisionLoss), and, under `LOST_IN_F32:<what>`, the rows
 * per kind of loss: such a row's status (nonfinite-input, out-of-domain, ...) is single precision's doing.
 */
export const LOST_IN_F32 = "lost-in-f32";

/** The output slots that name the first step over a budget (-1: none), for routines that have them. */
function budgetSlots(routine: Routine): number[] {
  return routine.outputs.flatMap((o, i) => (/_step$/.test(o) ? [i] : []));
}

/** How the columns of an input map to a kernel's arguments. */
export interface Plan {
  readonly exportName: string;
  readonly specs: readonly InputSpec[];
  /** Column index per argument, or -1 for a default. */
  readonly cols: readonly number[];
}

function planFor(routine: Routine, columns: readonly string[], source: string): Plan {
  const attempt = (exportName: string, specs: readonly InputSpec[]): Plan | string => {
    const cols: number[] = [];
    for (const s of specs) {
      const c = columns.indexOf(s.name);
      if (c < 0 && s.default === undefined) return s.name;
      cols.push(c);
    }
    return { exportName, specs, cols };
  };
  const main = attempt(routine.exportName, routine.inputs);
  if (typeof main !== "string") return main;
  for (const alt of routine.alternatives ?? []) {
    const p = attempt(alt.exportName, alt.inputs);
    if (typeof p !== "string") return p;
  }
  const need = routine.inputs.filter((s) => s.default === undefined).map((s) => s.name);
  throw new EvalError(`${source}: missing column '${main}' (routine ${routine.name} needs ${need.join(",")})`);
}

/**
 * The argument a cell gives (line `lineNo` of `source`, column `column`, number `colNo` from 1); throws a
 * CsvError naming the place: not a number, a number that under- or overflows on parsing (lostOnParse), not an
 * integer where one is needed, not one of an enumeration's words.
 */
function cellValue(word: string, source: string, lineNo: number, column: string, colNo: number, s: InputSpec): number {
  if (s.choices) {
    const v = s.choices[word];
    if (v !== undefined) return v;
    const asNum = Number(word);
    if (word !== "" && Object.values(s.choices).includes(asNum)) return asNum;
    throw new CsvError(`${source}:${lineNo}: column '${s.name}' holds '${word}'; expected one of ${Object.keys(s.choices).join(", ")} (column ${colNo})`);
  }
  const v = parseNumber(word);
  if (v === undefined) throw new CsvError(`${source}:${lineNo}: column '${column}' holds '${word}', which is not a number (column ${colNo})`);
  const lost = lostOnParse(word, v);
  if (lost) throw new CsvError(`${source}:${lineNo}: column '${column}' holds '${word}', which ${lost} (column ${colNo})`);
  if (s.integer && !Number.isInteger(v)) throw new CsvError(`${source}:${lineNo}: column '${s.name}' holds '${word}', which is not an integer (column ${colNo})`);
  return v;
}

export interface EvalResult {
  readonly csv: string;
  readonly rows: number;
  /** Count of rows per status word. */
  readonly statuses: Readonly<Record<string, number>>;
}

/**
 * The plan for a header: which columns feed which arguments. Throws EvalError on a missing column, a module
 * without the export (when `k` is given) or an input column named like an output.
 */
export function prepareEval(routine: Routine, columns: readonly string[], source: string, k?: Kernels): Plan {
  const plan = planFor(routine, columns, source);
  if (k && !k.has(plan.exportName)) throw new EvalError(`${k.label}: the module has no export ${plan.exportName} for routine ${routine.name}`);
  for (const o of [...routine.outputs, "status"]) {
    if (columns.includes(o)) throw new EvalError(`${source}: input already has a column named '${o}', which is an output of ${routine.name}`);
  }
  return plan;
}

/** The output header line (no line end). */
export function outputHeader(routine: Routine, columns: readonly string[]): string {
  return [...columns, ...routine.outputs, "status"].join(",");
}

/**
 * Evaluate a routine over CSV text held in memory: comments and blank lines, the header, then the rows (through
 * evaluateLines, as evaluateFile does, so the bytes and messages are the same). Throws EvalError/CsvError
 * (with line and column) on bad input; nothing is computed when a cell is bad.
 */
export function evaluateCsv(routine: Routine, text: string, source: string, k: Kernels): EvalResult {
  // The header is the first line that is neither blank nor a comment; parseCsv reads that part (its messages).
  let pos = 0;
  let lineNo = 1;
  for (;;) {
    const lf = text.indexOf("\n", pos);
    if (lf < 0 || !isSkippedBeforeHeader(text.slice(pos, lf))) {
      pos = lf < 0 ? text.length : lf + 1;
      break;
    }
    pos = lf + 1;
    lineNo++;
  }
  const t = parseCsv(text.slice(0, pos), source);
  const plan = prepareEval(routine, t.columns, source, k);
  const res = evaluateBytes(routine, plan, t.columns.length, source, k, ENCODER.encode(text.slice(pos)), lineNo + 1);
  return { csv: outputHeader(routine, t.columns) + "\n" + utf8(res.bytes), rows: res.rows, statuses: res.statuses };
}

/** How `evaluateFile` runs. */
export interface FileEvalOptions {
  /** Worker threads (1: everything in this thread). */
  readonly workers: number;
  /** What each worker loads: the same module as `kernels`. */
  readonly load: KernelSource;
  /** The module in this thread: runs everything with one worker, and re-runs a worker's bad range to name its line. */
  readonly kernels: Kernels;
  /** Output file, replaced whole at the end; undefined writes to stdout once the whole input has passed. */
  readonly out?: string;
  /** Called after each chunk with the bytes done so far and the file size. */
  readonly progress?: (bytesRead: number, size: number) => void;
  readonly chunkBytes?: number;
  /**
   * Only the rows that start in byte range k of n of the data (after the header), for job arrays: part 1 has the
   * header, the others none, so the parts joined in order are the bytes of one run over the whole file.
   */
  readonly shard?: { readonly k: number; readonly n: number };
}

/** Bytes [lo, hi) of the data, the range of shard k of n: contiguous, together exactly [first, size). */
export function shardBytes(first: number, size: number, k: number, n: number): { lo: number; hi: number } {
  const at = (j: number): number => first + Number((BigInt(j) * BigInt(size - first)) / BigInt(n));
  return { lo: at(k - 1), hi: at(k) };
}

/**
 * Evaluate a routine over a CSV file of any size, streamed in chunks. With one worker this thread reads the
 * file in chunks of whole lines and evaluates them; with more, this thread reads only the header and hands out
 * byte ranges, each worker reads the lines that start in its ranges (RangeReader) and leaves their output bytes
 * in a shared slot (OutputSlots), and this thread writes them in range order. This thread is one of the N: it
 * starts N - 1 worker threads, runs the first ranges itself while they start, and then a range whenever they
 * have theirs queued (a worker thread's start costs about 0.1-0.2 s of CPU, a tenth of a 2,000,000-row run). (When this thread read, copied and posted every chunk, `npm run
 * bench:workers` measured 1.30x for 2 workers on 4,000,000 rows.) The output goes to a temporary file that is
 * renamed to `out` (or copied to stdout) only when every row has passed; on any error the temporary file is
 * removed and nothing is written. The bytes do not depend on the number of workers. Throws EvalError or
 * CsvError with the same messages as `evaluateCsv`.
 */
export async function evaluateFile(routine: Routine, path: string, source: string, opts: FileEvalOptions): Promise<{ rows: number; statuses: Record<string, number> }> {
  const target = opts.out;
  const same = target === undefined ? undefined : outputIsInput(target, [path]);
  if (same !== undefined) throw new EvalError(`--out: ${same}`);
  const stream = new CsvFileStream(path, source, opts.chunkBytes);
  let fd = -1;
  let forget = (): void => {};
  let tmp: string | undefined;
  let tmpDir: string | undefined;
  let pool: WorkerPool | undefined;
  let stopping: Promise<void> | undefined; // the pool's close, begun once the last range is back
  let starting: Promise<void> | undefined; // the pool's start, which never rejects (its error is kept)
  let line = 0;
  const cannotWrite = (err: unknown): Error => cannotWriteFile(target ?? "stdout", err);
  try {
    const head = stream.head();
    const plan = prepareEval(routine, head.columns, source, opts.kernels);
    try {
      if (target !== undefined) {
        makeDirs(dirname(target));
        tmp = join(dirname(target), `.${basename(target)}.${process.pid}.tmp`);
        forget = removeOnSignal(tmp);
      } else {
        armSignalCleanup(); // before the folder exists: a signal after mkdtemp finds the handler in place
        tmpDir = mkdtempSync(join(tmpdir(), "areal-eval-"));
        forget = removeOnSignal(tmpDir);
        tmp = join(tmpDir, "out.csv");
      }
      fd = openSync(tmp, "w");
    } catch (err) {
      throw cannotWrite(err);
    }
    const write = (bytes: Uint8Array): void => {
      try {
        writeSync(fd, bytes);
      } catch (err) {
        throw cannotWrite(err);
      }
    };
    if (opts.shard === undefined || opts.shard.k === 1) write(Buffer.from(outputHeader(routine, head.columns) + "\n"));
    line = head.nextLine;
    let rows = 0;
    const statuses: Record<string, number> = {};
    const add = (n: number, st: Record<string, number>, done: number): void => {
      rows += n;
      for (const [w, c] of Object.entries(st)) statuses[w] = (statuses[w] ?? 0) + c;
      opts.progress?.(done, stream.size);
    };
    // In this thread: exact line numbers, so a bad cell throws the same message as evaluateCsv.
    const here = (chunk: Uint8Array): void => {
      const res = evaluateBytes(routine, plan, head.columns.length, source, opts.kernels, chunk, line);
      write(res.bytes);
      line += res.lineCount;
      add(res.rows, res.statuses, stream.position);
    };
    // A shard: the lines starting in its byte range, in chunks of ranges (lines numbered from the range, so a
    // bad cell is named by its byte offset, as with workers).
    const shard = opts.shard === undefined ? undefined : shardBytes(stream.position, stream.size, opts.shard.k, opts.shard.n);
    const step = opts.chunkBytes ?? CHUNK_BYTES;
    if (shard !== undefined && opts.workers <= 1) {
      const init = { reader: new RangeReader(path, stream.position, stream.size, source), columns: head.columns, source };
      for (let start = shard.lo; start < shard.hi; start += step) {
        const r = evalRange(routine, plan, init, opts.kernels, start, Math.min(shard.hi, start + step));
        if (r.error !== undefined) throw new EvalError(`${source}: in the lines from byte ${r.begin}: ${r.error}`);
        write(r.bytes);
        add(r.rows, r.statuses, r.finish);
        await turn();
      }
    } else if (shard === undefined && (opts.workers <= 1 || stream.size <= step)) {
      // A file of one chunk or less gains nothing from threads: it is run here (the bytes are the same).
      for (let c = stream.nextChunk(); c !== undefined; c = stream.nextChunk()) {
        here(c);
        await turn(); // let an interrupt (cleanup.ts) be handled between chunks
      }
    } else {
      // Each worker reads its own byte ranges of the file (readOwnedLines: the lines starting in the range), so
      // this thread only hands out ranges and writes the results, in range order. While the workers start (a
      // fifth of a 2,000,000-row run), this thread runs the first ranges itself: the same bytes, in the same order.
      const first = stream.position;
      const size = stream.size;
      let next = shard?.lo ?? first;
      const stop = shard?.hi ?? size;
      let startError: unknown;
      let started = false;
      // The kernel and codec modules go compiled (this thread compiled them): a worker compiles neither.
      starting = WorkerPool.start(opts.workers - 1, { kind: "eval", load: withCompiled(opts.load), routine: routine.name, columns: head.columns, source, path, first, size, codec: codecModule() }).then(
        (p) => {
          pool = p;
          started = true;
        },
        (err: unknown) => {
          startError = err;
          started = true;
        },
      );
      const take = (v: EvalChunkResult): void => {
        if (v.error === undefined) {
          if (v.shared === undefined) {
            write(v.bytes);
            kept.release(v.bytes);
          } else {
            write(sharedView(v.shared));
            releaseShared(v.shared);
          }
          line += v.lineCount;
          add(v.rows, v.statuses, v.finish);
          return;
        }
        // The lines were numbered from 1: run them here, where the line numbers are known, for the message.
        here(readOwnedLines(path, first, size, v.begin, v.finish).bytes);
        throw new EvalError(`${source}: a worker failed on lines from ${line}: ${v.error}`);
      };
      const ranges: Iterator<{ start: number; end: number }> = {
        next: () => {
          if (next >= stop) return { done: true, value: undefined };
          const r = { start: next, end: Math.min(stop, next + step) };
          next = r.end;
          return { done: false, value: r };
        },
      };
      const own = { reader: new RangeReader(path, first, size, source), columns: head.columns, source };
      const kept = new KeptBytes();
      while (!started && next < stop) {
        const r = ranges.next().value!;
        take(evalRange(routine, plan, own, opts.kernels, r.start, r.end));
        await turn(); // the workers' messages, and an interrupt (cleanup.ts)
      }
      await starting;
      if (startError !== undefined) throw startError;
      // This thread is one of the `workers`: it runs a range whenever the worker threads have theirs queued
      // (a view of the codec's memory is copied when the range waits for an earlier one).
      const local = localRanges(routine, plan, own, opts.kernels, kept);
      await pool!.runOrdered<{ start: number; end: number }, EvalChunkResult>(ranges, (r) => {
        if (r.ok) return take(r.value);
        throw new EvalError(`${source}: a worker failed on lines from ${line}: ${r.message}`);
      }, 4 * opts.workers + 2, undefined, local); // in flight: as many as with N worker threads (4 each and 2)
      // The workers have nothing left to do: they stop while this thread closes and renames the output.
      stopping = pool!.close();
      pool = undefined;
    }
    try {
      closeSync(fd);
      fd = -1;
      if (target !== undefined) renameSync(tmp, target);
    } catch (err) {
      throw cannotWrite(err);
    }
    if (target === undefined) await copyToStdout(tmp);
    return { rows, statuses };
  } catch (err) {
    // The sequential reader knows the line; a worker's range only the byte offset.
    if (err instanceof LineTooLong) throw line > 0 && opts.workers <= 1 && opts.shard === undefined ? err.atLine(line) : err;
    throw err;
  } finally {
    stream.close();
    if (starting) await starting;
    if (pool) await pool.close();
    if (stopping) await stopping;
    if (fd >= 0) closeSync(fd);
    if (tmp !== undefined && target !== undefined) rmSync(tmp, { force: true });
    if (tmpDir !== undefined) rmSync(tmpDir, { recursive: true, force: true });
    forget();
  }
}

/**
 * Buffers for the output of the ranges the main thread ran that wait for an earlier range (runOrdered's `local`),
 * reused range after range: a fresh copy of each (about 100 KB) cost 0.14 s of a 2,000,000-row run. A buffer
 * comes back when its bytes are written (release), so there are no more than ranges in flight.
 */
export class KeptBytes {
  private readonly free: Uint8Array[] = [];
  private readonly held = new Map<Uint8Array, Uint8Array>();

  /** A copy of `bytes` (a view of the codec's memory) in a buffer of this set. */
  keep(bytes: Uint8Array): Uint8Array {
    let buf = this.free.pop();
    if (buf === undefined || buf.length < bytes.length) buf = new Uint8Array(bytes.length);
    buf.set(bytes);
    const view = buf.subarray(0, bytes.length);
    this.held.set(view, buf);
    return view;
  }

  /** The buffer of a view `keep` returned is free again (any other bytes are not this set's: nothing happens). */
  release(view: Uint8Array): void {
    const buf = this.held.get(view);
    if (buf === undefined) return;
    this.held.delete(view);
    this.free.push(buf);
  }
}

/**
 * The main thread's runner of ranges for runOrdered's `local`: evalRange, its output kept in `kept` when it is
 * not written at once (evalRange's bytes are a view of the codec's memory, which the next range overwrites).
 */
export function localRanges(routine: Routine, plan: Plan, own: RangeSource, k: Kernels, kept: KeptBytes): (r: { start: number; end: number }, atOnce: boolean) => EvalChunkResult {
  return (r, atOnce) => {
    const v = evalRange(routine, plan, own, k, r.start, r.end);
    return atOnce ? v : { ...v, bytes: kept.keep(v.bytes) };
  };
}

/** What a worker sends back for one byte range of an eval. */
export interface EvalChunkResult {
  /**
   * The output lines, UTF-8: from evalRange a view of the codec's memory (valid until its next call); from a
   * worker a buffer of its own, or empty with the bytes in `shared`.
   */
  readonly bytes: Uint8Array;
  /** The output lines in a worker's shared slot (core/pool.ts OutputSlots), when they went that way. */
  readonly shared?: SharedBytes;
  readonly rows: number;
  /** Line ends in the range's lines. */
  readonly lineCount: number;
  readonly statuses: Record<string, number>;
  /** The file offsets of the lines the range owns (readOwnedLines). */
  readonly begin: number;
  readonly finish: number;
  /** A bad cell or row: the message with lines numbered from 1 in the range (the caller re-runs it for the true line). */
  readonly error?: string;
}

/** The file an eval's ranges are read from: its reader (the file kept open), its columns and name. */
export interface RangeSource {
  readonly reader: RangeReader;
  readonly columns: readonly string[];
  readonly source: string;
}

/** A worker's half of evaluateFile: the lines starting in the file's bytes [start, end), numbered from 1. */
export function evalRange(routine: Routine, plan: Plan, init: RangeSource, k: Kernels, start: number, end: number): EvalChunkResult {
  const own = init.reader.read(start, end);
  const none = { bytes: new Uint8Array(0), rows: 0, lineCount: 0, statuses: {}, begin: own.begin, finish: own.finish };
  let res: ReturnType<typeof evaluateBytes>;
  try {
    res = evaluateBytes(routine, plan, init.columns.length, init.source, k, own.bytes, 1);
  } catch (err) {
    if (err instanceof CsvError || err instanceof EvalError) return { ...none, error: err.message };
    throw err;
  }
  return { bytes: res.bytes, rows: res.rows, lineCount: res.lineCount, statuses: res.statuses, begin: own.begin, finish: own.finish };
}

const ENCODER = new TextEncoder();

/** One turn of the event loop. */
function turn(): Promise<void> {
  return new Promise((resolve) => setImmediate(resolve));
}

function utf8(chunk: Uint8Array): string {
  return Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength).toString("utf8");
}

/** A cell's first or last code unit that trim() certainly leaves: printable ASCII. */
function keptByTrim(c: number): boolean {
  return c > 32 && c < 127;
}

/**
 * The streaming form of chunkTable (stream.ts) + evaluateRows, for evaluateFile: a run of whole lines (the
 * lines of a CSV after its header; `firstLine` is the number of the first) evaluated with the same checks,
 * the same messages and the same output bytes, without building a table of cell strings (a 2,000,000-row
 * eval spent a quarter of its time collecting them). Two passes, as evaluateRows: every cell is read and
 * checked first, then the kernel runs. Lines end at LF, one CR before it dropped; blank lines and lines
 * starting with '#' are skipped; cells are trimmed; a row is echoed as its trimmed cells joined by commas,
 * which is the line itself unless a cell had space around it. tests/workers-eval.test.ts compares the bytes
 * with evaluateCsv on generated text.
 */
export function evaluateLines(routine: Routine, plan: Plan, width: number, source: string, k: Kernels, text: string, firstLine: number): { text: string; rows: number; lineCount: number; statuses: Record<string, number> } {
  const len = text.length;
  let lfs = 0;
  for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", i + 1)) lfs++;
  const maxRows = lfs + 1;
  const na = plan.specs.length;
  const args = new Float64Array(maxRows * na);
  const starts = new Int32Array(maxRows);
  const ends = new Int32Array(maxRows);
  const trimmed = new Uint8Array(maxRows);
  const cells: string[] = [];
  const wanted = plan.cols;
  let rows = 0;
  let lineNo = firstLine;
  for (let pos = 0; pos < len; lineNo++) {
    const lf = text.indexOf("\n", pos);
    // An unterminated last line keeps a final CR (parseCsv's split does too); trimming its cell removes it.
    const end = lf < 0 ? len : lf > pos && text.charCodeAt(lf - 1) === 13 ? lf - 1 : lf;
    const start = pos;
    pos = lf < 0 ? len : lf + 1;
    if (end - start > MAX_LINE_BYTES) throw LineTooLong.named(source, lineNo);
    const c0 = text.charCodeAt(start);
    if (end > start && c0 === 35) continue; // '#': a comment
    if (end === start || !keptByTrim(c0)) {
      const line = text.slice(start, end);
      if (line.trim() === "" || line.startsWith("#")) continue;
    }
    // Cut the line at commas; a cell with space (or anything beyond printable ASCII) at either end is trimmed.
    cells.length = 0;
    let hadSpace = false;
    for (let p = start; ; ) {
      const comma = text.indexOf(",", p);
      const ce = comma < 0 || comma > end ? end : comma;
      let c = text.slice(p, ce);
      if (ce === p || !keptByTrim(text.charCodeAt(p)) || !keptByTrim(text.charCodeAt(ce - 1))) {
        const t = c.trim();
        if (t.length !== c.length) hadSpace = true;
        c = t;
      }
      cells.push(c);
      if (ce === end) break;
      p = ce + 1;
    }
    if (cells.length !== width) throw new CsvError(`${source}:${lineNo}: ${cells.length} cells, the header has ${width} columns`);
    for (let i = 0; i < na; i++) {
      const c = wanted[i]!;
      const spec = plan.specs[i]!;
      args[rows * na + i] = c < 0 ? spec.default! : cellValue(cells[c]!, source, lineNo, spec.name, c + 1, spec);
    }
    starts[rows] = start;
    ends[rows] = end;
    trimmed[rows] = hadSpace ? 1 : 0;
    rows++;
  }
  const lineCount = lfs;
  const nOut = routine.outputs.length;
  const failed = ",NaN".repeat(nOut) + ",";
  const tally = new RowTally(routine, plan, k);
  const a: number[] = new Array<number>(na).fill(0);
  let out = "";
  for (let r = 0; r < rows; r++) {
    for (let i = 0; i < na; i++) a[i] = args[r * na + i]!;
    const st = k.call(plan.exportName, a);
    let line = trimmed[r] ? text.slice(starts[r], ends[r]).split(",").map((c) => c.trim()).join(",") : text.slice(starts[r], ends[r]);
    if (tally.row(st, k.out, 0, a, 0)) {
      for (let i = 0; i < nOut; i++) line += "," + cell(k.out[i]!);
      line += ",";
    } else line += failed;
    out += line + statusText(st).word + "\n";
  }
  const statuses = tally.statuses();
  return { text: out, rows, lineCount, statuses };
}

/**
 * Eval's accounting of each row, one home for the string and the byte path: the ABI check of its status and
 * outputs (a violation throws ModuleError naming the call), the count per status word, the ok rows that broke
 * a budget (BUDGET_BROKEN) and, on a single-precision build, the inputs that lost their meaning (LOST_IN_F32).
 * The counts come out as one record: the status words in the order first seen, then the two other kinds.
 */
class RowTally {
  private readonly counts = new Map<number, number>();
  private readonly losses = new Map<string, number>();
  private lost = 0;
  private broken = 0;
  private readonly budgets: number[];
  private readonly one: Float64Array;
  private readonly single: boolean;
  constructor(private readonly routine: Routine, private readonly plan: Plan, private readonly k: Kernels) {
    this.budgets = budgetSlots(routine);
    this.one = new Float64Array(routine.outputs.length);
    this.single = k.realBytes === 4;
  }

  /** The row of status `st`, outputs outs[o, o + outputs), arguments args[at, at + inputs): true when it is ok. */
  row(st: number, outs: ArrayLike<number>, o: number, args: ArrayLike<number>, at: number): boolean {
    const one = this.one;
    for (let i = 0; i < one.length; i++) one[i] = outs[o + i]!;
    const na = this.plan.specs.length;
    const bad = abiViolation(st, one, this.routine.outputs);
    if (bad !== undefined) throw new ModuleError(abiViolationMessage(this.k.label, this.plan.exportName, Array.from({ length: na }, (_, i) => args[at + i]!), bad));
    this.counts.set(st, (this.counts.get(st) ?? 0) + 1);
    if (this.single) this.countLosses(args, at);
    if (!isOk(st)) return false;
    if (this.budgets.length > 0 && this.budgets.some((i) => one[i]! >= 0)) this.broken++;
    return true;
  }

  /** A row's single-precision losses of meaning (singlePrecisionLoss), once a row and once per kind. */
  private countLosses(args: ArrayLike<number>, at: number): void {
    const specs = this.plan.specs;
    let lost = false;
    for (let i = 0; i < specs.length; i++) {
      if (specs[i]!.choices) continue;
      const what = singlePrecisionLoss(specs[i]!.name, args[at + i]!);
      if (what === undefined) continue;
      const key = `${LOST_IN_F32}:${what}`;
      this.losses.set(key, (this.losses.get(key) ?? 0) + 1);
      lost = true;
    }
    if (lost) this.lost++;
  }

  statuses(): Record<string, number> {
    const out: Record<string, number> = {};
    for (const [code, n] of this.counts) {
      const w = statusText(code).word;
      out[w] = (out[w] ?? 0) + n;
    }
    if (this.broken > 0) out[BUDGET_BROKEN] = this.broken;
    if (this.lost > 0) out[LOST_IN_F32] = this.lost;
    for (const [key, n] of this.losses) out[key] = n;
    return out;
  }
}

function copyToStdout(path: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const rs = createReadStream(path);
    rs.on("error", reject);
    rs.on("end", () => resolve());
    rs.pipe(process.stdout, { end: false });
  });
}

// ---------------------------------------------------------------------------------------------------------
// the byte path

/** A status code's word and the bytes written for it (the word and the line end). */
interface StatusText {
  readonly word: string;
  readonly bytes: Uint8Array;
}
const STATUS_TEXT = new Map<number, StatusText>();
/** The word and bytes of a status code (cached). */
function statusText(code: number): StatusText {
  let t = STATUS_TEXT.get(code);
  if (t === undefined) {
    const word = statusWord(code);
    t = { word, bytes: ENCODER.encode(word + "\n") };
    STATUS_TEXT.set(code, t);
  }
  return t;
}

/** Thrown inside evaluateBytes to hand the whole run to evaluateLines (the reference for messages and bytes). */
const FALL_BACK = new Error("fall back to evaluateLines");

/** A line's cells as evaluateLines reads them (for a line with space, a CR or bytes beyond ASCII), or undefined for a skipped line. */
function slowLine(line: string, width: number): { cells: string[]; echo: string } | undefined {
  const c0 = line.charCodeAt(0);
  if (line.length > 0 && c0 === 35) return undefined;
  if (line.length === 0 || !keptByTrim(c0)) {
    if (line.trim() === "" || line.startsWith("#")) return undefined;
  }
  const cells = line.split(",").map((c) => c.trim());
  if (cells.length !== width) throw FALL_BACK;
  return { cells, echo: cells.join(",") };
}

/**
 * evaluateLines on bytes: the same checks, messages and output bytes, without decoding the text or building a
 * string per cell or per line. The chunk goes to the codec module (core/codec.ts), which cuts it into lines and
 * reads a line of printable ASCII with no space around its cells in place: its cells found by their commas, its
 * numbers parsed exactly (Eisel-Lemire). What the codec leaves is read here: a line with a space, a CR or a byte
 * beyond ASCII (decoded and read as evaluateLines reads it), a word of an enumeration, nan, inf, a hex pattern,
 * a decimal the codec could not decide (Number()). The kernel runs once over all rows (Kernels.callRows, into
 * the codec's memory); each row is accounted (RowTally), and the codec writes the output: each line's echo, its
 * outputs in shortest form (Schubfach), its status word. Any bad cell, bad row or over-long line hands the whole
 * run to evaluateLines, which throws its message (the line numbers and messages are its own).
 * tests/eval-bytes.test.ts compares the bytes with evaluateLines on generated text. The bytes returned are a
 * view of the codec's memory, which the next call writes over: write or copy them before calling again.
 */
export function evaluateBytes(routine: Routine, plan: Plan, width: number, source: string, k: Kernels, b: Uint8Array, firstLine: number): { bytes: Uint8Array; rows: number; lineCount: number; statuses: Record<string, number> } {
  try {
    return evaluateBytesFast(routine, plan, width, source, k, b);
  } catch (err) {
    if (err !== FALL_BACK) throw err;
  }
  const res = evaluateLines(routine, plan, width, source, k, utf8(b), firstLine);
  return { bytes: ENCODER.encode(res.text), rows: res.rows, lineCount: res.lineCount, statuses: res.statuses };
}

function evaluateBytesFast(routine: Routine, plan: Plan, width: number, source: string, k: Kernels, b: Uint8Array): { bytes: Uint8Array; rows: number; lineCount: number; statuses: Record<string, number> } {
  const na = plan.specs.length;
  const nOut = routine.outputs.length;
  const cd = codec();
  const cols = plan.cols.map((c, i) => (c < 0 ? COL_DEFAULT : plan.specs[i]!.choices ? COL_HOST : c));
  const l = cd.begin(b, width, cols, plan.specs.map((s) => s.default ?? 0), nOut);
  if (l === undefined) throw FALL_BACK; // a table too wide for the codec's layout
  const records = cd.scan(l, width, MAX_LINE_BYTES);
  if (records === SCAN_FALL_BACK) throw FALL_BACK;
  const rows = hostLines(cd, l, records, plan, width, b);
  callRows(k, plan.exportName, l.args, na, rows, l.outs, nOut, l.status);
  const tally = new RowTally(routine, plan, k);
  const st = l.st;
  const status = l.status;
  for (let r = 0; r < rows; r++) {
    const code = status[r]!;
    const ok = tally.row(code, l.outs, r * nOut, l.args, r * na);
    st[r] = cd.statusAt(code, statusText(code).word, ok);
  }
  return { bytes: cd.assemble(l, rows), rows, lineCount: l.lineEnds, statuses: tally.statuses() };
}

/**
 * The lines the codec's scan left to this thread (evaluateLines' rules): a line with space, a CR or bytes beyond
 * ASCII (read as a string, its echo written after the chunk), or cells that are words or decimals the codec did
 * not decide. Blank lines among them are dropped (the records and arguments after them move up). Returns the
 * row count.
 */
function hostLines(cd: Codec, l: ChunkLayout, records: number, plan: Plan, width: number, b: Uint8Array): number {
  const na = plan.specs.length;
  const recs = l.recs;
  const args = l.args;
  const buf = Buffer.from(b.buffer, b.byteOffset, b.byteLength);
  let echoAt = l.echoFrom;
  let rows = 0;
  for (let r = 0; r < records; r++) {
    const flag = recs[3 * r + 2]!;
    const start = recs[3 * r]!;
    const end = recs[3 * r + 1]!;
    if (flag === LINE_SLOW) {
      const line = slowLine(buf.toString("utf8", start, end), width);
      if (line === undefined) continue; // blank: no row
      for (let i = 0; i < na; i++) {
        const c = plan.cols[i]!;
        const spec = plan.specs[i]!;
        args[rows * na + i] = c < 0 ? spec.default! : stringCell(line.cells[c]!, spec);
      }
      const echo = Buffer.from(line.echo, "utf8");
      cd.mem.set(echo, cd.inputAt + echoAt);
      recs[3 * rows] = echoAt;
      recs[3 * rows + 1] = echoAt + echo.length;
      echoAt += echo.length;
    } else {
      if (flag === LINE_CELLS) {
        const cs = [start];
        for (let p = b.indexOf(44, start); p >= 0 && p < end; p = b.indexOf(44, p + 1)) cs.push(p + 1);
        cs.push(end + 1);
        for (let i = 0; i < na; i++) {
          const c = plan.cols[i]!;
          const spec = plan.specs[i]!;
          if (c < 0) args[r * na + i] = spec.default!;
          else args[r * na + i] = spec.choices ? stringCell(latin1(buf, cs[c]!, cs[c + 1]! - 1), spec) : numberCell(cd, buf, cs[c]!, cs[c + 1]! - 1, spec);
        }
      }
      if (rows !== r) {
        recs[3 * rows] = start;
        recs[3 * rows + 1] = end;
        args.copyWithin(rows * na, r * na, r * na + na);
      }
    }
    rows++;
  }
  return rows;
}

/** Bytes [p, end) as text, one character a byte (Buffer's latin1Slice without toString's argument checks). */
function latin1(buf: Buffer, p: number, end: number): string {
  return (buf as unknown as { latin1Slice(start: number, end: number): string }).latin1Slice(p, end);
}

/** A cell read through the string path (cellValue's checks); a bad cell hands the run to evaluateLines. */
function stringCell(word: string, spec: InputSpec): number {
  try {
    return cellValue(word, "", 0, spec.name, 0, spec);
  } catch (err) {
    if (err instanceof CsvError) throw FALL_BACK;
    throw err;
  }
}

/**
 * A number cell, bytes [p, end) of printable ASCII, the chunk placed in the codec: the codec's exact parse,
 * Number() where the codec cannot prove its answer or the value under- or overflows (lostOnParse names it),
 * the string path for anything that is not a decimal.
 */
function numberCell(cd: Codec, buf: Buffer, p: number, end: number, spec: InputSpec): number {
  const r = cd.parse(p, end);
  let v: number;
  if (r === PARSE_OK) v = cd.value;
  else if (r === PARSE_UNSURE) {
    const word = latin1(buf, p, end);
    v = Number(word);
    if (lostOnParse(word, v)) throw FALL_BACK;
  } else return stringCell(latin1(buf, p, end), spec);
  if (spec.integer && !Number.isInteger(v)) throw FALL_BACK;
  return v;
}
