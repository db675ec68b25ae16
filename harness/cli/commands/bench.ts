/** `areal bench`: timings and counts (never part of the tests). */
import { writeAtomic } from "../../core/atomic.js";
import { loadNamedBuild } from "../../module/builds.js";
import { runBench, formatBench, benchJson, DEFAULT_SETTINGS, LONG_SETTINGS } from "../../perf/bench.js";
import { ProfileError } from "../../perf/opcount.js";
import { UsageError, type Command } from "../options.js";

export const benchCommand: Command = {
  summary: "timings (WebAssembly and host JS), baselines, iteration and operation counts, cost model",
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
};
