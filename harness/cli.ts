/**
 * The `areal` command line. Options are declared once, in OPTIONS; each command names the ones it takes.
 * Exit codes: 0 success, 1 a check failed, 2 bad usage or bad input (the message names the flag, line or
 * column).
 */
import { parseArgs } from "node:util";
import { readFileSync, existsSync } from "node:fs";
import { ROUTINES, findRoutine } from "./routines.js";
import { loadBuild, loadFile, type Kernels, ModuleError } from "./load.js";
import { evaluateCsv, EvalError } from "./evaluate.js";
import { CsvError } from "./csv.js";
import { writeAtomic } from "./atomic.js";
import { runSuite, type SuiteResult } from "./check.js";
import { SPECS } from "./specs/index.js";
import { selectSpecs, writeSuite } from "./generate.js";
import { formatCheckTable, checkJson } from "./report.js";
import { demoLines } from "./demo.js";

type OptionType = "string" | "boolean";
interface OptionDef {
  readonly type: OptionType;
  readonly short?: string;
  readonly multiple?: boolean;
  readonly help: string;
  /** Allowed values of a string option. */
  readonly values?: readonly string[];
}

/** Every option of every command. */
const OPTIONS = {
  input: { type: "string", short: "i", help: "input CSV (header of named columns)" },
  out: { type: "string", short: "o", help: "output file (written whole, or not at all)" },
  build: { type: "string", help: "which build runs the kernels", values: ["f64", "f32", "debug"] },
  module: { type: "string", help: "an external WebAssembly module following docs/abi.md" },
  suite: { type: "string", multiple: true, help: "limit to this vector suite (repeatable)" },
  json: { type: "string", help: "also write the results as JSON to this file" },
  verbose: { type: "boolean", short: "v", help: "more detail: iteration histograms, limits and their reasons" },
  date: { type: "string", help: "date written into vector headers (YYYY-MM-DD; default today)" },
  "out-dir": { type: "string", help: "folder for generated vector files (default vectors/)" },
  help: { type: "boolean", short: "h", help: "show help" },
} as const satisfies Record<string, OptionDef>;

type OptionName = keyof typeof OPTIONS;

interface Command {
  readonly summary: string;
  readonly usage: string;
  readonly options: readonly OptionName[];
  run(positionals: string[], values: Record<string, unknown>): number | Promise<number>;
}

export class UsageError extends Error {}

function loadKernels(values: Record<string, unknown>): Kernels {
  const mod = values.module as string | undefined;
  if (mod !== undefined) {
    if (values.build !== undefined) throw new UsageError("--module and --build exclude each other");
    return loadFile(mod);
  }
  return loadBuild(((values.build as string | undefined) ?? "f64") as "f64" | "f32" | "debug");
}

const COMMANDS: Record<string, Command> = {
  eval: {
    summary: "run a routine over a CSV of inputs",
    usage: "areal eval <routine> --input cases.csv [--out results.csv] [--build f64|f32] [--module file.wasm]",
    options: ["input", "out", "build", "module"],
    run(pos, values) {
      const name = pos[0];
      if (name === undefined) throw new UsageError(`eval needs a routine: ${ROUTINES.map((r) => r.name).join(", ")}`);
      const routine = findRoutine(name);
      if (!routine) throw new UsageError(`unknown routine '${name}' (known: ${ROUTINES.map((r) => r.name).join(", ")})`);
      const input = values.input as string | undefined;
      if (input === undefined) throw new UsageError("eval needs --input FILE");
      if (!existsSync(input)) throw new UsageError(`--input: no such file: ${input}`);
      const k = loadKernels(values);
      const res = evaluateCsv(routine, readFileSync(input, "utf8"), input, k);
      const out = values.out as string | undefined;
      if (out === undefined) process.stdout.write(res.csv);
      else {
        writeAtomic(out, res.csv);
        const counts = Object.entries(res.statuses).map(([w, n]) => `${n} ${w}`).join(", ");
        process.stderr.write(`${routine.name}: ${res.rows} rows (${counts || "none"}) -> ${out}\n`);
      }
      return 0;
    },
  },
  check: {
    summary: "run the vector suites against a build and compare with the references",
    usage: "areal check [--build f64|f32] [--module file.wasm] [--suite NAME]... [--json FILE] [--verbose]",
    options: ["build", "module", "suite", "json", "verbose"],
    run(_pos, values) {
      const k = loadKernels(values);
      const results = runChecks(k, (values.suite as string[] | undefined) ?? []);
      process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)));
      if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(checkJson(results, k), null, 2) + "\n");
      return results.every((r) => r.pass) ? 0 : 1;
    },
  },
  vectors: {
    summary: "regenerate the reference vector files (slow: minutes)",
    usage: "areal vectors [--suite NAME]... [--date YYYY-MM-DD] [--out-dir DIR]",
    options: ["suite", "date", "out-dir"],
    run(_pos, values) {
      const specs = selectSpecs((values.suite as string[] | undefined) ?? []);
      const date = (values.date as string | undefined) ?? new Date().toISOString().slice(0, 10);
      if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) throw new UsageError(`--date: '${date}' is not YYYY-MM-DD`);
      const dir = values["out-dir"] as string | undefined;
      const tty = process.stderr.isTTY;
      for (const spec of specs) {
        const t0 = Date.now();
        const path = dir === undefined ? undefined : `${dir}/${spec.suite}.csv`;
        const n = writeSuite(spec, date, tty ? (d, total) => process.stderr.write(`\r${spec.suite}: ${d}/${total}`) : undefined, path);
        process.stderr.write(`${tty ? "\r" : ""}${spec.suite}: ${n} cases in ${((Date.now() - t0) / 1000).toFixed(1)} s\n`);
      }
      return 0;
    },
  },
  demo: {
    summary: "show the kernels on the built-in scenario",
    usage: "areal demo [--build f64|f32]",
    options: ["build", "module"],
    run(_pos, values) {
      process.stdout.write(demoLines(loadKernels(values)).join("\n") + "\n");
      return 0;
    },
  },
  start: {
    summary: "check the release build against every suite, then show the demo (what `npm start` runs)",
    usage: "areal start",
    options: ["verbose"],
    run(_pos, values) {
      const k = loadBuild("f64");
      const results = runChecks(k, []);
      process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)) + "\n");
      process.stdout.write(demoLines(k).join("\n") + "\n");
      return results.every((r) => r.pass) ? 0 : 1;
    },
  },
  routines: {
    summary: "list the routines with their input and output columns",
    usage: "areal routines",
    options: [],
    run() {
      for (const r of ROUTINES) {
        process.stdout.write(`${r.name.padEnd(18)} ${r.summary}\n${"".padEnd(18)} inputs: ${r.inputs.map((i) => (i.default !== undefined ? `[${i.name}]` : i.name)).join(",")}  outputs: ${[...r.outputs, "status"].join(",")}\n`);
      }
      return 0;
    },
  },
};

/** Run the selected suites (all when none are named). */
export function runChecks(k: Kernels, suites: readonly string[]): SuiteResult[] {
  const specs = suites.length === 0 ? SPECS : selectSpecs(suites);
  return specs.map((s) => runSuite(s, k));
}

function helpText(cmd?: string): string {
  if (cmd !== undefined) {
    const c = COMMANDS[cmd]!;
    const lines = [`usage: ${c.usage}`, "", c.summary, ""];
    for (const o of c.options) {
      const d = OPTIONS[o] as OptionDef;
      lines.push(`  --${o}${d.short ? `, -${d.short}` : ""}${d.type === "string" ? " VALUE" : ""}`.padEnd(26) + d.help + (d.values ? ` (${d.values.join("|")})` : ""));
    }
    return lines.join("\n") + "\n";
  }
  const lines = ["usage: areal <command> [options]", "", "commands:"];
  for (const [name, c] of Object.entries(COMMANDS)) lines.push(`  ${name.padEnd(10)} ${c.summary}`);
  lines.push("", "areal <command> --help shows a command's options. Exit codes: 0 ok, 1 a check failed, 2 bad usage or input.");
  lines.push("Not flight-qualified: flight use needs qualified verification and validation under your own process.");
  return lines.join("\n") + "\n";
}

/** Entry point: returns the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const [cmd, ...rest] = argv;
  if (cmd === undefined || cmd === "help" || cmd === "--help" || cmd === "-h") {
    process.stdout.write(helpText());
    return cmd === undefined ? 2 : 0;
  }
  const command = COMMANDS[cmd];
  try {
    if (!command) throw new UsageError(`unknown command '${cmd}' (commands: ${Object.keys(COMMANDS).join(", ")})`);
    const allowed = Object.fromEntries([...command.options, "help" as const].map((o) => {
      const d = OPTIONS[o] as OptionDef;
      return [o, { type: d.type, ...(d.short ? { short: d.short } : {}), ...(d.multiple ? { multiple: true } : {}) }];
    }));
    let parsed;
    try {
      parsed = parseArgs({ args: [...rest], options: allowed, allowPositionals: true, strict: true });
    } catch (err) {
      throw new UsageError(`${cmd}: ${(err as Error).message}`);
    }
    const values = parsed.values as Record<string, unknown>;
    if (values.help) {
      process.stdout.write(helpText(cmd));
      return 0;
    }
    for (const o of command.options) {
      const d = OPTIONS[o] as OptionDef;
      const v = values[o];
      if (d.values && v !== undefined && !d.values.includes(v as string)) {
        throw new UsageError(`--${o}: '${String(v)}' is not one of ${d.values.join(", ")}`);
      }
    }
    return await command.run(parsed.positionals, values);
  } catch (err) {
    if (err instanceof UsageError || err instanceof CsvError || err instanceof EvalError || err instanceof ModuleError) {
      process.stderr.write(`areal: ${err.message}\n`);
      return 2;
    }
    const msg = (err as Error).message ?? String(err);
    process.stderr.write(`areal: ${msg}\n`);
    return 2;
  }
}
