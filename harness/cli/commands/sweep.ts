/** `areal sweep <routine>` and `areal merge`: grids of inputs, sharded for job arrays. */
import { existsSync, readFileSync } from "node:fs";
import { writeAtomic } from "../../core/atomic.js";
import { parseWorkers } from "../../core/pool.js";
import { progressLine, progressWanted } from "../../core/progress.js";
import { parseGrid, parseShard, runSweep, formatSweep, moduleIdentity, sweepRoutine } from "../../run/sweep.js";
import { mergeSweeps } from "../../run/merge.js";
import { UsageError, type Command } from "../options.js";
import { kernelSource, loadKernels, routineArg } from "../shared.js";

export const sweepCommand: Command = {
  summary: "run a routine over a grid of inputs and summarise errors, iterations and statuses (JSON)",
  args: "<routine>",
  options: ["grid", "out", "shard", "workers", "build", "module", "call-limit"],
  required: ["grid", "out"],
  async run(pos, values) {
    const routine = sweepRoutine(routineArg("sweep", pos[0]).name);
    const gridFile = values.grid as string | undefined;
    if (gridFile === undefined) throw new UsageError("sweep needs --grid FILE (docs/sweeps.md describes it)");
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
};

export const mergeCommand: Command = {
  summary: "merge the shard files of a sweep into the file one unsharded run writes",
  args: "part-*.json",
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
};
