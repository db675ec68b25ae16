/**
 * A bounds-checked reader of WebAssembly binaries (the binary format of the WebAssembly Core Specification 1.0,
 * section 5): the magic number and version, the sections in file order, LEB128 integers, names and value types.
 * Every read checks its bounds, so a truncated or malformed file gives a plain AbiError naming the byte, never an
 * out-of-range read. Used by signatures.ts (the export signatures) and perf/size.ts (code bytes per function).
 */

/** The value types a kernel export can use. */
export type ValType = "i32" | "i64" | "f32" | "f64" | "v128" | "funcref" | "externref";

export class AbiError extends Error {}

const VAL_TYPES: Readonly<Record<number, ValType>> = {
  0x7f: "i32",
  0x7e: "i64",
  0x7d: "f32",
  0x7c: "f64",
  0x7b: "v128",
  0x70: "funcref",
  0x6f: "externref",
};
const MAGIC = [0x00, 0x61, 0x73, 0x6d];
/** The longest LEB128 encoding of a 32-bit integer. */
const U32_LEB_BYTES = 5;

/** One section: its id and the byte range of its contents. */
export interface Section {
  readonly id: number;
  readonly start: number;
  readonly end: number;
}

export class WasmReader {
  pos = 0;
  constructor(readonly bytes: Uint8Array, readonly label: string) {}
  fail(what: string): never {
    throw new AbiError(`${this.label}: malformed WebAssembly binary at byte ${this.pos}: ${what}`);
  }
  byte(): number {
    if (this.pos >= this.bytes.length) this.fail("unexpected end of file");
    return this.bytes[this.pos++]!;
  }
  /** Unsigned LEB128, up to 32 bits. */
  u32(): number {
    let result = 0;
    let shift = 0;
    for (let i = 0; i < U32_LEB_BYTES; i++) {
      const b = this.byte();
      result += (b & 0x7f) * 2 ** shift;
      if ((b & 0x80) === 0) return result;
      shift += 7;
    }
    return this.fail(`LEB128 integer longer than ${U32_LEB_BYTES} bytes`);
  }
  name(): string {
    const n = this.u32();
    if (this.pos + n > this.bytes.length) this.fail("name runs past the end");
    const s = new TextDecoder("utf-8", { fatal: false }).decode(this.bytes.subarray(this.pos, this.pos + n));
    this.pos += n;
    return s;
  }
  valType(): ValType {
    const b = this.byte();
    const t = VAL_TYPES[b];
    if (t === undefined) this.fail(`unknown value type 0x${b.toString(16)}`);
    return t;
  }
  /** Skip a `limits` entry (memory or table). */
  limits(): void {
    const flags = this.byte();
    this.u32();
    if (flags & 1) this.u32();
  }
  /**
   * Check the magic number and version from the start of the file, then list the sections in file order; the
   * reader is left at the end of the file (a caller reading a section sets pos to its start).
   */
  sections(): Section[] {
    this.pos = 0;
    for (const m of MAGIC) if (this.byte() !== m) throw new AbiError(`${this.label}: not a WebAssembly binary (bad magic number)`);
    const version = this.byte() | (this.byte() << 8) | (this.byte() << 16) | (this.byte() << 24);
    if (version !== 1) throw new AbiError(`${this.label}: WebAssembly binary version ${version}, expected 1`);
    const out: Section[] = [];
    while (this.pos < this.bytes.length) {
      const id = this.byte();
      const size = this.u32();
      const start = this.pos;
      const end = start + size;
      if (end > this.bytes.length) this.fail(`section ${id} runs past the end of the file`);
      out.push({ id, start, end });
      this.pos = end;
    }
    return out;
  }
}
