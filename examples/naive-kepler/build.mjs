// Build the naive example module: node examples/naive-kepler/build.mjs [OUT.wasm]
// (default examples/naive-kepler/naive-kepler.wasm). Same zero-import options as the project's release build.
import { execFileSync } from "node:child_process";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, "..", "..");
const out = resolve(process.argv[2] ?? join(here, "naive-kepler.wasm"));
execFileSync(join(root, "node_modules", ".bin", "asc"), [
  join(here, "naive.ts"), "--outFile", out, "--runtime", "stub", "-O3", "--noAssert", "--use", "abort=",
  "--initialMemory", "1", "--maximumMemory", "1",
], { stdio: "inherit", cwd: here }); // cwd: here, so the project's asconfig.json is not picked up
process.stderr.write(`built ${out}\n`);
