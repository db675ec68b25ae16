/** `areal sweep <routine>` and `areal merge`: grids of inputs, sharded for job arrays. */
import { existsSync, readFileSync } from "node:fs";
import { writeAtomic } from "../../core/atomic.js";
import { parseWorkers } from "../../core/pool.js";
import { progressLine, progressWanted } from "../../core/progress.js";
import { parseGrid, parseShard, runSweep, formatSweep, moduleIdentity, sweepRoutine, gridHash, shardRange, totalCases, type Grid, type ModuleId } from "../../run/sweep.js";
import { mergeSweeps, readSweepDoc } from "../../run/merge.js";
import { UsageError, type Command } from "../options.js";
import { kernelSource, loadKernels, routineArg } from "../shared.js";

export const sweepCommand: Command = {
  summary: "run a routine over a grid of inputs and summarise errors, iterations and statuses (JSON)",
  args: "<routine>",
  options: ["grid", "out", "shard", "resume", "workers", "build", "module"],
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
    if (values.resume && existsSync(out)) {
      const done = finishedShard(out, routine.name, g, moduleIdentity(load, k.label), shard);
      if (done) {
        process.stderr.write(`sweep ${routine.name} shard ${shard.k}/${shard.n}: ${out} already holds it (${done} cases); kept\n`);
        return 0;
      }
    }
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

/**
 * The case count of `path` when it is a whole, readable part of exactly this sweep (routine, grid, module and
 * shard all the same), else undefined (the shard runs again and the file is replaced whole).
 */
function finishedShard(path: string, routine: string, g: Grid, module: ModuleId, shard: { k: number; n: number }): number | undefined {
  try {
    const d = readSweepDoc({ path, text: readFileSync(path, "utf8") });
    const want = shardRange(totalCases(g), shard.k, shard.n);
    const same = d.routine === routine && d.grid_sha256 === gridHash(g) && d.module.sha256 === module.sha256 &&
      d.shard.k === shard.k && d.shard.n === shard.n && d.shard.first === want.first && d.shard.end === want.end && d.cases === want.end - want.first;
    return same ? d.cases : undefined;
  } catch {
    return undefined; // unreadable or not a sweep file: run the shard again
  }
}

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
