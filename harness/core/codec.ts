/**
 * The codec module (codec/index.ts, built to build/codec.wasm): CSV number cells parsed from bytes and doubles
 * formatted as shortest round-trip bytes (String()'s, "-0" for negative zero), both exact, in the module's own
 * memory, for eval's byte path (evaluate.ts). One instance per thread, loaded on first use. The module has no
 * imports; this file places the input bytes, the values and the output in its memory and grows it as needed.
 *
 * Memory (from the module's heap start, 16-byte aligned regions): the status table (the words written after each
 * row), the columns and defaults of the arguments, then per chunk (Codec.begin): the chunk's bytes (cells are
 * parsed where they lie) and room for as many bytes of echoes of lines the host reads, the line records, the
 * arguments, the outputs and statuses (the kernel's batch call writes them there), a status index a row, and the
 * output text (Codec.assemble). The chunk's rows go from bytes to text with the kernel's call as the only step
 * outside the module.
 */
import { readFileSync, existsSync } from "node:fs";
import { join } from "node:path";
import { BUILD_DIR } from "./paths.js";

/** The codec module file. */
const CODEC_FILE = join(BUILD_DIR, "codec.wasm");

/** parse's answers (codec/index.ts PARSE_*). */
export const PARSE_OK = 0;
export const PARSE_NOT_DECIMAL = -1;
export const PARSE_UNSURE = -2;

/** The longest text of one formatted double ("-2.2250738585072014e-308") plus its comma. */
const MAX_NUMBER_BYTES = 25;
/** Status table: entries of 64 bytes (ok flag, length, text), at most 64 distinct statuses. */
const STATUS_ENTRY = 64;
const STATUS_ENTRIES = 64;
const PAGE = 65536;

/** scan's record flags and answers, and its column codes (codec/index.ts). */
export const LINE_SLOW = 1;
export const LINE_CELLS = 2;
export const SCAN_FALL_BACK = -1;
export const COL_DEFAULT = -1;
export const COL_HOST = -2;

interface CodecExports {
  readonly memory: WebAssembly.Memory;
  codec_heap(): number;
  parse_value_ptr(): number;
  parse_unsure_count(): number;
  parse(p: number, end: number): number;
  format(x: number, dst: number): number;
  count_lf(p: number, len: number): number;
  scan(inp: number, len: number, width: number, na: number, cols: number, defaults: number, recs: number, args: number, cs: number, maxLine: number): number;
  assemble(inp: number, rows: number, recs: number, n: number, vals: number, st: number, table: number, dst: number): number;
}

const align = (n: number): number => (n + 15) & ~15;

/**
 * The regions of one chunk in the codec's memory (byte offsets) and typed views of them. The views are valid
 * until the codec's memory grows (the next chunk's `begin`).
 */
export interface ChunkLayout {
  readonly len: number;
  readonly lineEnds: number;
  readonly maxRows: number;
  /** Where the host writes the echo of a line it read itself (offsets from the input, like the records'). */
  readonly echoFrom: number;
  /** Records of scan: start, end, flag per line (Int32 triples). */
  readonly recs: Int32Array;
  readonly args: Float64Array;
  readonly outs: Float64Array;
  readonly status: Int32Array;
  /** One status-table index a row. */
  readonly st: Uint8Array;
}

/** One thread's codec: the module, its memory views, and the chunk placed last. */
export class Codec {
  private readonly ex: CodecExports;
  private readonly valueAt: number;
  private readonly tableAt: number;
  private readonly colsAt: number;
  /** The module's memory as bytes (taken again after growing). */
  mem: Uint8Array;
  private f64: Float64Array;
  private i32: Int32Array;
  /** Where a placed chunk starts in `mem`: its cells are parsed by their offsets in the chunk. */
  readonly inputAt: number;
  private readonly statusIndex = new Map<number, number>();
  private at = { recs: 0, args: 0, outs: 0, status: 0, st: 0, text: 0, cs: 0, defaults: 0 };

  constructor(mod: WebAssembly.Module) {
    const inst = new WebAssembly.Instance(mod, {});
    this.ex = inst.exports as unknown as CodecExports;
    const heap = this.ex.codec_heap();
    this.valueAt = this.ex.parse_value_ptr();
    this.tableAt = heap;
    this.colsAt = heap + STATUS_ENTRY * STATUS_ENTRIES;
    this.inputAt = this.colsAt + PAGE; // room for the columns, defaults and comma positions of a line
    this.mem = new Uint8Array(this.ex.memory.buffer);
    this.f64 = new Float64Array(this.ex.memory.buffer);
    this.i32 = new Int32Array(this.ex.memory.buffer);
  }

  /** Make the memory at least `bytes` long. */
  private reserve(bytes: number): void {
    const have = this.ex.memory.buffer.byteLength;
    if (bytes <= have) return;
    this.ex.memory.grow(Math.ceil((bytes - have) / PAGE));
    this.mem = new Uint8Array(this.ex.memory.buffer);
    this.f64 = new Float64Array(this.ex.memory.buffer);
    this.i32 = new Int32Array(this.ex.memory.buffer);
  }

  /** Copy a chunk's bytes to `inputAt`, with room after it for as many bytes of echoes. */
  place(b: Uint8Array): void {
    this.reserve(this.inputAt + 2 * b.length + 16);
    this.mem.set(b, this.inputAt);
  }

  /**
   * Place a chunk (as `place`) and lay out the regions for its rows: up to one a line end and one more, `na`
   * arguments and `nOut` outputs each. `cols` per argument: a column, COL_DEFAULT (from `defaults`) or COL_HOST.
   * Undefined for a table wider than the layout's room for one line's commas (about 16,000 columns): the caller
   * reads such a chunk itself.
   */
  begin(b: Uint8Array, width: number, cols: readonly number[], defaults: readonly number[], nOut: number): ChunkLayout | undefined {
    const len = b.length;
    const na = cols.length;
    if (12 * na + 4 * (width + 1) + 64 > PAGE) return undefined;
    this.place(b);
    const lineEnds = this.ex.count_lf(this.inputAt, len);
    const maxRows = lineEnds + 1;
    const at = this.at;
    at.defaults = align(this.colsAt + 4 * na);
    at.cs = align(at.defaults + 8 * na);
    at.recs = align(this.inputAt + 2 * len);
    at.args = align(at.recs + 12 * maxRows);
    at.outs = align(at.args + 8 * na * maxRows);
    at.status = align(at.outs + 8 * nOut * maxRows);
    at.st = align(at.status + 4 * maxRows);
    at.text = align(at.st + maxRows);
    this.reserve(at.text + len + maxRows * (nOut * MAX_NUMBER_BYTES + 1 + STATUS_ENTRY) + 16);
    for (let i = 0; i < na; i++) {
      this.i32[(this.colsAt >>> 2) + i] = cols[i]!;
      this.f64[(at.defaults >>> 3) + i] = defaults[i]!;
    }
    const buf = this.ex.memory.buffer;
    return {
      len,
      lineEnds,
      maxRows,
      echoFrom: len,
      recs: new Int32Array(buf, at.recs, 3 * maxRows),
      args: new Float64Array(buf, at.args, na * maxRows),
      outs: new Float64Array(buf, at.outs, nOut * maxRows),
      status: new Int32Array(buf, at.status, maxRows),
      st: new Uint8Array(buf, at.st, maxRows),
    };
  }

  /** Records and arguments of the placed chunk's lines (codec/index.ts scan): the record count, or SCAN_FALL_BACK. */
  scan(l: ChunkLayout, width: number, maxLine: number): number {
    const na = l.args.length / l.maxRows;
    return this.ex.scan(this.inputAt, l.len, width, na, this.colsAt, this.at.defaults, this.at.recs, this.at.args, this.at.cs, maxLine);
  }

  /** The index of a status in the codec's table (its text written on first use): `word` and LF, `ok` or not. */
  statusAt(code: number, word: string, ok: boolean): number {
    let i = this.statusIndex.get(code);
    if (i !== undefined) return i;
    i = this.statusIndex.size;
    const text = Buffer.from(word + "\n", "latin1");
    if (i >= STATUS_ENTRIES || text.length > STATUS_ENTRY - 2) throw new RangeError(`codec: status '${word}' does not fit the status table`);
    const e = this.tableAt + STATUS_ENTRY * i;
    this.mem[e] = ok ? 1 : 0;
    this.mem[e + 1] = text.length;
    this.mem.set(text, e + 2);
    this.statusIndex.set(code, i);
    return i;
  }

  /** The output text of the chunk's first `rows` records (codec/index.ts assemble): a view valid until the next chunk. */
  assemble(l: ChunkLayout, rows: number): Uint8Array {
    const nOut = l.outs.length / l.maxRows;
    const end = this.ex.assemble(this.inputAt, rows, this.at.recs, nOut, this.at.outs, this.at.st, this.tableAt, this.at.text);
    return this.mem.subarray(this.at.text, end);
  }

  /** Parse bytes [p, end) of the placed input: PARSE_OK (the value is `value`), PARSE_NOT_DECIMAL or PARSE_UNSURE. */
  parse(p: number, end: number): number {
    return this.ex.parse(this.inputAt + p, this.inputAt + end);
  }

  /** The value of the last parse that answered PARSE_OK. */
  get value(): number {
    return this.f64[this.valueAt >>> 3]!;
  }

  /** How many parses in this thread answered PARSE_UNSURE for want of a proof (Number() then decided). */
  get unsureCount(): number {
    return this.ex.parse_unsure_count();
  }

  /** Parse a string (ASCII), for tests: [code, value]. Overwrites the placed input. */
  parseText(s: string): [number, number] {
    const b = Buffer.from(s, "latin1");
    this.place(b);
    const code = this.parse(0, b.length);
    return [code, code === PARSE_OK ? this.value : NaN];
  }

  /** The text of one double (shortest() of float.ts: String(x), "-0" for negative zero). Overwrites the placed input. */
  formatOne(x: number): string {
    const at = this.inputAt;
    this.reserve(at + 64);
    const end = this.ex.format(x, at);
    return Buffer.from(this.mem.buffer, at, end - at).toString("latin1");
  }
}

let mine: Codec | undefined;
let compiled: WebAssembly.Module | undefined;

/**
 * The codec module compiled, once a thread (or as given by useCodecModule); throws naming the file when it is
 * not built. Eval sends it to its worker threads, which then compile nothing (structured clone shares the code).
 */
export function codecModule(): WebAssembly.Module {
  if (compiled) return compiled;
  if (!existsSync(CODEC_FILE)) throw new Error(`the codec module is missing (${CODEC_FILE}); run 'npm run build'`);
  compiled = new WebAssembly.Module(readFileSync(CODEC_FILE));
  return compiled;
}

/** Use a codec module compiled elsewhere (a worker thread's parent, codecModule there) for this thread's codec. */
export function useCodecModule(mod: WebAssembly.Module): void {
  compiled ??= mod;
}

/** This thread's codec (loaded on first use); throws naming the file when it is not built. */
export function codec(): Codec {
  mine ??= new Codec(codecModule());
  return mine;
}
