#!/usr/bin/env node
// The `areal` command. The harness is TypeScript compiled to dist/ by `npm run build` (run by `npm install`).
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";

const entry = new URL("../dist/harness/cli/main.js", import.meta.url);
if (!existsSync(fileURLToPath(entry))) {
  process.stderr.write("areal: the harness is not built (dist/ is missing); run 'npm run build'\n");
  process.exit(2);
}
const { main } = await import(entry.href);
process.exitCode = await main(process.argv.slice(2));
