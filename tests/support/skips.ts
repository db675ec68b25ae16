/**
 * Skipped groups of tests, said once at the end of the run: a test that cannot run here (a compiler, a browser,
 * a translator missing) records why and what enables it; tests/support/global-setup.ts prints one line per
 * group after the last test, so a skip is not lost among hundreds of lines.
 */
import { appendFileSync, mkdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

/** The file the skips are collected in (cleared at the start of each run). */
export const SKIPS_FILE = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "test-artifacts", "skipped.txt");

/** Record a skipped group: what is skipped, why, and the command or package that enables it. */
export function noteSkip(group: string, reason: string, enable: string): void {
  mkdirSync(dirname(SKIPS_FILE), { recursive: true });
  appendFileSync(SKIPS_FILE, `${group}\t${reason}\t${enable}\n`);
}
