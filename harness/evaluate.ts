/**
 * `areal eval`: run a routine over a CSV of inputs. The output has every input column, then the routine's
 * outputs and `status`, numbers as shortest round-trip decimals. All input is validated before anything is
 * computed, and the output file is written whole or not at all.
 */
import { parseCsv, numberAt, CsvError, formatCsv, type Table } from "./csv.js";
import type { Routine, InputSpec } from "./routines.js";
import type { Kernels } from "./load.js";
import { statusWord, isOk } from "./status.js";

export class EvalError extends Error {}

interface Plan {
  readonly exportName: string;
  readonly specs: readonly InputSpec[];
  /** Column index per argument, or -1 for a default. */
  readonly cols: readonly number[];
}

function planFor(routine: Routine, t: Table, source: string): Plan {
  const attempt = (exportName: string, specs: readonly InputSpec[]): Plan | string => {
    const cols: number[] = [];
    for (const s of specs) {
      const c = t.columns.indexOf(s.name);
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

function argValue(t: Table, source: string, r: number, c: number, s: InputSpec): number {
  if (c < 0) return s.default!;
  if (s.choices) {
    const word = t.rows[r]![c]!;
    const v = s.choices[word];
    if (v !== undefined) return v;
    const asNum = Number(word);
    if (word !== "" && Object.values(s.choices).includes(asNum)) return asNum;
    throw new CsvError(`${source}:${t.lines[r]}: column '${s.name}' holds '${word}'; expected one of ${Object.keys(s.choices).join(", ")}`);
  }
  const v = numberAt(t, source, r, c);
  if (s.integer && !Number.isInteger(v)) throw new CsvError(`${source}:${t.lines[r]}: column '${s.name}' holds '${t.rows[r]![c]}', which is not an integer`);
  return v;
}

export interface EvalResult {
  readonly csv: string;
  readonly rows: number;
  /** Count of rows per status word. */
  readonly statuses: Readonly<Record<string, number>>;
}

/** Evaluate a routine over CSV text. Throws EvalError/CsvError (with line and column) on bad input. */
export function evaluateCsv(routine: Routine, text: string, source: string, k: Kernels): EvalResult {
  const t = parseCsv(text, source);
  const plan = planFor(routine, t, source);
  if (!k.has(plan.exportName)) throw new EvalError(`${k.label}: the module has no export ${plan.exportName} for routine ${routine.name}`);
  for (const o of [...routine.outputs, "status"]) {
    if (t.columns.includes(o)) throw new EvalError(`${source}: input already has a column named '${o}', which is an output of ${routine.name}`);
  }
  // Validate every cell first: nothing is computed or written when a cell is bad.
  const argRows: number[][] = t.rows.map((_, r) => plan.specs.map((s, i) => argValue(t, source, r, plan.cols[i]!, s)));
  const statuses: Record<string, number> = {};
  const outRows: (number | string)[][] = [];
  argRows.forEach((args, r) => {
    const st = k.call(plan.exportName, args);
    const word = statusWord(st);
    statuses[word] = (statuses[word] ?? 0) + 1;
    const outs = routine.outputs.map((_, i) => (isOk(st) ? k.out[i]! : NaN));
    outRows.push([...t.rows[r]!, ...outs, word]);
  });
  return { csv: formatCsv([...t.columns, ...routine.outputs, "status"], outRows), rows: outRows.length, statuses };
}
