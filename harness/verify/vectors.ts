/**
 * Reference vector files (vectors/*.csv): a provenance header in '#' comments, then a CSV of exact values
 * (shortest round-trip decimals, which parse back to the same double). The header names the generator, its
 * precision, the date, the row count and a SHA-256 of the data lines; reading a file verifies both.
 */
import { createHash } from "node:crypto";
import { readFileSync, existsSync } from "node:fs";
import { join } from "node:path";
import { parseCsv, formatCsv, numberAt, CsvError } from "../core/csv.js";
import { writeAtomic } from "../core/atomic.js";
import { VECTORS_DIR } from "../core/paths.js";

export interface Provenance {
  readonly suite: string;
  readonly generator: string;
  readonly precision: string;
  readonly date: string;
  /** Free lines: what the columns mean, the constants used, the seed. */
  readonly notes: readonly string[];
}

export interface VectorSet {
  readonly provenance: Provenance;
  readonly columns: readonly string[];
  /** Numeric cells (NaN for a text cell such as a tag). */
  readonly values: readonly (readonly number[])[];
  /** The `tag` column's text per row ('' when the file has none): which part of the grid a case is from. */
  readonly tags: readonly string[];
  readonly path: string;
}

function digest(dataText: string): string {
  return createHash("sha256").update(dataText).digest("hex");
}

/** Path of a suite's vector file. */
export function vectorPath(suite: string): string {
  return join(VECTORS_DIR, `${suite}.csv`);
}

/** Write a vector file atomically. `rows` hold numbers, or text in a `tag` column. */
export function writeVectors(path: string, p: Provenance, columns: readonly string[], rows: readonly (readonly (number | string)[])[]): void {
  const data = formatCsv(columns, rows);
  const header = [
    "areal reference vectors",
    `suite: ${p.suite}`,
    `generator: ${p.generator}`,
    `precision: ${p.precision}`,
    `date: ${p.date}`,
    `count: ${rows.length}`,
    `sha256: ${digest(data)}`,
    ...p.notes.map((n) => `note: ${n}`),
  ];
  writeAtomic(path, header.map((h) => `# ${h}`).join("\n") + "\n" + data);
}

/** Read and verify a vector file. Throws when the count or checksum does not match the data. */
export function readVectors(path: string): VectorSet {
  if (!existsSync(path)) throw new CsvError(`${path}: no such vector file (run 'npm run vectors')`);
  const text = readFileSync(path, "utf8");
  const start = text.search(/^[^#\n]/m);
  if (start < 0) throw new CsvError(`${path}: no data`);
  const table = parseCsv(text, path);
  const field = (name: string): string => {
    const line = table.comments.find((c) => c.startsWith(`${name}: `));
    if (line === undefined) throw new CsvError(`${path}: provenance header lacks '${name}'`);
    return line.slice(name.length + 2);
  };
  const want = field("sha256");
  const got = digest(text.slice(start));
  if (got !== want) throw new CsvError(`${path}: checksum mismatch (header ${want.slice(0, 12)}..., data ${got.slice(0, 12)}...): the file was edited by hand or truncated`);
  const count = Number(field("count"));
  if (count !== table.rows.length) throw new CsvError(`${path}: header says ${count} rows, the file has ${table.rows.length}`);
  const tagCol = table.columns.indexOf("tag");
  const values = table.rows.map((row, r) => row.map((_, c) => (c === tagCol ? NaN : numberAt(table, path, r, c))));
  return {
    provenance: {
      suite: field("suite"),
      generator: field("generator"),
      precision: field("precision"),
      date: field("date"),
      notes: table.comments.filter((c) => c.startsWith("note: ")).map((c) => c.slice(6)),
    },
    columns: table.columns,
    values,
    tags: table.rows.map((row) => (tagCol >= 0 ? row[tagCol]! : "")),
    path,
  };
}

/** Column accessor that fails loudly on a missing column. */
export function col(v: VectorSet, name: string): number {
  const i = v.columns.indexOf(name);
  if (i < 0) throw new CsvError(`${v.path}: no column '${name}'`);
  return i;
}
