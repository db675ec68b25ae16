/**
 * The `areal` command line. Options are declared once, in OPTIONS; each command names the ones it takes.
 * Exit codes: 0 success, 1 a check failed, 2 bad usage or bad input (the message names the flag, line or
 * column).
 */
import { parseArgs } from "node:util";
import { readFileSync, existsSync } from "node:fs";
import { basename } from "node:path";
import { ROUTINES, findRoutine } from "../module/routines.js";
import { loadBuild, loadFile, type Kernels, ModuleError } from "../module/load.js";
import { EvalError } from "../run/evaluate.js";
import { CsvError } from "../core/csv.js";
import { writeAtomic } from "../core/atomic.js";
import { runSuite, runSuitesOn, type SuiteResult } from "../verify/check.js";
import { SPECS } from "../verify/specs/index.js";
import { selectSpecs, writeSuite } from "../verify/generate.js";
import { formatCheckTable, checkJson } from "../verify/summary.js";
import { demoLines } from "../run/demo.js";
import { runBench, formatBench, benchJson, DEFAULT_SETTINGS, LONG_SETTINGS } from "../perf/bench.js";
import { ProfileError } from "../perf/opcount.js";
import { BUILDS, loadNamedBuild, loadModule, type BuildName } from "../module/builds.js";
import { planModule, skippedLines } from "../module/signatures.js";
import { compareCommand, COMPARE_USAGE } from "../verify/compare.js";
import { parseScenario, propagate, progressBar } from "../run/trajectory.js";
import { statusWord } from "../module/status.js";
import { evaluateFile } from "../run/evaluate.js";
import { parseWorkers, progressLine, progressWanted, type KernelSource } from "../core/pool.js";
import { parseGrid, parseShard, runSweep, formatSweep, moduleIdentity, sweepRoutine } from "../run/sweep.js";
import { mergeSweeps } from "../run/merge.js";
import type { VectorSpec } from "../verify/specs/types.js";

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
  build: { type: "string", help: "which build runs the kernels", values: BUILDS },
  builds: { type: "string", help: "comma-separated builds to compare, the first is the baseline (f64,native,js,f32)" },
  tol: { type: "string", help: "compare a.csv b.csv: largest allowed absolute difference per cell" },
  module: { type: "string", help: "an external WebAssembly module following docs/abi.md" },
  suite: { type: "string", multiple: true, help: "limit to this vector suite (repeatable)" },
  json: { type: "string", help: "also write the results as JSON to this file" },
  verbose: { type: "boolean", short: "v", help: "more detail: iteration histograms, limits and their reasons" },
  date: { type: "string", help: "date written into vector headers (YYYY-MM-DD; default today)" },
  "out-dir": { type: "string", help: "folder for generated vector files (default vectors/)" },
  scenario: { type: "string", short: "s", help: "scenario JSON (harness/integrate.ts lists its fields)" },
  csv: { type: "string", help: "trajectory CSV to write (default <scenario name>.csv here)" },
  oem: { type: "string", help: "CCSDS OEM (KVN) file to write (default <scenario name>.oem here)" },
  workers: { type: "string", help: "worker threads, each with its own module instance (default: the number of cores)" },
  grid: { type: "string", help: "sweep: grid description JSON (harness/sweep.ts lists its fields)" },
  shard: { type: "string", help: "sweep: run only shard k of n (k/n, for job arrays); join the parts with areal merge" },
  report: { type: "string", help: "also write the HTML report (one self-contained file) and its JSON into this folder" },
  long: { type: "boolean", help: "bench: longer timings and a finer iteration grid (several minutes)" },
  profile: { type: "string", help: "bench: target profile JSON (cycles per operation; bench/profiles/example-target.json)" },
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
  return loadNamedBuild(((values.build as string | undefined) ?? "f64") as BuildName);
}

const COMMANDS: Record<string, Command> = {
  eval: {
    summary: "run a routine over a CSV of inputs",
    usage: "areal eval <routine> --input cases.csv [--out results.csv] [--build f64|f32|js|native|debug] [--module file.wasm] [--workers N]",
    options: ["input", "out", "build", "module", "workers"],
    async run(pos, values) {
      const name = pos[0];
      if (name === undefined) throw new UsageError(`eval needs a routine: ${ROUTINES.map((r) => r.name).join(", ")}`);
      const routine = findRoutine(name);
      if (!routine) throw new UsageError(`unknown routine '${name}' (known: ${ROUTINES.map((r) => r.name).join(", ")})`);
      const input = values.input as string | undefined;
      if (input === undefined) throw new UsageError("eval needs --input FILE");
      if (!existsSync(input)) throw new UsageError(`--input: no such file: ${input}`);
      const workers = parseWorkers(values.workers as string | undefined);
      const k = loadKernels(values);
      const out = values.out as string | undefined;
      // Streamed in chunks through the workers; the output appears whole at the end, or not at all.
      const bar = progressLine(progressWanted());
      const mb = (b: number): string => (b / 1048576).toFixed(0);
      let res;
      try {
        res = await evaluateFile(routine, input, input, { workers, load: kernelSource(values), kernels: k, out, progress: (d, n) => bar.update(`${routine.name}: ${mb(d)} of ${mb(n)} MB read`) });
      } finally {
        bar.end();
      }
      if (out !== undefined) {
        const counts = Object.entries(res.statuses).map(([w, n]) => `${n} ${w}`).join(", ");
        process.stderr.write(`${routine.name}: ${res.rows} rows (${counts || "none"}) -> ${out}\n`);
      }
      return 0;
    },
  },
  check: {
    summary: "run the vector suites against a build and compare with the references",
    usage: "areal check [--build f64|f32|js|native|debug] [--module file.wasm] [--suite NAME]... [--json FILE] [--verbose] [--workers N] [--report DIR]",
    options: ["build", "module", "suite", "json", "verbose", "workers", "report"],
    async run(_pos, values) {
      const workers = parseWorkers(values.workers as string | undefined);
      const mod = values.module as string | undefined;
      let k: Kernels;
      let results: SuiteResult[];
      if (mod !== undefined) {
        // An external module: run the suites whose exports it has (with the ABI's signatures), name the rest.
        if (values.build !== undefined) throw new UsageError("--module and --build exclude each other");
        const m = loadModule(mod);
        k = m.kernels;
        const suites = (values.suite as string[] | undefined) ?? [];
        const plan = planModule(m.signatures, k.realBytes, suites.length === 0 ? SPECS : selectSpecs(suites), ROUTINES, mod);
        for (const line of skippedLines(plan)) process.stdout.write(`${line}\n`);
        if (plan.run.length === 0) {
          process.stderr.write(`areal: ${mod} has none of the exports the selected suites need (docs/abi.md)\n`);
          return 1;
        }
        results = await runSuitesOn(plan.run, k, { module: mod }, workers);
      } else {
        k = loadKernels(values);
        const suites = (values.suite as string[] | undefined) ?? [];
        results = await runSuitesOn(suites.length === 0 ? SPECS : selectSpecs(suites), k, kernelSource(values), workers);
      }
      process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)));
      if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(checkJson(results, k), null, 2) + "\n");
      if (values.report !== undefined) process.stderr.write(`report: ${(await writeReport(values.report as string, results, k)).html}\n`);
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
    usage: "areal start [--report DIR]",
    options: ["verbose", "report"],
    async run(_pos, values) {
      const k = loadBuild("f64");
      const results = runChecks(k, []);
      process.stdout.write(formatCheckTable(results, k, Boolean(values.verbose)) + "\n");
      process.stdout.write(demoLines(k).join("\n") + "\n");
      const rep = await writeReport((values.report as string | undefined) ?? "out/report", results, k);
      process.stdout.write(`\nreport: ${rep.html} (open it in a browser; machine-readable: ${rep.json})\n`);
      return results.every((r) => r.pass) ? 0 : 1;
    },
  },
  propagate: {
    summary: "fixed-step propagation of a scenario: trajectory CSV with every step's invariants, CCSDS OEM",
    usage: "areal propagate --scenario FILE [--csv FILE] [--oem FILE] [--date YYYY-MM-DD] [--build f64|f32] [--module file.wasm]",
    options: ["scenario", "csv", "oem", "date", "build", "module"],
    run(_pos, values) {
      const file = values.scenario as string | undefined;
      if (file === undefined) throw new UsageError("propagate needs --scenario FILE");
      if (!existsSync(file)) throw new UsageError(`--scenario: no such file: ${file}`);
      const date = (values.date as string | undefined) ?? new Date().toISOString().slice(0, 10);
      if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) throw new UsageError(`--date: '${date}' is not YYYY-MM-DD`);
      const sc = parseScenario(readFileSync(file, "utf8"), file);
      const k = loadKernels(values);
      const base = basename(file).replace(/\.json$/i, "");
      const csvPath = (values.csv as string | undefined) ?? `${base}.csv`;
      const oemPath = (values.oem as string | undefined) ?? `${base}.oem`;
      const bar = process.stderr.isTTY ? progressBar(process.stderr, `${sc.spacecraft} ${sc.method}`) : undefined;
      const res = propagate(k, sc, { progress: bar, creationDate: `${date}T00:00:00`, source: k.label });
      if (bar && res.steps !== sc.steps) process.stderr.write("\n");
      writeAtomic(csvPath, res.csv);
      writeAtomic(oemPath, res.oem);
      const devs = Object.entries(res.maxDev).map(([n, d]) => `${n} ${d.toExponential(2)}`).join(", ");
      process.stderr.write(`propagate: ${res.steps} steps of ${sc.step} s, max deviations ${devs} -> ${csvPath}, ${oemPath}\n`);
      let code = 0;
      if (res.status !== 0) {
        process.stderr.write(`areal: integration stopped at step ${res.steps + 1}: ${statusWord(res.status)}\n`);
        code = 1;
      }
      for (const b of res.breaches) {
        process.stderr.write(`areal: budget broken: ${b.invariant} deviation above ${b.budget} first at step ${b.step} (t = ${b.t} s); largest ${b.max.toExponential(3)}\n`);
        code = 1;
      }
      return code;
    },
  },
  compare: {
    summary: "compare builds on the vector suites (bits, ULP), or two result CSVs of the same cases",
    usage: COMPARE_USAGE,
    options: ["builds", "suite", "tol", "json", "verbose"],
    run(pos, values) {
      return compareCommand(pos, values, (m) => new UsageError(m));
    },
  },
  sweep: {
    summary: "run a routine over a grid of inputs and summarise errors, iterations and statuses (JSON)",
    usage: "areal sweep <routine> --grid grid.json --out part.json [--shard k/n] [--workers N] [--build f64|f32|js|native|debug] [--module file.wasm]",
    options: ["grid", "shard", "out", "workers", "build", "module"],
    async run(pos, values) {
      const name = pos[0];
      if (name === undefined) throw new UsageError(`sweep needs a routine: ${ROUTINES.map((r) => r.name).join(", ")}`);
      if (!findRoutine(name)) throw new UsageError(`unknown routine '${name}' (known: ${ROUTINES.map((r) => r.name).join(", ")})`);
      const routine = sweepRoutine(name);
      const gridFile = values.grid as string | undefined;
      if (gridFile === undefined) throw new UsageError("sweep needs --grid FILE (harness/sweep.ts describes it)");
      if (!existsSync(gridFile)) throw new UsageError(`--grid: no such file: ${gridFile}`);
      const out = values.out as string | undefined;
      if (out === undefined) throw new UsageError("sweep needs --out FILE");
      const shard = values.shard === undefined ? { k: 1, n: 1 } : parseShard(values.shard as string);
      const workers = parseWorkers(values.workers as string | undefined);
      const g = parseGrid(readFileSync(gridFile, "utf8"), gridFile, routine);
      const k = loadKernels(values);
      const load = kernelSource(values);
      const bar = progressLine(progressWanted());
      const t0 = Date.now();
      let doc;
      try {
        doc = await runSweep(routine, g, { shard, workers, load, kernels: k, module: moduleIdentity(load, k.label), progress: (d, n) => bar.update(`${routine.name} ${shard.k}/${shard.n}: ${d} of ${n} cases (${((100 * d) / Math.max(1, n)).toFixed(1)}%)`) });
      } finally {
        bar.end();
      }
      writeAtomic(out, formatSweep(doc));
      const err = doc.error ? `, error max ${doc.error.max ?? "-"} mean ${doc.error.mean === null ? "-" : doc.error.mean.toPrecision(3)} ulp (estimate)` : "";
      const ref = doc.reference ? `, decimal.js checks ${doc.reference.checked} max ${doc.reference.max_ulp ?? "-"} ulp` : "";
      const st = Object.entries(doc.status).map(([w, c]) => `${c} ${w}`).join(", ");
      process.stderr.write(`sweep ${routine.name} shard ${shard.k}/${shard.n}: ${doc.cases} cases (${st || "none"})${err}${ref} in ${((Date.now() - t0) / 1000).toFixed(1)} s -> ${out}\n`);
      return 0;
    },
  },
  merge: {
    summary: "merge the shard files of a sweep into the file one unsharded run writes",
    usage: "areal merge part-*.json --out sweep.json",
    options: ["out"],
    run(pos, values) {
      if (pos.length === 0) throw new UsageError("merge needs the shard files (areal merge part-*.json --out sweep.json)");
      for (const p of pos) if (!existsSync(p)) throw new UsageError(`merge: no such file: ${p}`);
      const doc = mergeSweeps(pos.map((path) => ({ path, text: readFileSync(path, "utf8") })));
      const out = values.out as string | undefined;
      if (out === undefined) process.stdout.write(formatSweep(doc));
      else writeAtomic(out, formatSweep(doc));
      process.stderr.write(`merge: ${pos.length} shard file(s), ${doc.cases} cases${out === undefined ? "" : ` -> ${out}`}\n`);
      return 0;
    },
  },
  bench: {
    summary: "timings (WebAssembly and host JS), baselines, iteration and operation counts, cost model",
    usage: "areal bench [--json FILE] [--long] [--profile FILE]",
    options: ["json", "long", "profile"],
    async run(_pos, values) {
      const tty = process.stderr.isTTY;
      try {
        const r = await runBench(values.long ? LONG_SETTINGS : DEFAULT_SETTINGS, {
          log: (l) => void (tty ? process.stderr.write(`${l}\n`) : undefined),
          loadJs: () => loadNamedBuild("js"),
          profilePath: values.profile as string | undefined,
        });
        process.stdout.write(formatBench(r));
        if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(benchJson(r), null, 2) + "\n");
        return 0;
      } catch (err) {
        if (err instanceof ProfileError) throw new UsageError(err.message);
        throw err;
      }
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

/**
 * The HTML report writer (report/index.ts), loaded on first use: vega and vega-lite take about 0.3 s to load,
 * which every other command would pay at start (an eval of a few rows took 0.47 s in all).
 */
async function writeReport(...args: Parameters<typeof import("../report/index.js").writeReport>): ReturnType<typeof import("../report/index.js").writeReport> {
  const m = await import("../report/index.js");
  return m.writeReport(...args);
}

/** Which module workers load: the same as loadKernels. */
function kernelSource(values: Record<string, unknown>): KernelSource {
  const mod = values.module as string | undefined;
  return mod !== undefined ? { module: mod } : { build: (values.build as string | undefined) ?? "f64" };
}

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
    if (err instanceof WebAssembly.RuntimeError) {
      // A trap inside a kernel: the module is faulty (a kernel following docs/abi.md returns a status instead).
      process.stderr.write(`areal: the kernel module trapped (${err.message}); the module is faulty, nothing was written\n`);
      return 2;
    }
    const msg = (err as Error).message ?? String(err);
    process.stderr.write(`areal: ${msg}\n`);
    return 2;
  }
}
