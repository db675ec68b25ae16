/** `areal eval <routine>`: run a routine over a CSV of inputs. */
import { existsSync } from "node:fs";
import { evaluateFile, BUDGET_BROKEN, LOST_IN_F32 } from "../../run/evaluate.js";
import { parseWorkers } from "../../core/pool.js";
import { progressLine, progressWanted } from "../../core/progress.js";
import { UsageError, type Command } from "../options.js";
import { kernelSource, loadKernels, routineArg } from "../shared.js";

export const evalCommand: Command = {
  summary: "run a routine over a CSV of inputs; one output row per input row, with its status (exit 1 when a row of integrate broke an invariant budget, or an input lost its meaning in single precision)",
  args: "<routine>",
  options: ["input", "out", "shard", "build", "module", "library", "call-limit", "workers"],
  required: ["input"],
  async run(pos, values) {
    const routine = routineArg("eval", pos[0]);
    const input = values.input as string | undefined;
    if (input === undefined) throw new UsageError("eval needs --input FILE");
    if (!existsSync(input)) throw new UsageError(`--input: no such file: ${input}`);
    // A library runs in one child process: no worker threads.
    const workers = values.library !== undefined ? 1 : parseWorkers(values.workers as string | undefined);
    // run/sweep.js (and the decimal references it imports) is loaded only for --shard.
    const shard = values.shard === undefined ? undefined : (await import("../../run/sweep.js")).parseShard(values.shard as string);
    const k = loadKernels(values);
    const out = values.out as string | undefined;
    // Streamed in chunks through the workers; the output appears whole at the end, or not at all.
    const bar = progressLine(progressWanted());
    const mb = (b: number): string => (b / 1048576).toFixed(0);
    let res;
    try {
      res = await evaluateFile(routine, input, input, { workers, load: kernelSource(values), kernels: k, out, shard, progress: (d, n) => bar.update(`${routine.name}: ${mb(d)} of ${mb(n)} MB read`) });
    } finally {
      bar.end();
    }
    const broken = res.statuses[BUDGET_BROKEN] ?? 0;
    const lost = res.statuses[LOST_IN_F32] ?? 0;
    const counts = Object.entries(res.statuses).filter(([w]) => w !== BUDGET_BROKEN && !w.startsWith(LOST_IN_F32)).map(([w, n]) => `${n} ${w}`).join(", ");
    const budgets = broken > 0 ? `; an invariant budget broken on ${broken} of them (the *_step columns name the first step over it)` : "";
    const kinds = Object.entries(res.statuses).filter(([w]) => w.startsWith(`${LOST_IN_F32}:`)).map(([w, n]) => `${w.slice(LOST_IN_F32.length + 1)} (${n})`);
    const single = lost > 0 ? `; ${lost} row${lost === 1 ? "" : "s"} lost meaning in single precision: ${kinds.join(", ")}` : "";
    if (out !== undefined || broken > 0 || lost > 0) process.stderr.write(`${routine.name}: ${res.rows} rows (${counts || "none"}${budgets}${single})${out !== undefined ? ` -> ${out}` : ""}\n`);
    return broken > 0 || lost > 0 ? 1 : 0;
  },
};
