/**
 * `areal compare a.csv b.csv`: two result files of the same cases (a real trace against areal's output, or two
 * builds' `eval` files), aligned by row and by column name. Columns of b can be renamed to a's names (`--map
 * theirs=ours`), left out (`--ignore COL`) or selected (`--only COL`). A column named `status` is read as a
 * status, a number or a word (0 and ok are the same). Each column has a tolerance in ulp, relative or absolute
 * (`--tol 4ulp`, `--tol E=1e-12rel`, `--tol r_x=1e-6abs`; a bare number is absolute). The report gives, per
 * column, the largest differences and the first and the worst rows beyond the tolerance.
 */
import { parseCsv, CsvError } from "../core/csv.js";
import { parseNumber, sameBits, ulpDistance } from "../core/float.js";
import { statusCode } from "../module/status.js";
import { fig } from "./compare-builds.js";
import { table } from "../core/text.js";

/** A tolerance: a cell pair is within it when the difference in this measure is at most `value`. */
export interface Tolerance {
  readonly kind: "abs" | "rel" | "ulp";
  readonly value: number;
}

/** How to line the two files up and how close is close enough. */
export interface CompareOptions {
  /** b's column name -> a's column name. */
  readonly map?: Readonly<Record<string, string>>;
  /** Columns (a's names) not compared. */
  readonly ignore?: readonly string[];
  /** Compare only these columns (a's names). */
  readonly only?: readonly string[];
  /** Tolerance per column (a's names); "*" for every other column. Default: exact (0 abs). */
  readonly tol?: Readonly<Record<string, Tolerance>>;
}

/** One row beyond the tolerance, with its line in each file and the difference in the column's measure. */
export interface RowDiff {
  readonly row: number;
  readonly lineA: number;
  readonly lineB: number;
  readonly a: string;
  readonly b: string;
  readonly diff: number;
}

export interface ColumnDiff {
  readonly column: string;
  /** The column's name in b when it was mapped. */
  readonly columnB?: string;
  readonly numeric: boolean;
  readonly status: boolean;
  readonly tol: Tolerance;
  readonly maxAbs: number;
  readonly maxRel: number;
  readonly maxUlp: number;
  /** Rows whose cells differ at all (bits, status code, or text). */
  readonly differing: number;
  /** Rows beyond the tolerance. */
  readonly beyond: number;
  readonly first?: RowDiff;
  readonly worst?: RowDiff;
}

export interface CsvComparison {
  readonly rows: number;
  readonly columns: readonly ColumnDiff[];
  /** The default tolerance ("*"), for the report's first line. */
  readonly tol: Tolerance;
  /** Columns of either file not compared (ignored, not selected, or only in one file and left out). */
  readonly notCompared: readonly string[];
  /** The first row (1-based data row, with its line in each file) with a cell beyond the tolerance. */
  readonly firstBeyond?: { readonly row: number; readonly lineA: number; readonly lineB: number; readonly column: string; readonly a: string; readonly b: string };
}

const EXACT: Tolerance = { kind: "abs", value: 0 };

/** `4ulp`, `1e-12rel`, `1e-9abs` or a bare number (absolute); undefined when it is none of these. */
export function parseTolerance(text: string): Tolerance | undefined {
  const m = /^\s*([0-9.eE+-]+)\s*(ulp|rel|abs)?\s*$/.exec(text);
  if (!m) return undefined;
  const value = Number(m[1]);
  if (!Number.isFinite(value) || value < 0 || m[1]!.trim() === "") return undefined;
  return { kind: (m[2] ?? "abs") as Tolerance["kind"], value };
}

export function toleranceText(t: Tolerance): string {
  return t.kind === "ulp" ? `${t.value} ulp` : `${t.value} ${t.kind === "rel" ? "relative" : "absolute"}`;
}

/** A status cell as its code: a number, or a status word; undefined for anything else. */
function statusOf(s: string): number | undefined {
  const t = s.trim();
  if (/^-?\d+$/.test(t)) return Number(t);
  return statusCode(t);
}

/** The columns to compare: a's name, its index in a and in b. Throws CsvError on a column set that does not line up. */
function lineUp(colsA: readonly string[], colsB: readonly string[], nameA: string, nameB: string, o: CompareOptions): { pairs: { name: string; nameB: string; ia: number; ib: number }[]; notCompared: string[] } {
  const map = o.map ?? {};
  for (const theirs of Object.keys(map)) if (!colsB.includes(theirs)) throw new CsvError(`--map ${theirs}=${map[theirs]}: ${nameB} has no column '${theirs}' (it has ${colsB.join(", ")})`);
  for (const ours of Object.values(map)) if (!colsA.includes(ours)) throw new CsvError(`--map: ${nameA} has no column '${ours}' (it has ${colsA.join(", ")})`);
  const renamedB = colsB.map((c) => map[c] ?? c);
  for (const c of [...(o.only ?? []), ...(o.ignore ?? [])]) {
    if (!colsA.includes(c) && !renamedB.includes(c)) throw new CsvError(`column '${c}' is in neither file (${nameA}: ${colsA.join(", ")}; ${nameB}: ${renamedB.join(", ")})`);
  }
  for (const c of Object.keys(o.tol ?? {})) if (c !== "*" && !colsA.includes(c)) throw new CsvError(`--tol ${c}=...: ${nameA} has no column '${c}'`);
  const wanted = (c: string): boolean => !(o.ignore ?? []).includes(c) && (o.only === undefined || o.only.length === 0 || o.only.includes(c));
  const onlyA = colsA.filter((c) => wanted(c) && !renamedB.includes(c));
  const onlyB = renamedB.filter((c) => wanted(c) && !colsA.includes(c));
  if (onlyA.length || onlyB.length) {
    throw new CsvError(`the files have different columns: ${onlyA.length ? `only in ${nameA}: ${onlyA.join(", ")}` : ""}${onlyA.length && onlyB.length ? "; " : ""}${onlyB.length ? `only in ${nameB}: ${onlyB.join(", ")}` : ""} (rename with --map theirs=ours, leave out with --ignore COL, or pick with --only COL)`);
  }
  const pairs = colsA.filter(wanted).map((name) => {
    const ib = renamedB.indexOf(name);
    return { name, nameB: colsB[ib]!, ia: colsA.indexOf(name), ib };
  });
  const notCompared = [...colsA.filter((c) => !wanted(c)), ...colsB.filter((_c, i) => !wanted(renamedB[i]!) && !colsA.includes(renamedB[i]!))];
  return { pairs, notCompared: [...new Set(notCompared)] };
}

/** The difference of two numbers in a tolerance's measure (Infinity when one is NaN and the other not). */
function measure(x: number, y: number, kind: Tolerance["kind"]): { abs: number; rel: number; ulp: number; in: number } {
  const d0 = Number.isNaN(x) !== Number.isNaN(y) ? Infinity : Math.abs(x - y);
  const abs = Number.isNaN(d0) ? Infinity : d0; // inf vs -inf
  const rel = x === 0 ? abs : abs / Math.abs(x);
  const ulp = ulpDistance(x, y);
  return { abs, rel, ulp, in: kind === "abs" ? abs : kind === "rel" ? rel : ulp };
}

/** Compare two CSV texts of the same cases. `opts` a number: an absolute tolerance for every column. */
export function compareCsv(textA: string, nameA: string, textB: string, nameB: string, opts: number | CompareOptions = 0): CsvComparison {
  const o: CompareOptions = typeof opts === "number" ? { tol: { "*": { kind: "abs", value: opts } } } : opts;
  const a = parseCsv(textA, nameA);
  const b = parseCsv(textB, nameB);
  const { pairs, notCompared } = lineUp(a.columns, b.columns, nameA, nameB, o);
  if (a.rows.length !== b.rows.length) throw new CsvError(`the files have different numbers of rows: ${nameA} has ${a.rows.length}, ${nameB} has ${b.rows.length}`);
  const deflt = o.tol?.["*"] ?? EXACT;
  let firstBeyond: CsvComparison["firstBeyond"];
  const columns = pairs.map(({ name, nameB: colB, ia, ib }): ColumnDiff => {
    const tol = o.tol?.[name] ?? deflt;
    const isStatus = name === "status";
    let numeric = !isStatus;
    let maxAbs = 0;
    let maxRel = 0;
    let maxUlp = 0;
    let differing = 0;
    let beyond = 0;
    let first: RowDiff | undefined;
    let worst: RowDiff | undefined;
    for (let r = 0; r < a.rows.length; r++) {
      const sa = a.rows[r]![ia]!;
      const sb = b.rows[r]![ib]!;
      let diff = 0;
      if (isStatus) {
        const x = statusOf(sa);
        const y = statusOf(sb);
        diff = x !== undefined && y !== undefined ? (x === y ? 0 : Infinity) : sa.trim() === sb.trim() ? 0 : Infinity;
      } else {
        const x = parseNumber(sa);
        const y = parseNumber(sb);
        if (x === undefined || y === undefined) {
          if (x === undefined && y === undefined) numeric = false;
          diff = sa === sb ? 0 : Infinity;
        } else if (!sameBits(x, y)) {
          const m = measure(x, y, tol.kind);
          maxAbs = Math.max(maxAbs, m.abs);
          maxRel = Math.max(maxRel, m.rel);
          maxUlp = Math.max(maxUlp, m.ulp);
          diff = m.in === 0 ? Number.MIN_VALUE : m.in; // +0 and -0: different bits, within any tolerance
          if (m.in <= tol.value) {
            differing++;
            continue;
          }
        }
      }
      if (diff === 0) continue;
      differing++;
      if (diff <= tol.value) continue;
      beyond++;
      const at: RowDiff = { row: r + 1, lineA: a.lines[r]!, lineB: b.lines[r]!, a: sa, b: sb, diff };
      first ??= at;
      if (worst === undefined || diff > worst.diff) worst = at;
      if (firstBeyond === undefined || r < firstBeyond.row - 1) firstBeyond = { row: r + 1, lineA: at.lineA, lineB: at.lineB, column: name, a: sa, b: sb };
    }
    return { column: name, ...(colB !== name ? { columnB: colB } : {}), numeric, status: isStatus, tol, maxAbs, maxRel, maxUlp, differing, beyond, first, worst };
  });
  return { rows: a.rows.length, columns, tol: deflt, notCompared, firstBeyond };
}

function rowText(d: RowDiff | undefined, c: ColumnDiff): string {
  if (!d) return "-";
  const by = Number.isFinite(d.diff) && !c.status && c.numeric ? ` (${fig(d.diff)} ${c.tol.kind})` : "";
  return `row ${d.row}: ${d.a} vs ${d.b}${by}`;
}

export function formatCsvComparison(c: CsvComparison, nameA: string, nameB: string): string {
  const out = [`areal compare: ${nameA} vs ${nameB}: ${c.rows} rows, ${c.columns.length} columns compared, default tolerance ${toleranceText(c.tol)}`];
  if (c.notCompared.length) out.push(`not compared: ${c.notCompared.join(", ")}`);
  out.push(...table(["column", "tolerance", "differing", "beyond", "max abs", "max rel", "max ulp"], c.columns.map((d) => [
    d.columnB ? `${d.column} (${nameB}: ${d.columnB})` : d.column,
    d.status ? "same status" : d.numeric ? toleranceText(d.tol) : "same text",
    String(d.differing),
    String(d.beyond),
    d.status ? "(status)" : d.numeric ? fig(d.maxAbs) : "(text)",
    d.numeric ? fig(d.maxRel) : "-",
    d.numeric ? fig(d.maxUlp) : "-",
  ])));
  const bad = c.columns.filter((d) => d.beyond > 0);
  if (bad.length) {
    out.push("", "rows beyond the tolerance, first and worst per column:");
    for (const d of bad) out.push(`  ${d.column}: first ${rowText(d.first, d)}; worst ${rowText(d.worst, d)}`);
  }
  const f = c.firstBeyond;
  out.push("", f ? `first row beyond the tolerance: row ${f.row} (line ${f.lineA} of ${nameA}, line ${f.lineB} of ${nameB}), column ${f.column}: ${f.a} vs ${f.b}` : "no row differs beyond the tolerance.");
  return out.join("\n") + "\n";
}
