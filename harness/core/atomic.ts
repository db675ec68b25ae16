/** Writing output files whole or not at all: write a temporary file beside the target, then rename. */
import { writeFileSync, renameSync, rmSync, mkdirSync } from "node:fs";
import { dirname, basename, join } from "node:path";

/** Write `data` to `path` atomically. Creates the parent folder. Throws with a plain message on failure. */
export function writeAtomic(path: string, data: string | Uint8Array): void {
  const dir = dirname(path);
  const tmp = join(dir, `.${basename(path)}.${process.pid}.tmp`);
  try {
    mkdirSync(dir, { recursive: true });
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (err) {
    try {
      rmSync(tmp, { force: true });
    } catch {
      // the folder itself is not usable (for example a file stands where the folder should be): nothing to remove
    }
    throw cannotWrite(path, err);
  }
}

/** The error for a file that could not be written: its path, the system's code and first words. */
export function cannotWrite(path: string, err: unknown): Error {
  const e = err as NodeJS.ErrnoException;
  return new Error(`cannot write ${path}: ${e.code ? `${e.code} (${e.message.split(",")[0]})` : e.message}`);
}
