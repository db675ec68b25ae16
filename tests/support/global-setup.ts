/** vitest global setup: clears the skip list before the run and prints it, one line per group, after it. */
import { existsSync, readFileSync, rmSync } from "node:fs";
import { SKIPS_FILE } from "./skips.js";

export function setup(): void {
  rmSync(SKIPS_FILE, { force: true });
}

export function teardown(): void {
  if (!existsSync(SKIPS_FILE)) return;
  const seen = new Map<string, string>();
  for (const line of readFileSync(SKIPS_FILE, "utf8").split("\n")) {
    const [group, reason, enable] = line.split("\t");
    if (group && !seen.has(group)) seen.set(group, `skipped: ${group}: ${reason}; enable with: ${enable}`);
  }
  if (seen.size === 0) return;
  process.stdout.write(`\n${[...seen.values()].join("\n")}\n`);
}
