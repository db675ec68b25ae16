// The last step every table generator shares (gen-sincos-table.mjs, gen-kepler-starter-table.mjs,
// gen-codec-tables.mjs): write the generated text to its file, or, with --check on the command line, write
// nothing and exit 1 when the committed file differs (or is missing).
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(fileURLToPath(new URL(".", import.meta.url)), "..");

/** rel: the file's path from the repository root; script: the generator's path from the root; note: for the log. */
export function writeOrCheck(rel, text, script, note = "") {
  const target = join(root, rel);
  if (process.argv.includes("--check")) {
    let now = "";
    try {
      now = readFileSync(target, "utf8");
    } catch {}
    if (now !== text) {
      process.stderr.write(`${rel} is stale: run node ${script}\n`);
      process.exit(1);
    }
  } else {
    writeFileSync(target, text);
    process.stderr.write(`wrote ${rel}${note}\n`);
  }
}
