/**
 * `areal compare a.csv b.csv`: two result files of the same cases, aligned by row and column name: max absolute,
 * relative and ULP difference per column, the first row beyond the tolerance.
 */
import { parseCsv, CsvError } from "../core/csv.js";
import { parseNumber, sameBits, ulpDistance } from "../core/float.js";
import { fig, table } from "./compare-builds.js";

export interface ColumnDiff {
  readonly column: string;
  readonly numeric: boolean;
  readonly maxAbs: number;
  readonly maxRel: number;
  readonly maxUlp: number;
  /** Rows whose cells differ at all (bits, or text). */
  readonly differing: number;
}

export interface CsvComparison {
  readonly rows: number;
  readonly columns: readonly ColumnDiff[];
  readonly tol: number;
  /** The first row (1-based data row, with its line in each file) with a cell beyond the tolerance. */
  readonly firstBeyond?: { readonly row: number; readonly lineA: number; readonly lineB: number; readonly column: string; readonly a: string; readonly b: string };
}

/** Compare two CSV texts of the same cases. Throws CsvError on different rows or columns. */
export function compareCsv(textA: string, nameA: string, textB: string, nameB: string, tol = 0): CsvComparison {
  const a = parseCsv(textA, nameA);
  const b = parseCsv(textB, nameB);
  const onlyA = a.columns.filter((c) => !b.columns.includes(c));
  const onlyB = b.columns.filter((c) => !a.columns.includes(c));
  if (onlyA.length || onlyB.length) {
    throw new CsvError(`the files have different columns: ${onlyA.length ? `only in ${nameA}: ${onlyA.join(", ")}` : ""}${onlyA.length && onlyB.length ? "; " : ""}${onlyB.length ? `only in ${nameB}: ${onlyB.join(", ")}` : ""}`);
  }
  if (a.rows.length !== b.rows.length) throw new CsvError(`the files have different numbers of rows: ${nameA} has ${a.rows.length}, ${nameB} has ${b.rows.length}`);
  let firstBeyond: CsvComparison["firstBeyond"];
  const columns = a.columns.map((name, ca) => {
    const cb = b.columns.indexOf(name);
    let numeric = true;
    let maxAbs = 0;
    let maxRel = 0;
    let maxUlp = 0;
    let differing = 0;
    for (let r = 0; r < a.rows.length; r++) {
      const sa = a.rows[r]![ca]!;
      const sb = b.rows[r]![cb]!;
      const x = parseNumber(sa);
      const y = parseNumber(sb);
      let beyond = false;
      if (x === undefined || y === undefined) {
        if (x === undefined && y === undefined) numeric = false;
        if (sa !== sb) {
          differing++;
          beyond = true;
        }
      } else if (!sameBits(x, y)) {
        differing++;
        const d = Number.isNaN(x) !== Number.isNaN(y) ? Infinity : Math.abs(x - y);
        const dd = Number.isNaN(d) ? Infinity : d; // inf vs -inf
        if (dd > maxAbs) maxAbs = dd;
        const rel = x === 0 ? dd : dd / Math.abs(x);
        if (rel > maxRel) maxRel = rel;
        const u = ulpDistance(x, y);
        if (u > maxUlp) maxUlp = u;
        beyond = dd > tol;
      }
      if (beyond && (firstBeyond === undefined || r < firstBeyond.row - 1)) {
        firstBeyond = { row: r + 1, lineA: a.lines[r]!, lineB: b.lines[r]!, column: name, a: sa, b: sb };
      }
    }
    return { column: name, numeric, maxAbs, maxRel, maxUlp, differing };
  });
  return { rows: a.rows.length, columns, tol, firstBeyond };
}

export function formatCsvComparison(c: CsvComparison, nameA: string, nameB: string): string {
  const out = [`areal compare: ${nameA} vs ${nameB}: ${c.rows} rows, ${c.columns.length} columns, tolerance ${c.tol} (absolute)`];
  out.push(...table(["column", "differing rows", "max abs", "max rel", "max ulp"], c.columns.map((d) =>
    [d.column, String(d.differing), d.numeric ? fig(d.maxAbs) : "(text)", d.numeric ? fig(d.maxRel) : "-", d.numeric ? fig(d.maxUlp) : "-"])));
  const f = c.firstBeyond;
  out.push("", f ? `first row beyond the tolerance: row ${f.row} (line ${f.lineA} of ${nameA}, line ${f.lineB} of ${nameB}), column ${f.column}: ${f.a} vs ${f.b}` : "no row differs beyond the tolerance.");
  return out.join("\n") + "\n";
}
