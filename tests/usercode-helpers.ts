/** Helpers of the usercode tests: building the C example, recording a skipped group plainly. */
import { spawnSync } from "node:child_process";
import { appendFileSync, mkdirSync } from "node:fs";
import { join } from "node:path";
import { ROOT } from "../harness/core/paths.js";
import { onPath } from "./builds-helpers.js";

/**
 * Record a skipped group in test-artifacts/skipped.txt, one line `<group>: <reason>; enable with <how>`
 * (printed at the end of the run), and return the reason for vitest's skip.
 */
export function recordSkip(group: string, reason: string, enable: string): string {
  mkdirSync(join(ROOT, "test-artifacts"), { recursive: true });
  appendFileSync(join(ROOT, "test-artifacts", "skipped.txt"), `${group}: ${reason}; enable with ${enable}\n`);
  process.stderr.write(`${group}: skipped: ${reason}; enable with ${enable}\n`);
  return reason;
}

/** What is missing to build examples/c-kepler both ways (undefined when clang, wasm-ld and gcc are here). */
export function cToolchainMissing(): string | undefined {
  const missing = [!onPath("clang") && "clang", !onPath("wasm-ld") && "lld (wasm-ld)", !onPath("gcc") && "gcc"].filter(Boolean);
  return missing.length ? `${missing.join(", ")} not on PATH` : undefined;
}

/** Build examples/c-kepler into `dir`: c-kepler.wasm and libc-kepler.so. */
export function buildCKepler(dir: string): { wasm: string; so: string } {
  const r = spawnSync(process.execPath, [join(ROOT, "examples", "c-kepler", "build.mjs"), dir], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`examples/c-kepler/build.mjs failed: ${r.stderr}`);
  return { wasm: join(dir, "c-kepler.wasm"), so: join(dir, "libc-kepler.so") };
}

/** Compile a C source to a shared library with gcc (for the crash and bad-library tests). */
export function buildSo(dir: string, name: string, source: string): string {
  const c = join(dir, `${name}.c`);
  const so = join(dir, `lib${name}.so`);
  spawnSync("sh", ["-c", `cat > '${c}'`], { input: source });
  const r = spawnSync("gcc", ["-O1", "-shared", "-fPIC", "-I", join(ROOT, "include"), c, "-o", so], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`gcc failed: ${r.stderr}`);
  return so;
}
