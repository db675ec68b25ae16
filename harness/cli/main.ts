/**
 * The `areal` command line. Options are declared once (options.ts); each command lives in commands/ and names
 * the options it takes; usage and help are generated from those declarations.
 * Exit codes: 0 success, 1 a check failed (or a budget broken, builds that must agree differ), 2 bad usage or bad
 * input (the message names the flag, file, line or column, or the module and the export).
 */
import { parseArgs } from "node:util";
import { OPTIONS, UsageError, commandHelp, hang, suggest, unknownName, type Command, type OptionDef } from "./options.js";

export { UsageError } from "./options.js";

/**
 * Every command, in the order help lists them, with the loader of its module (commands/): a command's module,
 * and what it imports, is loaded only when that command runs or its help is shown (loading all of them cost
 * every run 100-170 ms of start-up; the trajectory command's schema validator alone about 80 ms).
 */
const COMMAND_MODULES: Readonly<Record<string, () => Promise<Command>>> = {
  start: async () => (await import("./commands/start.js")).startCommand,
  check: async () => (await import("./commands/check.js")).checkCommand,
  eval: async () => (await import("./commands/eval.js")).evalCommand,
  trajectory: async () => (await import("./commands/trajectory.js")).trajectoryCommand,
  compare: async () => (await import("./commands/compare.js")).compareCommand,
  sweep: async () => (await import("./commands/sweep.js")).sweepCommand,
  merge: async () => (await import("./commands/sweep.js")).mergeCommand,
  vectors: async () => (await import("./commands/vectors.js")).vectorsCommand,
  bench: async () => (await import("./commands/bench.js")).benchCommand,
  count: async () => (await import("./commands/count.js")).countCommand,
  demo: async () => (await import("./commands/demo.js")).demoCommand,
  routines: async () => (await import("./commands/routines.js")).routinesCommand,
};

/** The command names, in the order help lists them. */
export const COMMAND_NAMES: readonly string[] = Object.keys(COMMAND_MODULES);

/** One command (its module loaded now), or undefined for an unknown name. */
async function loadCommand(name: string): Promise<Command | undefined> {
  return Object.hasOwn(COMMAND_MODULES, name) ? COMMAND_MODULES[name]!() : undefined;
}

/** Every command, in help's order (every command module loaded). */
export async function loadCommands(): Promise<Record<string, Command>> {
  const all = await Promise.all(COMMAND_NAMES.map(async (n) => [n, (await loadCommand(n))!] as const));
  return Object.fromEntries(all);
}

async function overview(): Promise<string> {
  const lines = ["usage: areal <command> [options]", "", "commands:"];
  for (const [name, c] of Object.entries(await loadCommands())) lines.push(...hang(`  ${name.padEnd(11)} `, c.summary));
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

/**
 * The message and exit code of an error that reached the top. The error classes of modules a command may not
 * have loaded are loaded here (on the error path only).
 */
async function report(err: unknown): Promise<number> {
  const [{ ModuleError }, { EvalError }, { CsvError }] = await Promise.all([import("../module/load.js"), import("../run/evaluate.js"), import("../core/csv.js")]);
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
    process.stdout.write(await overview());
    return cmd === undefined ? 2 : 0;
  }
  try {
    const command = await loadCommand(cmd);
    if (!command) throw unknownName("command", cmd, COMMAND_NAMES);
    const { positionals, values } = parseOptions(cmd, command, rest);
    if (values.help) {
      process.stdout.write(commandHelp(cmd, command));
      return 0;
    }
    return await command.run(positionals, values);
  } catch (err) {
    return await report(err);
  }
}
