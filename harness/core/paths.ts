/** Locations inside the project, found from this file whether it runs from harness/ or dist/harness/. */
import { existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

function findRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    if (existsSync(join(dir, "asconfig.json")) && existsSync(join(dir, "package.json"))) return dir;
    dir = dirname(dir);
  }
  throw new Error("cannot find the project root (asconfig.json) above " + fileURLToPath(import.meta.url));
}

export const ROOT = findRoot();
export const BUILD_DIR = join(ROOT, "build");
export const VECTORS_DIR = join(ROOT, "vectors");

/** The module file of each built-in WebAssembly build. */
export const BUILD_FILES = {
  f64: join(BUILD_DIR, "areal.wasm"),
  f32: join(BUILD_DIR, "areal-f32.wasm"),
  debug: join(BUILD_DIR, "areal-debug.wasm"),
} as const;

/**
 * A compiled script of the harness (a worker or child-process entry) given by its path under harness/, e.g.
 * "run/worker-entry.js": the file in dist/harness/, which this process also runs from when it runs compiled
 * (from source under vitest the sources have no .js beside them). Throws naming the file when it is not built.
 */
export function compiledScript(underHarness: string, what: string): string {
  const built = join(ROOT, "dist", "harness", ...underHarness.split("/"));
  if (existsSync(built)) return built;
  throw new Error(`${what} is not built (dist/harness/${underHarness}); run 'npm run build'`);
}
