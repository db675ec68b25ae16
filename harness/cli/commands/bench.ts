/** `areal bench`: timings and counts (never part of the tests). */
import { writeAtomic } from "../../core/atomic.js";
import { loadNamedBuild } from "../../module/builds.js";
import { readFileSync } from "node:fs";
import { parseJsonText } from "../../core/json.js";
import { runBench, formatBench, benchJson, DEFAULT_SETTINGS, LONG_SETTINGS, EXAMPLE_PROFILE } from "../../perf/bench.js";
import { ProfileError, readProfile } from "../../perf/opcount.js";
import { predictFromCounts, formatPredictions, type CountPrediction } from "../../perf/count-model.js";
import { UsageError, type Command } from "../options.js";

export const benchCommand: Command = {
  summary: "timings (WebAssembly and host JS), baselines, iteration and operation counts, cost model",
  options: ["json", "long", "profile", "counts-json"],
  async run(_pos, values) {
    const tty = process.stderr.isTTY;
    try {
      const fromCounts = countPredictions(values["counts-json"] as string | undefined, values.profile as string | undefined); // fail before the long part
      const r = await runBench(values.long ? LONG_SETTINGS : DEFAULT_SETTINGS, {
        log: (l) => void (tty ? process.stderr.write(`${l}\n`) : undefined),
        loadJs: () => loadNamedBuild("js"),
        profilePath: values.profile as string | undefined,
      });
      process.stdout.write(formatBench(r));
      if (fromCounts) process.stdout.write("\n" + fromCounts.text);
      if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify({ ...benchJson(r), ...(fromCounts ? { from_counts: fromCounts.rows } : {}) }, null, 2) + "\n");
      return 0;
    } catch (err) {
      if (err instanceof ProfileError) throw new UsageError(err.message);
      throw err;
    }
  },
};

/** Predictions from an `areal count --json` file priced by the profile's cycles per instruction class. */
function countPredictions(file: string | undefined, profilePath: string | undefined): { rows: CountPrediction[]; text: string } | undefined {
  if (file === undefined) return undefined;
  const profile = readProfile(profilePath ?? EXAMPLE_PROFILE);
  let counts: unknown;
  try {
    counts = parseJsonText(readFileSync(file, "utf8"), file, (m) => new UsageError(`--counts-json: ${m}`));
  } catch (err) {
    if (err instanceof UsageError) throw err;
    throw new UsageError(`--counts-json: ${file}: ${(err as Error).message}`); // unreadable file
  }
  try {
    const rows = predictFromCounts(counts, profile, file);
    return { rows, text: formatPredictions(rows, profile) };
  } catch (err) {
    throw new UsageError(`--counts-json: ${(err as Error).message}`);
  }
}
