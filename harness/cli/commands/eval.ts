/** `areal eval <routine>`: run a routine over a CSV of inputs. */
import { existsSync } from "node:fs";
import { evaluateFile } from "../../run/evaluate.js";
import { parseWorkers } from "../../core/pool.js";
import { progressLine, progressWanted } from "../../core/progress.js";
import { UsageError, type Command } from "../options.js";
import { kernelSource, loadKernels, routineArg } from "../shared.js";

export const evalCommand: Command = {
  summary: "run a routine over a CSV of inputs; one output row per input row, with its status",
  args: "<routine>",
  options: ["input", "out", "build", "module", "workers"],
  required: ["input"],
  async run(pos, values) {
    const routine = routineArg("eval", pos[0]);
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
};
