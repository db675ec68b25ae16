// Measures what `--workers 2` gains over `--workers 1` on this machine, for `areal eval` on a large generated
// input and for `areal sweep`, and what two threads can gain at most for the same work (the ceiling: the
// per-chunk work of each command run in one thread, then in two independent threads each doing the same
// amount, in one process, with no reading, writing or messages between them).
//
//   npm run bench:workers -- [--rows 4000000] [--digits 17] [--grid 3000] [--reps 5] [--dir DIR] [--json out.json] [--eval-only]
//
// --digits N writes the input's numbers with N significant digits (toPrecision) instead of their shortest form.
// Each command's CPU time (user + system, all its threads: process.cpuUsage() at its exit) is shown beside its
// wall time, as the machine may be shared: a CPU time that stays put while the wall time moves is the load of
// other processes.
//
// Runs are interleaved (1 worker, 2 workers, 1, 2, ...) so that a change in the machine's load hits both
// alike; each ratio is the median of the per-repetition ratios. The outputs of 1 and 2 workers are compared
// byte for byte. The input is written to a temporary directory (under --dir, default the system's) and
// removed at the end. This is a measurement, not a test: nothing here fails on a low ratio.
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync, writeFileSync, writeSync } from "node:fs";
import { availableParallelism, cpus, tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { parseArgs } from "node:util";
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const BIN = join(ROOT, "bin", "areal.mjs");
const dist = (p) => new URL(`../dist/harness/${p}`, import.meta.url).href;

// ---- the ceiling's work, run in this thread or in a worker thread ----------------------------------------

/** One unit of ceiling work: evaluate the input's rows in 64 KB chunks, or sweep a range of cases. */
async function ceilingWork({ kind, input, grid, first, end }) {
  const { loadBuild } = await import(dist("module/load.js"));
  const { findRoutine } = await import(dist("module/routines.js"));
  const k = loadBuild("f64");
  if (kind === "eval") {
    const { prepareEval, evaluateBytes } = await import(dist("run/evaluate.js"));
    const { CHUNK_BYTES } = await import(dist("core/stream.js"));
    const r = findRoutine("kepler-elliptic");
    const buf = readFileSync(input);
    const plan = prepareEval(r, ["e", "M"], "input", k);
    let rows = 0;
    let bytes = 0;
    for (let pos = buf.indexOf(10) + 1; pos < buf.length; ) {
      let end = buf.lastIndexOf(10, Math.min(buf.length, pos + CHUNK_BYTES) - 1) + 1;
      if (end <= pos) end = buf.length;
      const res = evaluateBytes(r, plan, 2, "input", k, buf.subarray(pos, end), 1); // eval's path (the codec)
      bytes += res.bytes.length;
      rows += res.rows;
      pos = end;
    }
    if (bytes === 0 && rows > 0) throw new Error("no output");
    return rows;
  }
  const { parseGrid, sweepRange, SWEEP_CHUNK } = await import(dist("run/sweep.js"));
  const r = findRoutine("kepler-elliptic");
  const g = parseGrid(readFileSync(grid, "utf8"), "grid", r);
  for (let a = first; a < end; a += SWEEP_CHUNK) sweepRange(r, g, k, a, Math.min(end, a + SWEEP_CHUNK));
  return end - first;
}

/** Seconds for `threads` threads (0: this thread) each doing `work` once. */
async function ceilingRun(work, threads) {
  const t = process.hrtime.bigint();
  if (threads === 0) await ceilingWork(work);
  else {
    await Promise.all(
      Array.from({ length: threads }, () => new Promise((resolve, reject) => {
        const w = new Worker(fileURLToPath(import.meta.url), { workerData: work });
        w.once("message", () => w.terminate().then(resolve));
        w.once("error", reject);
      })),
    );
  }
  return Number(process.hrtime.bigint() - t) / 1e9;
}

// ---- the commands ----------------------------------------------------------------------------------------

/** A preloaded script that writes the command's CPU time (all threads) to stderr at exit. */
const CPU_HOOK = "process.on('exit', () => { const u = process.cpuUsage(); process.stderr.write(`\\nareal-cpu ${(u.user + u.system) / 1e6}\\n`); });";

/** Wall seconds of one command; its CPU seconds go to `cpu`. */
function timed(args, cpu, hook) {
  const t = process.hrtime.bigint();
  const r = spawnSync(process.execPath, ["--require", hook, BIN, ...args], { encoding: "utf8", env: { ...process.env, CI: "1" } });
  const s = Number(process.hrtime.bigint() - t) / 1e9;
  if (r.status !== 0) throw new Error(`areal ${args.join(" ")} exited ${r.status}: ${r.stderr.trim()}`);
  const m = /areal-cpu ([\d.]+)/.exec(r.stderr);
  cpu.push(m ? Number(m[1]) : NaN);
  return s;
}

const sha = (path) => createHash("sha256").update(readFileSync(path)).digest("hex");
const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

async function main() {
  const { values } = parseArgs({
    options: { rows: { type: "string" }, digits: { type: "string" }, grid: { type: "string" }, reps: { type: "string" }, dir: { type: "string" }, json: { type: "string" }, "eval-only": { type: "boolean" } },
  });
  const whole = (v, name, def) => {
    if (v === undefined) return def;
    if (!/^\d+$/.test(v) || Number(v) < 1) throw new RangeError(`--${name}: '${v}' is not a positive whole number`);
    return Number(v);
  };
  const rows = whole(values.rows, "rows", 4_000_000);
  const side = whole(values.grid, "grid", 3000);
  const reps = whole(values.reps, "reps", 5);
  const digits = values.digits === undefined ? undefined : whole(values.digits, "digits", 17);
  if (digits !== undefined && digits > 21) throw new RangeError(`--digits: '${digits}' is more than 21`);
  const num = digits === undefined ? (x) => String(x) : (x) => x.toPrecision(digits);
  const dir = mkdtempSync(join(values.dir ?? tmpdir(), "areal-speedup-"));
  try {
    // Input: seeded (e, M) rows across the elliptic domain, as `areal eval kepler-elliptic` takes them.
    const input = join(dir, "cases.csv");
    const { Rng } = await import(dist("core/rng.js"));
    const rng = new Rng(20261202);
    const fd = openSync(input, "w");
    writeSync(fd, "e,M\n");
    for (let done = 0; done < rows; ) {
      const n = Math.min(100_000, rows - done);
      let text = "";
      for (let i = 0; i < n; i++) text += `${num(rng.uniform() * 0.999)},${num(rng.between(-Math.PI, Math.PI))}\n`;
      writeSync(fd, text);
      done += n;
    }
    closeSync(fd);
    const hook = join(dir, "cpu-hook.cjs");
    writeFileSync(hook, CPU_HOOK + "\n");
    const grid = join(dir, "grid.json");
    writeFileSync(grid, JSON.stringify({ inputs: { e: { from: 0, to: 0.99999999, count: side, spacing: "log-near-1" }, M: { from: 1e-12, to: 3.14159, count: side, spacing: "log" } }, checks: 16, worst: 8 }));
    const cases = side * side;
    console.log(`machine: ${availableParallelism()} cores (${cpus()[0]?.model ?? "unknown"}), node ${process.version}`);
    console.log(`eval: kepler-elliptic on ${rows.toLocaleString("en-US")} rows (${digits === undefined ? "shortest form" : `${digits} significant digits`}); sweep: kepler-elliptic on a ${side} x ${side} grid (${cases.toLocaleString("en-US")} cases); ${reps} interleaved repetitions\n`);

    const t = { eval1: [], eval2: [], sweep1: [], sweep2: [], ceilEval1: [], ceilEval2: [], ceilSweep1: [], ceilSweep2: [] };
    const cpu = { eval1: [], eval2: [], sweep1: [], sweep2: [] };
    const half = Math.floor(cases / 2);
    for (let r = 0; r < reps; r++) {
      for (const w of [1, 2]) t[`eval${w}`].push(timed(["eval", "kepler-elliptic", "-i", input, "-o", join(dir, `out-${w}.csv`), "--workers", String(w)], cpu[`eval${w}`], hook));
      const sweeps = !values["eval-only"];
      if (sweeps) for (const w of [1, 2]) t[`sweep${w}`].push(timed(["sweep", "kepler-elliptic", "--grid", grid, "--out", join(dir, `sweep-${w}.json`), "--workers", String(w)], cpu[`sweep${w}`], hook));
      // Ceiling: one unit of work in one worker thread, then two units at once in two threads.
      t.ceilEval1.push(await ceilingRun({ kind: "eval", input }, 1));
      t.ceilEval2.push(await ceilingRun({ kind: "eval", input }, 2));
      if (sweeps) {
        t.ceilSweep1.push(await ceilingRun({ kind: "sweep", grid, first: 0, end: half }, 1));
        t.ceilSweep2.push(await ceilingRun({ kind: "sweep", grid, first: 0, end: half }, 2));
      }
      process.stderr.write(`repetition ${r + 1} of ${reps} done\n`);
    }
    const sameEval = sha(join(dir, "out-1.csv")) === sha(join(dir, "out-2.csv"));
    const sameSweep = values["eval-only"] ? true : sha(join(dir, "sweep-1.json")) === sha(join(dir, "sweep-2.json"));
    const ratio = (a, b, k = 1) => (a.length === 0 ? NaN : median(a.map((x, i) => (k * x) / b[i])));
    const result = {
      machine: { cores: availableParallelism(), cpu: cpus()[0]?.model ?? null, node: process.version },
      rows, digits: digits ?? null, cases, reps, seconds: t, cpuSeconds: cpu,
      eval: { workers1: median(t.eval1), workers2: median(t.eval2), speedup: ratio(t.eval1, t.eval2), sameBytes: sameEval },
      sweep: { workers1: median(t.sweep1), workers2: median(t.sweep2), speedup: ratio(t.sweep1, t.sweep2), sameBytes: sameSweep },
      // Two threads doing twice the work of one in the time they take: the most two workers can gain.
      ceiling: { eval: ratio(t.ceilEval1, t.ceilEval2, 2), sweep: ratio(t.ceilSweep1, t.ceilSweep2, 2) },
    };
    const f = (x) => x.toFixed(2);
    console.log("");
    console.log("| command | 1 worker (s) | 2 workers (s) | speed-up | CPU 1 / 2 workers (s) | same bytes | ceiling of 2 threads |");
    console.log("|---|---|---|---|---|---|---|");
    console.log(`| eval | ${f(result.eval.workers1)} | ${f(result.eval.workers2)} | ${f(result.eval.speedup)}x | ${f(median(cpu.eval1))} / ${f(median(cpu.eval2))} | ${sameEval ? "yes" : "NO"} | ${f(result.ceiling.eval)}x |`);
    for (let r = 0; r < reps; r++) console.log(`|   repetition ${r + 1} | ${f(t.eval1[r])} | ${f(t.eval2[r])} | ${f(t.eval1[r] / t.eval2[r])}x | ${f(cpu.eval1[r])} / ${f(cpu.eval2[r])} | | ${f((2 * t.ceilEval1[r]) / t.ceilEval2[r])}x |`);
    if (!values["eval-only"]) console.log(`| sweep | ${f(result.sweep.workers1)} | ${f(result.sweep.workers2)} | ${f(result.sweep.speedup)}x | ${f(median(cpu.sweep1))} / ${f(median(cpu.sweep2))} | ${sameSweep ? "yes" : "NO"} | ${f(result.ceiling.sweep)}x |`);
    console.log("\nmedians of the repetitions; CPU is user + system of all the command's threads; the ceiling is two threads doing twice one thread's work, without the command's reading, writing and messages");
    if (values.json) writeFileSync(values.json, JSON.stringify(result, null, 2) + "\n");
    if (!sameEval || !sameSweep) process.exitCode = 1;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (!isMainThread) {
  ceilingWork(workerData).then((n) => parentPort.postMessage(n));
} else {
  await main();
}
