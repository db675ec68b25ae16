// Count the correction steps of kepler_elliptic on seeded random cases (the claim in its header: one step on
// every case). Cases, in equal shares: e uniform in [0, 1) or e = 1 - 10^-U(0, 16); M uniform in [-pi, pi], or
// |M| = 10^U(-12, 0) (towards the e -> 1, M -> 0 corner) or |M| = 10^U(0, 4) (whole turns removed), either sign.
// Also prints the share of the bench's domain (e uniform in [0, 1), M uniform in [-pi, pi]) that takes each of the
// starter's paths. Usage: node scripts/kepler-steps.mjs [--n 3000000] [--seed 20261205] [--build f64|f32]
// (after `npm run build`). Exit 1 when a case takes more than one step or returns a status other than OK.
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const arg = (name, dflt) => {
  const i = process.argv.indexOf(name);
  return i > 0 ? process.argv[i + 1] : dflt;
};
const n = Number(arg("--n", "3000000"));
const seed = Number(arg("--seed", "20261205"));
const build = arg("--build", "f64");
const file = join(root, "build", build === "f32" ? "areal-f32.wasm" : "areal.wasm");
const { instance } = await WebAssembly.instantiate(readFileSync(file), {});
const k = instance.exports;
const out = build === "f32" ? new Float32Array(k.memory.buffer, k.areal_out(), 2) : new Float64Array(k.memory.buffer, k.areal_out(), 2);
// The f32 build takes binary32 inputs: e is rounded to it (and kept below 1), M likewise.
const fmt = build === "f32" ? (x) => Math.fround(x) : (x) => x;
const below1 = build === "f32" ? 1 - 2 ** -24 : 1 - 2 ** -53;

// The project's seeded generator (harness/core/rng.ts, compiled to dist/ by `npm run build`).
const { Rng } = await import(pathToFileURL(join(root, "dist", "harness", "core", "rng.js")).href);
const rng = new Rng(seed);
const uniform = () => rng.uniform();

const steps = new Map();
let bad = 0;
for (let c = 0; c < n; c++) {
  const e = Math.min(fmt(c % 2 === 0 ? uniform() : 1 - 10 ** (-16 * uniform())), below1);
  const kind = Math.floor(c / 2) % 3;
  const sign = uniform() < 0.5 ? -1 : 1;
  const M = fmt(kind === 0 ? (2 * uniform() - 1) * Math.PI : sign * 10 ** (kind === 1 ? -12 * uniform() : 4 * uniform()));
  const status = k.kepler_elliptic(e, M);
  const it = out[1];
  steps.set(it, (steps.get(it) ?? 0) + 1);
  if (status !== 0 || it > 1) {
    if (bad < 20) process.stdout.write(`e=${e} M=${M}: status ${status}, ${it} steps\n`);
    bad++;
  }
}
const hist = [...steps.entries()].sort((a, b) => a[0] - b[0]).map(([s, m]) => `${s}:${m}`).join(" ");
process.stdout.write(`${build} build, ${n} cases (seed ${seed}): steps ${hist}; more than one step or not OK: ${bad}\n`);

// Shares of the bench's domain by path (exact areas): the corner cells (Markley's starter) are e >= 1/2 with
// |M| < 1/K and e >= 3/4 with 1/K <= |M| < 2/K (K = 651/128 cells per radian); |M| > 3.125 goes through the
// general path (the reduction is tried); the rest is the one-block path with the table starter.
const K = 651 / 128;
const corner = (0.5 * (1 / K) + 0.25 * (1 / K)) / Math.PI;
const general = (Math.PI - 3.125) / Math.PI;
process.stdout.write(`bench domain: table starter, one block ${(100 * (1 - corner - general)).toFixed(2)}%; Markley's starter (corner cells) ${(100 * corner).toFixed(2)}%; general path (|M| > 3.125) ${(100 * general).toFixed(2)}%\n`);
process.exit(bad === 0 ? 0 : 1);
