/**
 * Reading a CSV file of any size in bounded memory: the header first, then chunks of whole lines (about
 * CHUNK_BYTES each). A chunk is raw bytes ending at a line end, so it can be handed to a worker thread as it
 * is and parsed there (evaluate.ts evaluateLines: lines split on LF with one CR before it removed, cells
 * checked with parseCsv's rules and messages).
 */
import { openSync, readSync, closeSync, fstatSync } from "node:fs";
import { parseCsv } from "./csv.js";

/** Default chunk size: large enough that per-chunk costs vanish, small enough that a few in flight are cheap. */
export const CHUNK_BYTES = 1 << 16;

const LF = 0x0a;

/** The part of a CSV file before the rows. */
export interface CsvHead {
  readonly columns: readonly string[];
  readonly comments: readonly string[];
  /** Line number (1-based) of the first line after the header. */
  readonly nextLine: number;
}

/** Sequential reader of one file: `head()` once, then `nextChunk()` until it returns undefined. */
export class CsvFileStream {
  private fd: number;
  private pending: Buffer = Buffer.alloc(0);
  private eof = false;
  /** Total size of the file in bytes (for progress). */
  readonly size: number;
  /** Bytes read so far. */
  bytesRead = 0;

  constructor(path: string, private readonly source: string, private readonly chunkBytes = CHUNK_BYTES) {
    this.fd = openSync(path, "r");
    this.size = fstatSync(this.fd).size;
  }

  /** Read more of the file into `pending`; false at the end of the file. */
  private fill(): boolean {
    if (this.eof) return false;
    const buf = Buffer.allocUnsafe(this.chunkBytes);
    const n = readSync(this.fd, buf, 0, buf.length, null);
    if (n === 0) {
      this.eof = true;
      return false;
    }
    this.bytesRead += n;
    this.pending = this.pending.length === 0 ? buf.subarray(0, n) : Buffer.concat([this.pending, buf.subarray(0, n)]);
    return true;
  }

  /**
   * Read up to and including the header line and parse that part with parseCsv, so that an empty file, an empty
   * or repeated header name give parseCsv's messages. Throws CsvError.
   */
  head(): CsvHead {
    let scanned = 0; // bytes of `pending` known to be comment or blank lines
    let line = 1;
    for (;;) {
      const lf = this.pending.indexOf(LF, scanned);
      if (lf < 0) {
        if (this.fill()) continue;
        // No line end left: the rest, if any, is the header as the last line; parseCsv throws when there is none.
        const t = parseCsv(this.pending.toString("utf8"), this.source);
        this.pending = Buffer.alloc(0);
        return { columns: t.columns, comments: t.comments, nextLine: line + 1 };
      }
      const text = this.pending.subarray(scanned, lf).toString("utf8");
      if (isSkippedBeforeHeader(text)) {
        scanned = lf + 1;
        line++;
        continue;
      }
      const t = parseCsv(this.pending.subarray(0, lf + 1).toString("utf8"), this.source);
      this.pending = this.pending.subarray(lf + 1);
      return { columns: t.columns, comments: t.comments, nextLine: line + 1 };
    }
  }

  /** The next run of whole lines (at least one line, about chunkBytes), or undefined at the end. */
  nextChunk(): Uint8Array | undefined {
    for (;;) {
      const lf = this.pending.lastIndexOf(LF);
      if (lf >= 0 && (this.pending.length >= this.chunkBytes || this.eof)) {
        const out = this.pending.subarray(0, lf + 1);
        this.pending = this.pending.subarray(lf + 1);
        return new Uint8Array(out); // a copy with its own buffer: it is sent to a worker as it is
      }
      if (!this.fill()) {
        if (this.pending.length === 0) return undefined;
        if (this.pending.lastIndexOf(LF) >= 0) continue;
        const out = new Uint8Array(this.pending);
        this.pending = Buffer.alloc(0);
        return out;
      }
    }
  }

  close(): void {
    if (this.fd >= 0) closeSync(this.fd);
    this.fd = -1;
  }
}

/** parseCsv skips comment and blank lines before the header (csv.ts); this mirrors its test. */
function isSkippedBeforeHeader(line: string): boolean {
  const l = line.endsWith("\r") ? line.slice(0, -1) : line;
  return l.startsWith("#") || l.trim() === "";
}
