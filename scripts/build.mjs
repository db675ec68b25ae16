// Build everything a fresh clone needs: the three WebAssembly builds (release f64, single-precision f32,
// debug) from asconfig.json, the codec module (codec/), then the TypeScript harness into dist/. Run by
// `npm install` (prepare) and `npm run build`. Fails loudly; never leaves a half-built module in place of a good one (asc writes whole files).
import { execFileSync } from "node:child_process";
import { rmSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { KERNEL_TARGETS, CODEC_TARGET, ascArgs } from "./asc-targets.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const bin = (name) => join(root, "node_modules", ".bin", name);
const run = (cmd, args) => execFileSync(cmd, args, { cwd: root, stdio: "inherit" });

// The files generated from the ABI table must be current (npm run abi writes them): a stale one stops the build.
run(process.execPath, [join(root, "scripts", "gen-abi.mjs"), "--check"]);
for (const target of KERNEL_TARGETS) run(bin("asc"), ascArgs(target));
// The harness's codec module (eval's number parsing and formatting): its tables must be current.
run(process.execPath, [join(root, "scripts", "gen-codec-tables.mjs"), "--check"]);
run(bin("asc"), ascArgs(CODEC_TARGET));
// dist/ is rebuilt whole: a module left from a moved or deleted source must not be found at run time.
rmSync(join(root, "dist"), { recursive: true, force: true });
run(bin("tsc"), ["-p", "tsconfig.json"]);
process.stderr.write("built: build/areal.wasm (f64), build/areal-f32.wasm (f32), build/areal-debug.wasm, build/codec.wasm, dist/\n");
