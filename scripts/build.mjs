// Build everything a fresh clone needs: the three WebAssembly builds (release f64, single-precision f32,
// debug) from asconfig.json, then the TypeScript harness into dist/. Run by `npm install` (prepare) and
// `npm run build`. Fails loudly; never leaves a half-built module in place of a good one (asc writes whole files).
import { execFileSync } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const bin = (name) => join(root, "node_modules", ".bin", name);
const run = (cmd, args) => execFileSync(cmd, args, { cwd: root, stdio: "inherit" });

for (const target of ["release", "single", "debug"]) {
  run(bin("asc"), ["assembly/index.ts", "--target", target]);
}
run(bin("tsc"), ["-p", "tsconfig.json"]);
process.stderr.write("built: build/areal.wasm (f64), build/areal-f32.wasm (f32), build/areal-debug.wasm, dist/\n");
