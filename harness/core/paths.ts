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
