/** `areal vectors`: regenerate the reference vector files. */
import { selectSpecs, writeSuite } from "../../verify/generate.js";
import { progressLine, progressWanted } from "../../core/progress.js";
import type { Command } from "../options.js";
import { dateOption } from "../shared.js";

export const vectorsCommand: Command = {
  summary: "regenerate the reference vector files with the high-precision references (slow: minutes)",
  options: ["suite", "date", "out-dir"],
  run(_pos, values) {
    const specs = selectSpecs((values.suite as string[] | undefined) ?? []);
    const date = dateOption(values);
    const dir = values["out-dir"] as string | undefined;
    for (const spec of specs) {
      const t0 = Date.now();
      const path = dir === undefined ? undefined : `${dir}/${spec.suite}.csv`;
      const bar = progressLine(progressWanted());
      let n;
      try {
        n = writeSuite(spec, date, (d, total) => bar.update(`${spec.suite}: ${d}/${total}`), path);
      } finally {
        bar.end();
      }
      process.stderr.write(`${spec.suite}: ${n} cases in ${((Date.now() - t0) / 1000).toFixed(1)} s\n`);
    }
    return 0;
  },
};
