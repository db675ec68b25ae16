/**
 * The command line's options, declared once: every flag with its type, value name and help. Each command names
 * the options it takes; usage lines and help are generated from this table, so they cannot drift from what the
 * parser accepts.
 */
import { BUILDS } from "../module/builds.js";
import { hang, wrap } from "../core/text.js";

export { hang, wrap } from "../core/text.js";

type OptionType = "string" | "boolean";
export interface OptionDef {
  readonly type: OptionType;
  readonly short?: string;
  readonly multiple?: boolean;
  /** The value's name in usage lines (FILE, N, ...). */
  readonly value?: string;
  readonly help: string;
  /** Allowed values of a string option. */
  readonly values?: readonly string[];
}

/** Every option of every command. */
export const OPTIONS = {
  input: { type: "string", short: "i", value: "FILE", help: "input CSV (header of named columns)" },
  out: { type: "string", short: "o", value: "FILE", help: "output file (written whole, or not at all)" },
  build: { type: "string", value: "NAME", help: "which build runs the kernels", values: BUILDS },
  builds: { type: "string", value: "LIST", help: "comma-separated builds to compare, the first is the baseline (f64,native,js,f32,debug,baseline,optimizing, or a FILE.so library or FILE.wasm module of your own)" },
  tol: { type: "string", multiple: true, value: "[COL=]X", help: "compare a.csv b.csv: tolerance, for every column or for COL (repeatable): 4ulp, 1e-12rel, 1e-9abs, or a bare number (absolute); default exact" },
  map: { type: "string", multiple: true, value: "THEIRS=OURS", help: "compare a.csv b.csv: read b's column THEIRS as a's column OURS (repeatable)" },
  ignore: { type: "string", multiple: true, value: "COL", help: "compare a.csv b.csv: leave this column out (repeatable)" },
  only: { type: "string", multiple: true, value: "COL", help: "compare a.csv b.csv: compare only this column (repeatable)" },
  module: { type: "string", value: "FILE", help: "an external WebAssembly module following docs/abi.md" },
  "call-limit": { type: "string", value: "SECONDS", help: "--module: CPU-time limit of each call into the module, its start function included (default 10; wall time capped at 10x); a call over it stops the run" },
  library: { type: "string", value: "FILE.so", help: "a native shared library with the ABI of include/areal.h, run in a child process (a crash is reported with the call)" },
  limits: { type: "string", value: "FILE", help: "check: your own limits, JSON {suite or \"*\": {max_ulp|max_rel|max_abs, max_iterations (null: no cap), why}} over the default (areal's limits for areal's builds; accuracy only, no iteration cap, for --module and --library)" },
  suite: { type: "string", multiple: true, value: "NAME", help: "limit to this vector suite (repeatable)" },
  json: { type: "string", value: "FILE", help: "also write the results as JSON to this file" },
  verbose: { type: "boolean", short: "v", help: "more detail: iteration histograms, limits and their reasons" },
  date: { type: "string", value: "YYYY-MM-DD", help: "date written into the files' headers (default today): vector headers, the OEM's CREATION_DATE" },
  "out-dir": { type: "string", value: "DIR", help: "folder for generated vector files (default vectors/)" },
  plan: { type: "string", short: "p", value: "FILE", help: "trajectory plan JSON: a state vector or orbital elements, the force model and the run (schema docs/trajectory-plan.schema.json, fields in docs/trajectory-plan.md)" },
  csv: { type: "string", value: "FILE", help: "trajectory CSV to write (default <plan name>.csv here)" },
  oem: { type: "string", value: "FILE", help: "CCSDS OEM (KVN) file to write (default <plan name>.oem here)" },
  workers: { type: "string", value: "N", help: "worker threads, each with its own module instance (default: the number of cores)" },
  grid: { type: "string", value: "FILE", help: "sweep: grid description JSON (docs/sweeps.md lists its fields)" },
  shard: { type: "string", value: "k/n", help: "only shard k of n, for job arrays: sweep, the cases of shard k (join the parts with areal merge); eval, the rows starting in byte range k of n of the input (part 1 has the header; the parts joined in order are one run's bytes)" },
  resume: { type: "boolean", help: "sweep: when --out already holds this shard of this sweep (same routine, grid, module, shard; whole), keep it and exit 0 (safe resubmission)" },
  report: { type: "string", value: "DIR", help: "also write the HTML report (one self-contained file) and its JSON into this folder" },
  "bench-json": { type: "string", value: "FILE", help: "--report: timings from `areal bench --json FILE` for the report's speed section (without it: not measured)" },
  "counts-json": { type: "string", value: "FILE", help: "instruction counts from `areal count --json FILE`: the report's counts section (check --report); bench prices them with the profile's cycles per instruction class" },
  long: { type: "boolean", help: "bench: longer timings and a finer iteration grid (several minutes)" },
  profile: { type: "string", value: "FILE", help: "bench: target profile JSON (cycles per operation; bench/profiles/example-target.json)" },
  targets: { type: "string", value: "LIST", help: "count: comma-separated instruction sets (x86-64, armhf, riscv64, cortex-m4f; default all four)" },
  help: { type: "boolean", short: "h", help: "show help" },
} as const satisfies Record<string, OptionDef>;

export type OptionName = keyof typeof OPTIONS;

/** One command of the CLI: its options come from OPTIONS; its usage line is generated (usageLine). */
export interface Command {
  readonly summary: string;
  /** Positional arguments as shown in usage, e.g. "<routine>". */
  readonly args?: string;
  readonly options: readonly OptionName[];
  /** Options that must be given (shown without brackets). */
  readonly required?: readonly OptionName[];
  /** A second form of the command, shown as another usage line. */
  readonly alternative?: { readonly args?: string; readonly options: readonly OptionName[]; readonly required?: readonly OptionName[] };
  run(positionals: string[], values: Record<string, unknown>): number | Promise<number>;
}

/** Bad usage or bad input: the message names the flag, the file, the line or the column. Exit code 2. */
export class UsageError extends Error {}

function optionText(o: OptionName, required: boolean): string {
  const d = OPTIONS[o] as OptionDef;
  const t = `--${o}${d.type === "string" ? ` ${d.value ?? "VALUE"}` : ""}`;
  const shown = d.multiple ? `${t}...` : t;
  return required ? shown : `[${shown}]`;
}

/** The usage line(s) of a command, from its declaration. */
export function usageLines(name: string, c: Command): string[] {
  const form = (args: string | undefined, options: readonly OptionName[], required: readonly OptionName[] = []): string =>
    ["areal", name, ...(args ? [args] : []), ...required.map((o) => optionText(o, true)), ...options.filter((o) => !required.includes(o)).map((o) => optionText(o, false))].join(" ");
  const lines = [form(c.args, c.options, c.required)];
  if (c.alternative) lines.push(form(c.alternative.args, c.alternative.options, c.alternative.required));
  return lines;
}

/** Help for one command: usage, summary, every option it takes with its help. */
export function commandHelp(name: string, c: Command): string {
  const lines = usageLines(name, c).flatMap((u, i) => wrap(`${i === 0 ? "usage:" : "   or:"} ${u}`, 100, "         "));
  lines.push("", ...wrap(c.summary, 100, ""), "");
  const all = [...new Set([...c.options, ...(c.alternative?.options ?? [])])];
  for (const o of all) {
    const d = OPTIONS[o] as OptionDef;
    const head = `  --${o}${d.short ? `, -${d.short}` : ""}${d.type === "string" ? ` ${d.value ?? "VALUE"}` : ""}`.padEnd(28);
    lines.push(...hang(head, d.help + (d.values ? ` (${d.values.join(", ")})` : "")));
  }
  return lines.join("\n") + "\n";
}

/** The nearest names to a mistyped one (edit distance at most 2, or a prefix), for "did you mean". */
export function suggest(word: string, known: readonly string[]): string[] {
  const dist = (a: string, b: string): number => {
    const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...Array<number>(b.length).fill(0)]);
    for (let j = 1; j <= b.length; j++) d[0]![j] = j;
    for (let i = 1; i <= a.length; i++) {
      for (let j = 1; j <= b.length; j++) {
        d[i]![j] = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
      }
    }
    return d[a.length]![b.length]!;
  };
  const w = word.toLowerCase();
  return known.filter((k) => dist(w, k.toLowerCase()) <= 2 || (w.length >= 3 && k.startsWith(w)));
}

/** "unknown X 'y' (did you mean: z?) (known: ...)" */
export function unknownName(kind: string, word: string, known: readonly string[]): UsageError {
  const near = suggest(word, known);
  return new UsageError(`unknown ${kind} '${word}'${near.length ? ` (did you mean ${near.map((n) => `'${n}'`).join(" or ")}?)` : ""}; known: ${known.join(", ")}`);
}
