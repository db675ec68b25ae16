/**
 * The `areal` command line. Options are declared once (options.ts); each command lives in commands/ and names
 * the options it takes; usage and help are generated from those declarations.
 * Exit codes: 0 success, 1 a check failed (or a budget broken, builds that must agree differ), 2 bad usage or bad
 * input (the message names the flag, file, line or column, or the module and the export).
 */
import { parseArgs } from "node:util";
import { ModuleError } from "../module/load.js";
import { EvalError } from "../run/evaluate.js";
import { CsvError } from "../core/csv.js";
import { OPTIONS, UsageError, commandHelp, hang, suggest, unknownName, type Command, type OptionDef } from "./options.js";
import { evalCommand } from "./commands/eval.js";
import { checkCommand } from "./commands/check.js";
import { vectorsCommand } from "./commands/vectors.js";
import { demoCommand } from "./commands/demo.js";
import { startCommand } from "./commands/start.js";
import { trajectoryCommand } from "./commands/trajectory.js";
import { compareCommand } from "./commands/compare.js";
import { sweepCommand, mergeCommand } from "./commands/sweep.js";
import { benchCommand } from "./commands/bench.js";
import { routinesCommand } from "./commands/routines.js";
import { countCommand } from "./commands/count.js";

export { UsageError } from "./options.js";

/** Every command, in the order help lists them. */
export const COMMANDS: Readonly<Record<string, Command>> = {
  start: startCommand,
  check: checkCommand,
  eval: evalCommand,
  trajectory: trajectoryCommand,
  compare: compareCommand,
  sweep: sweepCommand,
  merge: mergeCommand,
  vectors: vectorsCommand,
  bench: benchCommand,
  count: countCommand,
  demo: demoCommand,
  routines: routinesCommand,
};

function overview(): string {
  const lines = ["usage: areal <command> [options]", "", "commands:"];
  for (const [name, c] of Object.entries(COMMANDS)) lines.push(...hang(`  ${name.padEnd(11)} `, c.summary));
  lines.push("", "areal <command> --help shows a command's options.",
    "Exit codes: 0 ok, 1 a check failed or a budget was broken, 2 bad usage or input.",
    "Not flight-qualified: flight use needs qualified verification and validation under your own process.");
  return lines.join("\n") + "\n";
}

/** Parse a command's options (strictly: an unknown flag names itself) and check enumerated values. */
function parseOptions(cmd: string, command: Command, rest: readonly string[]): { positionals: string[]; values: Record<string, unknown> } {
  const names = [...new Set([...command.options, ...(command.alternative?.options ?? []), "help" as const])];
  const allowed = Object.fromEntries(names.map((o) => {
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
  for (const o of names) {
    const d = OPTIONS[o] as OptionDef;
    const v = values[o];
    if (d.values && v !== undefined && !d.values.includes(v as string)) {
      const near = suggest(String(v), d.values);
      throw new UsageError(`--${o}: '${String(v)}' is not one of ${d.values.join(", ")}${near.length ? ` (did you mean ${near.map((n) => `'${n}'`).join(" or ")}?)` : ""}`);
    }
  }
  return { positionals: parsed.positionals, values };
}

/** The message and exit code of an error that reached the top. */
function report(err: unknown): number {
  if (err instanceof UsageError || err instanceof CsvError || err instanceof EvalError || err instanceof ModuleError) {
    process.stderr.write(`areal: ${err.message}\n`);
    return 2;
  }
  if (err instanceof WebAssembly.RuntimeError) {
    // A trap inside a kernel: the module is faulty (a kernel following docs/abi.md returns a status instead).
    process.stderr.write(`areal: the kernel module trapped (${err.message}); the module is faulty, nothing was written\n`);
    return 2;
  }
  process.stderr.write(`areal: ${(err as Error).message ?? String(err)}\n`);
  return 2;
}

/** Entry point: returns the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const [cmd, ...rest] = argv;
  if (cmd === undefined || cmd === "help" || cmd === "--help" || cmd === "-h") {
    process.stdout.write(overview());
    return cmd === undefined ? 2 : 0;
  }
  try {
    const command = COMMANDS[cmd];
    if (!command) throw unknownName("command", cmd, Object.keys(COMMANDS));
    const { positionals, values } = parseOptions(cmd, command, rest);
    if (values.help) {
      process.stdout.write(commandHelp(cmd, command));
      return 0;
    }
    return await command.run(positionals, values);
  } catch (err) {
    return report(err);
  }
}
