/**
 * A strict reader and writer for numeric CSV: one header line of column names, then rows of numbers (or a
 * status word). Lines starting with '#' are comments (vector files keep their provenance there). CRLF and LF
 * are both accepted. Errors name the line and column, so a user can find the bad cell.
 */
import { parseNumber, shortest } from "./float.js";

export class CsvError extends Error {}

export interface Table {
  readonly columns: readonly string[];
  /** Each row's cells as text, in column order. */
  readonly rows: readonly (readonly string[])[];
  /** Source line number (1-based) of each row, for messages. */
  readonly lines: readonly number[];
  /** The comment lines before the header, without the leading '# '. */
  readonly comments: readonly string[];
}

/** Parse CSV text. `source` names the file in messages. */
export function parseCsv(text: string, source: string): Table {
  const raw = text.split(/\r?\n/);
  const comments: string[] = [];
  let i = 0;
  for (; i < raw.length; i++) {
    const l = raw[i]!;
    if (l.startsWith("#")) comments.push(l.replace(/^#\s?/, ""));
    else if (l.trim() !== "") break;
  }
  if (i >= raw.length) throw new CsvError(`${source}: empty file (no header line)`);
  const columns = headerCells(raw[i]!, i + 1, source);
  const rows: string[][] = [];
  const lines: number[] = [];
  for (let k = i + 1; k < raw.length; k++) {
    const cells = rowCells(raw[k]!, k + 1, columns.length, source);
    if (cells === undefined) continue;
    rows.push(cells);
    lines.push(k + 1);
  }
  return { columns, rows, lines, comments };
}

/** The column names of a header line (1-based `lineNo` for messages); throws on an empty or repeated name. */
export function headerCells(line: string, lineNo: number, source: string): string[] {
  const columns = line.split(",").map((c) => c.trim());
  const seen = new Set<string>();
  columns.forEach((c, j) => {
    if (c === "") throw new CsvError(`${source}:${lineNo}: header column ${j + 1} is empty`);
    if (seen.has(c)) throw new CsvError(`${source}:${lineNo}: header names column '${c}' twice`);
    seen.add(c);
  });
  return columns;
}

/**
 * The trimmed cells of a data line, or undefined for a blank or comment line; throws when the line does not
 * have `width` cells. Shared by parseCsv and the streaming reader (stream.ts), so both give the same messages.
 */
export function rowCells(line: string, lineNo: number, width: number, source: string): string[] | undefined {
  if (line.trim() === "" || line.startsWith("#")) return undefined;
  const cells = line.split(",").map((c) => c.trim());
  if (cells.length !== width) throw new CsvError(`${source}:${lineNo}: ${cells.length} cells, the header has ${width} columns`);
  return cells;
}

/** Index of a column, or -1. */
export function columnIndex(t: Table, name: string): number {
  return t.columns.indexOf(name);
}

/** The number in row r, column c; throws a CsvError naming the place when the cell is not a number. */
export function numberAt(t: Table, source: string, r: number, c: number): number {
  const cell = t.rows[r]![c]!;
  const v = parseNumber(cell);
  if (v === undefined) {
    throw new CsvError(`${source}:${t.lines[r]}: column '${t.columns[c]}' holds '${cell}', which is not a number (column ${c + 1})`);
  }
  const lost = lostOnParse(cell, v);
  if (lost) throw new CsvError(`${source}:${t.lines[r]}: column '${t.columns[c]}' holds '${cell}', which ${lost} (column ${c + 1})`);
  return v;
}

/**
 * Why a decimal cell lost its meaning on parsing, or undefined: a number written with a non-zero digit that
 * rounds to 0 (below the smallest subnormal, about 4.9e-324), or a finite decimal that rounds to infinity
 * (above about 1.8e308). A literal 0, and inf or nan spelled as such, are what they say.
 */
export function lostOnParse(cell: string, v: number): string | undefined {
  if (v !== 0 && Number.isFinite(v)) return undefined; // only 0 and infinity can be a lost value
  const t = cell.trim();
  if (/^0x/i.test(t)) return undefined; // bit patterns are exact
  if (v === 0) {
    const mantissa = t.split(/[eE]/)[0]!;
    if (/[1-9]/.test(mantissa)) return "underflows to 0 in double precision (its magnitude is below 4.9e-324)";
  } else if (!Number.isFinite(v) && /^[+-]?(\d|\.\d)/.test(t)) {
    return "overflows to infinity in double precision (its magnitude is above 1.8e308)";
  }
  return undefined;
}

/** Format one cell: shortest round-trip decimal for numbers, text as is. */
export function cell(v: number | string): string {
  return typeof v === "number" ? shortest(v) : v;
}

/** CSV text from a header and rows (LF line ends, a final newline). */
export function formatCsv(columns: readonly string[], rows: readonly (readonly (number | string)[])[], comments: readonly string[] = []): string {
  const out: string[] = comments.map((c) => `# ${c}`);
  out.push(columns.join(","));
  for (const row of rows) out.push(row.map(cell).join(","));
  return out.join("\n") + "\n";
}
