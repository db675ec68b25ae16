// The long fuzzing run (`npm run fuzz`): every kernel export of the release, single-precision and debug modules,
// 100,000 generated cases each by default, with the properties of harness/fuzz-props.ts (the seeded smaller run
// is tests/fuzz-kernels.test.ts). Each kernel runs in a worker thread; before every call the worker publishes the
// call's arguments to shared memory, and a watchdog ends a worker whose call has not returned within
// --hang-seconds, printing those arguments: that is the "no hang" check (every loop in a kernel is bounded).
// Then the hostile phase: every module of tests/fixtures/hostile/modules.ts (loops forever, a start function
// that loops forever, grows its memory, ok with NaN or Infinity, status 99, a bad iteration count, a wrong
// signature) through `areal eval --module` with a short --call-limit, and generated hostile numbers (cells
// that underflow or overflow on parsing, long digit strings, signed zeros, subnormals, inf/nan words) through
// `areal eval`: no run may hang, pass a violation with exit 0, or leave a temporary file.
// Then, when `areal eval` streams its input (harness/stream.ts), a 1 GB input is run through it and the peak
// memory (maximum resident set size) measured.
//
//   node scripts/fuzz.mjs [--runs N] [--seed S] [--builds f64,f32,debug] [--only export,...] [--hang-seconds 30]
//                         [--big-mb 1024 | --no-big] [--no-hostile]
// Runs from dist/ (npm run fuzz builds first). Exit 1 on any failure or hang.
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { readFileSync, existsSync, mkdtempSync, rmSync, createWriteStream, statSync, openSync, readSync, closeSync, writeFileSync, readdirSync } from "node:fs";
import { spawnSync } from "node:child_process";
import { availableParallelism, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { parseArgs } from "node:util";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const dist = (p) => pathToFileURL(join(root, "dist", "harness", p)).href;
const support = (p) => pathToFileURL(join(root, "dist", "tests", "support", p)).href;

if (!isMainThread) {
  const { build, exportName, runs, seed, sab } = workerData;
  const { fuzzTargets, fuzzTarget } = await import(support("fuzz-props.js"));
  const { loadBuild } = await import(dist("module/load.js"));
  const { BUILD_FILES } = await import(dist("core/paths.js"));
  const k = loadBuild(build);
  const targets = fuzzTargets(readFileSync(BUILD_FILES[build]), build);
  const watch = { counters: new Int32Array(sab, 0, 2), args: new Float64Array(sab, 8, 32) };
  const t0 = performance.now();
  const r = fuzzTarget(k, targets, exportName, { numRuns: runs, seed, math: build === "f64", watch });
  parentPort.postMessage({ ...r, seconds: (performance.now() - t0) / 1000 });
} else {
  await main();
}

async function main() {
  const { values } = parseArgs({
    options: {
      runs: { type: "string", default: "100000" },
      seed: { type: "string" },
      builds: { type: "string", default: "f64,f32,debug" },
      only: { type: "string" },
      "hang-seconds": { type: "string", default: "30" },
      "big-mb": { type: "string", default: "1024" },
      "no-big": { type: "boolean", default: false },
      "no-hostile": { type: "boolean", default: false },
    },
  });
  const runs = Number(values.runs);
  const seed = values.seed === undefined ? Date.now() % 2 ** 31 : Number(values.seed);
  const hangMs = Number(values["hang-seconds"]) * 1000;
  if (!Number.isInteger(runs) || runs < 1) throw new Error(`--runs: '${values.runs}' is not a positive integer`);
  if (!Number.isInteger(seed)) throw new Error(`--seed: '${values.seed}' is not an integer`);
  const { fuzzTargets, KNOWN_DEFECTS } = await import(support("fuzz-props.js"));
  const { BUILD_FILES } = await import(dist("core/paths.js"));
  const only = values.only ? new Set(values.only.split(",")) : undefined;
  const jobs = [];
  for (const build of values.builds.split(",")) {
    if (!(build in BUILD_FILES)) throw new Error(`--builds: unknown build '${build}'`);
    for (const t of fuzzTargets(readFileSync(BUILD_FILES[build]), build)) {
      if (!only || only.has(t.exportName)) jobs.push({ build, exportName: t.exportName, params: t.params.map((p) => p.name) });
    }
  }
  process.stdout.write(`areal fuzz: ${jobs.length} kernel/build pairs, ${runs} cases each, seed ${seed} (repeat with --seed ${seed})\n`);
  for (const d of KNOWN_DEFECTS) process.stdout.write(`  known defect, inputs skipped: ${d.exportName}: ${d.note}\n`);
  const results = [];
  let next = 0;
  const lanes = Math.max(1, Math.min(2, availableParallelism()));
  await Promise.all(Array.from({ length: lanes }, async () => {
    while (next < jobs.length) {
      const job = jobs[next++];
      const r = await runJob(job, runs, seed, hangMs);
      results.push(r);
      const st = Object.entries(r.statuses ?? {}).sort((a, b) => b[1] - a[1]).map(([w, n]) => `${w} ${n}`).join(", ");
      const verdict = r.hang ? "HANG" : r.failure ? "FAIL" : r.error ? "ERROR" : "ok";
      process.stdout.write(`${verdict.padEnd(5)} ${job.build.padEnd(6)} ${job.exportName.padEnd(18)} ${String(r.runs ?? 0).padStart(7)} calls, ${String(r.checked ?? 0).padStart(6)} with math properties, ${(r.seconds ?? 0).toFixed(1).padStart(6)} s  [${st}]\n`);
      if (r.failure) process.stdout.write(`${r.failure}\n`);
      if (r.hang) process.stdout.write(`  ${r.hang}\n`);
      if (r.error) process.stdout.write(`  ${r.error}\n`);
    }
  }));
  const bad = results.filter((r) => r.failure || r.hang || r.error);
  let bigOk = true;
  if (!values["no-hostile"]) bigOk = (await hostile(seed)) && bigOk;
  if (!values["no-big"]) bigOk = await bigInput(Number(values["big-mb"]));
  process.stdout.write(`\n${results.length - bad.length} of ${results.length} kernel/build pairs passed ${runs} cases (seed ${seed}).\n`);
  process.exitCode = bad.length === 0 && bigOk ? 0 : 1;
}

function runJob(job, runs, seed, hangMs) {
  return new Promise((resolve) => {
    const sab = new SharedArrayBuffer(8 + 8 * 32);
    const counters = new Int32Array(sab, 0, 2);
    const args = new Float64Array(sab, 8, 32);
    const w = new Worker(fileURLToPath(import.meta.url), { workerData: { build: job.build, exportName: job.exportName, runs, seed, sab } });
    let lastDone = -1;
    let since = Date.now();
    let settled = false;
    const finish = (r) => {
      if (settled) return;
      settled = true;
      clearInterval(timer);
      resolve(r);
    };
    const timer = setInterval(() => {
      const started = Atomics.load(counters, 0);
      const done = Atomics.load(counters, 1);
      if (done !== lastDone) {
        lastDone = done;
        since = Date.now();
        return;
      }
      if (started > done && Date.now() - since > hangMs) {
        const a = job.params.map((p, i) => `${p}=${args[i]}`).join(", ");
        void w.terminate();
        finish({ hang: `${job.build}: ${job.exportName}(${a}) did not return within ${hangMs / 1000} s`, runs: done });
      }
    }, 1000);
    w.on("message", (r) => finish(r));
    w.on("error", (err) => finish({ error: String(err?.stack ?? err) }));
    w.on("exit", (code) => finish({ error: `worker exited with code ${code} before reporting` }));
  });
}

/**
 * The very large input: a CSV of `mb` megabytes through `areal eval kepler-elliptic`, streamed;
 * reports the child's peak resident memory (getrusage maxRSS, printed by the child at exit) and checks the
 * output has one row per input row. Skipped, with a line saying so, while eval does not stream.
 */
async function bigInput(mb) {
  /** Peak memory a streamed `areal eval` may use on the large input, whatever its size. */
  const BIG_MAX_RSS_MB = 512;
  if (!existsSync(join(root, "dist", "harness", "core", "stream.js"))) {
    process.stdout.write("\nlarge input: skipped, `areal eval` does not stream yet (no harness/stream.ts)\n");
    return true;
  }
  const dir = mkdtempSync(join(tmpdir(), "areal-big-"));
  try {
    const input = join(dir, "big.csv");
    const out = join(dir, "big-out.csv");
    const t0 = Date.now();
    const rows = await writeBig(input, mb * 2 ** 20);
    const t1 = Date.now();
    const probe = "data:text/javascript,process.on('exit',()=>process.stderr.write('\\nareal-maxrss-kb '+process.resourceUsage().maxRSS+'\\n'))";
    const r = spawnSync(process.execPath, ["--import", probe, join(root, "bin", "areal.mjs"), "eval", "kepler-elliptic", "--input", input, "--out", out], { stdio: ["ignore", "ignore", "pipe"], encoding: "utf8", maxBuffer: 1 << 26 });
    const t2 = Date.now();
    const m = /areal-maxrss-kb (\d+)/.exec(r.stderr ?? "");
    const rssMb = m ? Number(m[1]) / 1024 : NaN;
    const outRows = existsSync(out) ? countLines(out) - 1 : -1;
    process.stdout.write(`\nlarge input: ${(statSync(input).size / 2 ** 20).toFixed(0)} MB, ${rows} rows written in ${((t1 - t0) / 1000).toFixed(1)} s; ` +
      `areal eval kepler-elliptic: exit ${r.status}, ${((t2 - t1) / 1000).toFixed(1)} s, peak resident memory ${rssMb.toFixed(0)} MB, ${outRows} output rows\n`);
    const ok = r.status === 0 && outRows === rows && rssMb <= BIG_MAX_RSS_MB;
    if (!ok) process.stdout.write(`large input: FAIL (want exit 0, ${rows} rows, at most ${BIG_MAX_RSS_MB} MB)\n${(r.stderr ?? "").slice(-2000)}\n`);
    return ok;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * The hostile phase: each hostile module through `areal eval --module` (the expected outcome beside it), then
 * `count` generated rows of hostile numbers. A run that hangs (no exit within 60 s), exits 0 where the ABI or
 * the input was broken, or leaves a temporary file fails.
 */
async function hostile(seed, count = 2000) {
  const { HOSTILE } = await import(pathToFileURL(join(root, "dist", "tests", "fixtures", "hostile", "modules.js")).href);
  const dir = mkdtempSync(join(tmpdir(), "areal-hostile-fuzz-"));
  let ok = true;
  const run = (args) => spawnSync(process.execPath, [join(root, "bin", "areal.mjs"), ...args], { cwd: dir, encoding: "utf8", timeout: 60_000 });
  const verdict = (name, good, r, want) => {
    const leftovers = readdirSync(dir).filter((f) => f.endsWith(".tmp"));
    const pass = good && r.signal === null && leftovers.length === 0;
    ok &&= pass;
    process.stdout.write(`${(pass ? "ok" : "FAIL").padEnd(5)} hostile ${name.padEnd(30)} exit ${r.status ?? r.signal} (want ${want})${pass ? "" : `\n  ${(r.stderr ?? "").trim().split("\n").pop()}`}\n`);
  };
  try {
    const input = join(dir, "cases.csv");
    writeFileSync(input, "e,M\n0.1,1\n0.5,2\n");
    process.stdout.write("\n");
    for (const [name, h] of Object.entries(HOSTILE)) {
      const m = join(dir, `${name}.wasm`);
      writeFileSync(m, h.bytes());
      const limit = name.includes("forever") ? ["--call-limit", "0.5"] : [];
      const r = run(["eval", "kepler-elliptic", "-i", input, "-o", join(dir, "out.csv"), "--module", m, ...limit]);
      // Two of them keep the ABI (a grown memory, a slow but correct call): their outputs must be read, not refused.
      if (name === "grows-memory") verdict(name, r.status === 0 && readFileSync(join(dir, "out.csv"), "utf8").includes("0.1,1,0.5,2,ok"), r, "0, outputs read");
      else if (name === "slow") verdict(name, r.status === 0 && readFileSync(join(dir, "out.csv"), "utf8").includes("0.1,1,0.5,1,ok"), r, "0, outputs read");
      else verdict(name, r.status === 2 && !existsSync(join(dir, "out.csv")), r, "2, no output");
      rmSync(join(dir, "out.csv"), { force: true });
    }
    // Hostile numbers: each row has one generated cell; a cell that loses its meaning must be an input error.
    let x = seed >>> 0 || 1;
    const rnd = () => ((x = (Math.imul(x, 1103515245) + 12345) >>> 0) / 2 ** 32);
    const cells = [];
    for (let i = 0; i < count; i++) {
      const exp = Math.floor(rnd() * 1400) - 700;
      const forms = [`${(rnd() * 10).toFixed(3)}e${exp}`, `-0`, `0e${exp}`, `${"9".repeat(1 + Math.floor(rnd() * 400))}`, `0.${"0".repeat(Math.floor(rnd() * 400))}1`, "inf", "-nan", "5e-324", "2.4703282292062328e-324"];
      cells.push(forms[Math.floor(rnd() * forms.length)]);
    }
    let lost = 0;
    for (const c of cells) {
      const v = Number(c === "inf" ? "Infinity" : c === "-nan" ? "NaN" : c);
      const losing = (v === 0 && /[1-9]/.test(c.split(/e/i)[0])) || (!Number.isFinite(v) && /^[+-]?\d/.test(c));
      if (!losing) continue;
      lost++;
      writeFileSync(input, `e,M\n0.1,1\n0.1,${c}\n`);
      const r = run(["eval", "kepler-elliptic", "-i", input]);
      if (r.status !== 2 || !/cases\.csv:3: column 'M' .*(underflows|overflows).*\(column 2\)/.test(r.stderr)) {
        verdict(`number ${c.slice(0, 24)}`, false, r, "2, line and column named");
        break;
      }
    }
    writeFileSync(input, ["e,M", ...cells.map((c) => `0.1,${c}`)].join("\n") + "\n");
    const r = run(["eval", "kepler-elliptic", "-i", input, "-o", join(dir, "out.csv")]);
    verdict(`${count} generated numbers (${lost} lose meaning)`, lost > 0 ? r.status === 2 : r.status === 0, r, lost > 0 ? "2" : "0");
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return ok;
}

/** Write a CSV of about `bytes` bytes (e, M rows from a fixed linear congruential sequence); returns the rows. */
async function writeBig(path, bytes) {
  const ws = createWriteStream(path);
  let written = 0;
  let rows = 0;
  let x = 12345;
  const rnd = () => ((x = (Math.imul(x, 1103515245) + 12345) >>> 0) / 2 ** 32);
  const header = "e,M\n";
  ws.write(header);
  written += header.length;
  while (written < bytes) {
    const lines = [];
    for (let i = 0; i < 4096; i++) lines.push(`${rnd()},${(rnd() - 0.5) * 20}`);
    const chunk = lines.join("\n") + "\n";
    rows += 4096;
    written += chunk.length;
    if (!ws.write(chunk)) await new Promise((res) => ws.once("drain", res));
  }
  await new Promise((res, rej) => ws.end((err) => (err ? rej(err) : res())));
  return rows;
}

/** Number of newline bytes in a file, read in blocks. */
function countLines(path) {
  const fd = openSync(path, "r");
  const buf = Buffer.alloc(1 << 20);
  let n = 0;
  for (;;) {
    const got = readSync(fd, buf, 0, buf.length, null);
    if (got === 0) break;
    for (let i = 0; i < got; i++) if (buf[i] === 10) n++;
  }
  closeSync(fd);
  return n;
}
