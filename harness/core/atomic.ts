/** Writing output files whole or not at all: write a temporary file beside the target, then rename. */
import { writeFileSync, renameSync, rmSync, mkdirSync, statSync, type Stats } from "node:fs";
import { dirname, basename, join, resolve } from "node:path";
import { removeOnSignal } from "./cleanup.js";

/** Write `data` to `path` atomically. Creates the parent folder. Throws with a plain message on failure. */
export function writeAtomic(path: string, data: string | Uint8Array): void {
  const dir = dirname(path);
  const tmp = join(dir, `.${basename(path)}.${process.pid}.tmp`);
  const forget = removeOnSignal(tmp);
  try {
    makeDirs(dir);
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (err) {
    try {
      rmSync(tmp, { force: true });
    } catch {
      // the folder itself is not usable (for example a file stands where the folder should be): nothing to remove
    }
    throw cannotWrite(path, err);
  } finally {
    forget();
  }
}

/**
 * Create a folder and its missing parents, one level at a time, failing at once with the system's reason.
 * (Node's `mkdirSync(dir, { recursive: true })` never returns for a path under /proc: the kernel answers
 * ENOENT for a folder whose parent exists, and Node retries.)
 */
export function makeDirs(dir: string): void {
  const missing: string[] = [];
  let d = resolve(dir);
  for (;;) {
    const st = statSync(d, { throwIfNoEntry: false });
    if (st) {
      if (!st.isDirectory()) throw Object.assign(new Error(`ENOTDIR: not a folder, ${d}`), { code: "ENOTDIR" });
      break;
    }
    missing.push(d);
    const up = dirname(d);
    if (up === d) break;
    d = up;
  }
  for (const m of missing.reverse()) mkdirSync(m);
}

/** The error for a file that could not be written: its path, the system's code and first words. */
export function cannotWrite(path: string, err: unknown): Error {
  const e = err as NodeJS.ErrnoException;
  return new Error(`cannot write ${path}: ${e.code ? `${e.code} (${e.message.split(",")[0]})` : e.message}`);
}

/** True when two stats are of one file (same device and inode: through hard and symbolic links too). */
export function sameFile(a: Stats, b: Stats): boolean {
  return a.dev === b.dev && a.ino === b.ino;
}

/**
 * The reason an output path must be refused because it is one of the inputs (the same file by device and
 * inode, whatever the path's spelling or links), or undefined. Writing the output would replace the input.
 */
export function outputIsInput(out: string, inputs: readonly string[]): string | undefined {
  const o = statSync(out, { throwIfNoEntry: false });
  if (!o) return undefined;
  for (const i of inputs) {
    const s = statSync(i, { throwIfNoEntry: false });
    if (s && sameFile(o, s)) return `${out} is the input file ${i} (the same file); the results would replace it: choose another output`;
  }
  return undefined;
}
