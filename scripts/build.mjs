// Build everything a fresh clone needs: the three WebAssembly builds (release f64, single-precision f32,
// debug) from asconfig.json, the codec module (codec/), then the TypeScript harness into dist/. Run by
// `npm install` (prepare) and `npm run build`. Fails loudly; never leaves a half-built module in place of a good one (asc writes whole files).
import { execFileSync } from "node:child_process";
import { rmSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const bin = (name) => join(root, "node_modules", ".bin", name);
const run = (cmd, args) => execFileSync(cmd, args, { cwd: root, stdio: "inherit" });

// The files generated from the ABI table must be current (npm run abi writes them): a stale one stops the build.
run(process.execPath, [join(root, "scripts", "gen-abi.mjs"), "--check"]);
// The single-precision build's entry, assembly/index_f32.ts, adds assembly/mathf.ts (its RMath, ArealMathf).
for (const target of ["release", "single", "debug"]) {
  run(bin("asc"), [target === "single" ? "assembly/index_f32.ts" : "assembly/index.ts", "--target", target]);
}
// The harness's codec module (eval's number parsing and formatting): its tables must be current, then its own
// config (codec/asconfig.json: not a kernel module, not in the ABI table).
run(process.execPath, [join(root, "scripts", "gen-codec-tables.mjs"), "--check"]);
run(bin("asc"), ["--config", "codec/asconfig.json", "--target", "release"]);
// dist/ is rebuilt whole: a module left from a moved or deleted source must not be found at run time.
rmSync(join(root, "dist"), { recursive: true, force: true });
run(bin("tsc"), ["-p", "tsconfig.json"]);
process.stderr.write("built: build/areal.wasm (f64), build/areal-f32.wasm (f32), build/areal-debug.wasm, build/codec.wasm, dist/\n");
