/**
 * Reading a CSV file of any size in bounded memory: the header first, then chunks of whole lines (about
 * CHUNK_BYTES each). A chunk is raw bytes ending at a line end (evaluate.ts evaluateBytes: lines split on LF
 * with one CR before it removed, cells checked with parseCsv's rules and messages). Eval's workers read their
 * own byte ranges of the file instead (readOwnedLines).
 */
import { openSync, readSync, closeSync, fstatSync } from "node:fs";
import { parseCsv, CsvError } from "./csv.js";

/**
 * Default chunk size (the unit of work of a worker): 64 KB. Measured on the 2-core reference machine, a
 * 2,000,000-row eval in one thread ran in 2.4 s with 64 KB chunks against 3.2-3.4 s with 1 MB chunks (every
 * chunk's text and output was then a large object, mapped and faulted in afresh: 76,000 page faults against
 * 23,000), and 256 KB chunks were slower than 64 KB with one or two workers.
 */
export const CHUNK_BYTES = 1 << 16;
/** Bytes per read from the file: several chunks, to keep system calls few. */
const READ_BYTES = 1 << 20;
/** Bytes read past a range's end to find the LF that ends its last line (doubling while none is found). */
const READ_AHEAD = 4096;
/**
 * The longest line (header, comment or row) accepted: 1 MiB. A row of numbers needs about 25 bytes a cell; a
 * longer line is not a CSV of cases (a binary file, a file with no line ends), and bounding it bounds the memory
 * and time spent looking for its end.
 */
export const MAX_LINE_BYTES = 1 << 20;

/** A line longer than MAX_LINE_BYTES, found at byte `offset` of the file (the reader does not count lines). */
export class LineTooLong extends CsvError {
  constructor(readonly source: string, readonly offset: number) {
    super(`${source}: a line starting at byte ${offset} is longer than the limit of ${MAX_LINE_BYTES} bytes (no line end within it: is this a CSV file?)`);
  }
  /** The message naming the line, when the caller knows its number. */
  atLine(line: number): CsvError {
    return LineTooLong.named(this.source, line);
  }
  /** The error for line `line` of `source`, longer than MAX_LINE_BYTES. */
  static named(source: string, line: number): CsvError {
    return new CsvError(`${source}:${line}: line ${line} is longer than the limit of ${MAX_LINE_BYTES} bytes (no line end within it: is this a CSV file?)`);
  }
}

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
  /** The read buffer (fill), reused; `pending` is a view of it. */
  private buf: Buffer = Buffer.alloc(0);
  private eof = false;
  /** Total size of the file in bytes (for progress). */
  readonly size: number;
  /** Bytes read so far. */
  bytesRead = 0;

  constructor(path: string, private readonly source: string, private readonly chunkBytes = CHUNK_BYTES) {
    try {
      this.fd = openSync(path, "r");
      const st = fstatSync(this.fd);
      if (st.isDirectory()) {
        closeSync(this.fd);
        throw Object.assign(new Error("is a folder"), { code: "EISDIR" });
      }
      this.size = st.size;
    } catch (err) {
      throw cannotRead(source, err);
    }
  }

  /**
   * Read more of the file into `pending` (READ_BYTES at a time, or a chunk if larger); false at the end of the
   * file. One buffer is reused: the bytes not yet returned move to its front and the read goes after them (a
   * larger buffer only when they fill it: a line longer than a read), so nothing but that tail is copied and no
   * fresh memory is touched per read. Chunks returned before are overwritten (nextChunk says so).
   */
  private fill(): boolean {
    if (this.eof) return false;
    const keep = this.pending.length;
    const want = keep + Math.max(READ_BYTES, this.chunkBytes);
    if (this.buf.length < want) {
      const next = Buffer.allocUnsafe(Math.max(want, 2 * this.buf.length));
      this.pending.copy(next, 0);
      this.buf = next;
    } else if (keep > 0) this.pending.copy(this.buf, 0); // Buffer.copy allows the regions to overlap
    const n = readSync(this.fd, this.buf, keep, this.buf.length - keep, null);
    this.pending = this.buf.subarray(0, keep + n);
    if (n === 0) {
      this.eof = true;
      return false;
    }
    this.bytesRead += n;
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
        if (this.pending.length - scanned > MAX_LINE_BYTES) throw new LineTooLong(this.source, this.bytesRead - this.pending.length + scanned).atLine(line);
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

  /**
   * The next run of whole lines: up to chunkBytes, ending at a line end (more only when one line is longer), or
   * undefined at the end. The bytes are a view of the reader's buffer (no copy): use them before the next call,
   * which may overwrite them.
   */
  nextChunk(): Uint8Array | undefined {
    for (;;) {
      if (this.pending.length >= this.chunkBytes || this.eof) {
        let lf = this.pending.lastIndexOf(LF, this.chunkBytes - 1);
        if (lf < 0) lf = this.pending.indexOf(LF, this.chunkBytes); // a line longer than a chunk
        if (lf >= 0) {
          const out = this.pending.subarray(0, lf + 1);
          this.pending = this.pending.subarray(lf + 1);
          return out;
        }
        if (this.eof) {
          if (this.pending.length === 0) return undefined;
          const out = this.pending; // an unterminated last line
          this.pending = Buffer.alloc(0);
          return out;
        }
      }
      // The one bound on a line here, for any chunk size: more than MAX_LINE_BYTES held and no line end among them.
      if (!this.eof && this.pending.length > MAX_LINE_BYTES && this.pending.indexOf(LF) < 0) throw new LineTooLong(this.source, this.position);
      this.fill(); // at the end of the file this sets eof, and the loop above finishes
    }
  }

  /** Byte offset in the file of the first byte not yet returned (after head(): the first line after the header). */
  get position(): number {
    return this.bytesRead - this.pending.length;
  }

  close(): void {
    if (this.fd >= 0) closeSync(this.fd);
    this.fd = -1;
  }
}

/** The whole lines a byte range of a file owns (readOwnedLines). */
export interface OwnedLines {
  /** File offset of the first owned line (== finish when the range owns none). */
  readonly begin: number;
  /** File offset just past the last owned line's LF (or the end of the file). */
  readonly finish: number;
  /** The bytes [begin, finish). */
  readonly bytes: Buffer;
}

/**
 * The lines of a file that start in [start, end): a line starts at `first` (the first byte after the header)
 * or right after a LF. Ranges that tile [first, size) give line runs that tile it too, so eval workers can each
 * read their own ranges of the file and the outputs, joined in range order, are those of one sequential pass.
 */
export function readOwnedLines(path: string, first: number, size: number, start: number, end: number, source = path): OwnedLines {
  const own = new RangeReader(path, first, size, source).read(start, end);
  return { ...own, bytes: Buffer.from(own.bytes) }; // a copy of its own
}

/**
 * readOwnedLines for many ranges of one file (an eval worker's): one buffer is reused, so a range costs its
 * reads (and the file's opening and closing: no descriptor is held between ranges, so a worker ended by
 * terminate() leaves none open). The bytes of a range are a view of that buffer, valid until the next read.
 */
export class RangeReader {
  private fd = -1;
  private buf: Buffer = Buffer.alloc(0);

  constructor(private readonly path: string, private readonly first: number, private readonly size: number, private readonly source = path) {}

  /** The lines that start in [start, end) (readOwnedLines). */
  read(start: number, end: number): OwnedLines {
    this.fd = openSync(this.path, "r");
    try {
      return this.readOpen(start, end);
    } finally {
      closeSync(this.fd);
      this.fd = -1;
    }
  }

  private readOpen(start: number, end: number): OwnedLines {
    const { first, size, source } = this;
    const lo = Math.max(first, start - 1);
    let held = 0; // this.buf[0, held) holds the file's bytes [lo, lo + held)
    // Read until the buffer holds a LF at or after file offset `from`, or the end of the file; the LF's offset
    // or -1. Each read is at least as large as what is held (the buffer at least doubles when it must grow), so
    // the copies add up to a multiple of the bytes read; a line longer than MAX_LINE_BYTES is an error.
    const lfFrom = (from: number): number => {
      for (;;) {
        const i = this.buf.subarray(0, held).indexOf(LF, Math.max(0, from - lo));
        if (i >= 0) return lo + i;
        const have = lo + held;
        if (have >= size) return -1;
        if (have - Math.max(from, lo) > MAX_LINE_BYTES) throw new LineTooLong(source, Math.max(from, lo));
        const more = Math.max(READ_AHEAD, end - have + READ_AHEAD, held);
        if (this.buf.length < held + more) {
          const next = Buffer.allocUnsafe(Math.max(held + more, 2 * this.buf.length));
          this.buf.copy(next, 0, 0, held);
          this.buf = next;
        }
        const n = readSync(this.fd, this.buf, held, more, have);
        if (n === 0) return -1;
        held += n;
      }
    };
    let begin: number;
    if (start <= first) {
      begin = first;
    } else {
      const lf = lfFrom(start - 1);
      begin = lf < 0 ? size : lf + 1;
    }
    if (begin >= end || begin >= size) return { begin, finish: begin, bytes: Buffer.alloc(0) };
    const lf = end >= size ? -1 : lfFrom(end - 1);
    const finish = lf < 0 ? size : lf + 1;
    if (lo + held < finish) lfFrom(finish); // the unterminated last line: read to the end
    return { begin, finish, bytes: this.buf.subarray(begin - lo, finish - lo) };
  }
}

/** parseCsv skips comment and blank lines before the header (csv.ts); this mirrors its test (a line without its LF). */
export function isSkippedBeforeHeader(line: string): boolean {
  const l = line.endsWith("\r") ? line.slice(0, -1) : line;
  return l.startsWith("#") || l.trim() === "";
}

/** The error for a file that could not be read: its name, the system's code and first words. */
export function cannotRead(source: string, err: unknown): CsvError {
  const e = err as NodeJS.ErrnoException;
  return new CsvError(`cannot read ${source}: ${e.code ? `${e.code} (${e.message.split(",")[0]})` : e.message}`);
}
