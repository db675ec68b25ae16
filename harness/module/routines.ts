/**
 * The routine table: one entry per kernel the CLI and the checks can call, derived from the ABI table
 * (abi/areal.abi.json through the generated abi-table.ts). A routine names its CSV input columns (in the order
 * of the kernel's arguments), its output columns (output slot i -> outputs[i]) and the module export behind it.
 */
import { ABI_TABLE } from "./abi-table.js";
import type { AbiExport, AbiParam } from "./abi-types.js";

/** One input column. `choices` maps words to the integer the kernel takes (for example method names). */
export interface InputSpec {
  readonly name: string;
  /** Used when the column is absent from the input CSV. No default means the column is required. */
  readonly default?: number;
  /** Allowed words for an enumerated argument, mapped to the integer passed to the kernel. */
  readonly choices?: Readonly<Record<string, number>>;
  /** An integer argument (i32 in the ABI). */
  readonly integer?: boolean;
}

export interface Routine {
  /** CLI name, for example `kepler-elliptic`. */
  readonly name: string;
  /** The module export called. */
  readonly exportName: string;
  /** One line for `areal eval --help` and the check table. */
  readonly summary: string;
  readonly inputs: readonly InputSpec[];
  /** Output slot i is written to column outputs[i]. The status column follows them. */
  readonly outputs: readonly string[];
  /**
   * Alternative input sets: when a row lacks a required column, the first alternative whose columns are
   * all present is used instead (for example `p` in place of `a`). It names the export to call.
   */
  readonly alternatives?: readonly { readonly exportName: string; readonly inputs: readonly InputSpec[] }[];
}

/** The word -> value map of an enumeration of the ABI table (e.g. "method": rk4 -> 0, ...). */
export function choicesOf(name: string): Readonly<Record<string, number>> {
  const e = ABI_TABLE.enums.find((x) => x.name === name);
  if (!e) throw new Error(`abi table: unknown enum ${name}`);
  return Object.fromEntries(e.values.map((v) => [v.word, v.value]));
}

function inputOf(p: AbiParam): InputSpec {
  return {
    name: p.name,
    ...(p.default !== undefined ? { default: p.default } : {}),
    ...(p.enum !== undefined ? { choices: choicesOf(p.enum) } : {}),
    ...(p.type === "i32" ? { integer: true } : {}),
  };
}

/** The routines, built from the ABI table: every export with an `eval` name, with its alternatives. */
export const ROUTINES: readonly Routine[] = ABI_TABLE.exports.filter((x) => x.routine !== undefined).map((x) => {
  const alternatives = ABI_TABLE.exports.filter((y) => y.alternative_of === x.routine).map((y) => ({ exportName: y.name, inputs: y.params.map(inputOf) }));
  const outputs = x.outputs.map((o) => o.name);
  return {
    name: x.routine!,
    exportName: x.name,
    summary: x.summary,
    inputs: x.params.map(inputOf),
    outputs: x.columns ?? outputs,
    ...(alternatives.length > 0 ? { alternatives } : {}),
  };
});

/** The ABI table's entry of an export (throws for a name the table does not have: a programming error). */
export function abiExport(exportName: string): AbiExport {
  const x = ABI_TABLE.exports.find((e) => e.name === exportName);
  if (!x) throw new Error(`abi table: no export ${exportName}`);
  return x;
}

/**
 * The output slots of the named outputs of an export, e.g. `slotsOf("integrate", "t", "k").t`: the harness and
 * tests read slots by these names, never by bare numbers. A name the table does not list throws.
 */
export function slotsOf<N extends string>(exportName: string, ...names: N[]): Readonly<Record<N, number>> {
  const outs = abiExport(exportName).outputs;
  const r = {} as Record<N, number>;
  for (const n of names) {
    const i = outs.findIndex((o) => o.name === n);
    if (i < 0) throw new Error(`abi table: ${exportName} has no output ${n}`);
    r[n] = i;
  }
  return r;
}

/** The value of an enumeration word, e.g. `enumValue("method", "rk4")`. */
export function enumValue(name: string, word: string): number {
  const v = choicesOf(name)[word];
  if (v === undefined) throw new Error(`abi table: enum ${name} has no ${word}`);
  return v;
}

/** The routine with the given CLI name, or undefined. */
export function findRoutine(name: string): Routine | undefined {
  return ROUTINES.find((x) => x.name === name);
}
