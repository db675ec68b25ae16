// Build the two bench-only modules (never shipped, never used by `areal check`):
//  1. build/bench/baseline.wasm  (asconfig target `bench-baseline`, source bench/baseline.ts): the classic Newton
//     baseline, one sin + one cos, the elliptic solver, timing loops and per-operation loops.
//  2. build/bench/areal-counting.wasm: every kernel compiled with RMath = CountingMath (asconfig target
//     `counting`, entry assembly/counting.ts), then, in its text form, every f64.div, f64.mul, f64.add, f64.sub
//     and f64.sqrt instruction replaced by a call of a small function that counts it (when no library math call
//     is running: assembly/counting_math.ts keeps that depth) and performs the same instruction, so results are
//     bit-identical to the release module. An add or sub whose operand is a product computed just before it
//     (`mul; add` or `mul; <local.get|const>; add` in the instruction stream) also counts as a fusable
//     multiply-add pair: a lower bound on what a compiler for a target with FMA could fuse.
// Run by `npm run build:bench` and, when the modules are missing, by `areal bench`.
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync, renameSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import binaryen from "binaryen";
import { instrument } from "./instrument-wat.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const asc = join(root, "node_modules", ".bin", "asc");
const run = (args) => execFileSync(asc, args, { cwd: root, stdio: "inherit" });
const out = join(root, "build", "bench");
mkdirSync(out, { recursive: true });

run(["bench/baseline.ts", "--target", "bench-baseline"]);
run(["assembly/counting.ts", "--target", "counting"]);

const raw = readFileSync(join(out, "areal-counting-raw.wat"), "utf8");
const mod = binaryen.parseText(instrument(raw));
mod.setFeatures(binaryen.Features.All);
if (!mod.validate()) throw new Error("the instrumented counting module does not validate");
const bin = mod.emitBinary();
mod.dispose();
writeFileSync(join(out, "areal-counting.wasm.tmp"), bin);
renameSync(join(out, "areal-counting.wasm.tmp"), join(out, "areal-counting.wasm"));
process.stderr.write("built: build/bench/baseline.wasm, build/bench/areal-counting.wasm (bench only)\n");
