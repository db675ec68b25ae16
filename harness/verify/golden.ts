/**
 * Determinism golden files (vectors/golden/<suite>.bits): for every vector suite, the release module's status
 * and output bit patterns on every case of the committed vector file. tests/fuzz-determinism-golden.test.ts
 * checks them on every run, in this engine and under the engine's baseline and optimizing WebAssembly tiers
 * (child processes, compare.ts), and with the native build when it is built. `npm run golden` regenerates them
 * deliberately (scripts/golden.mjs): a changed kernel changes its bits, and the change is then reviewed.
 *
 * Format: '#' header lines (suite, SHA-256 of the input columns of the suite's cases, rows, columns), a header
 * line `status,<outputs>`, then one line per vector row: the status code and each output's 64-bit pattern as 16
 * hex digits, or `-` where the status is a failure (outputs unspecified).
 */
import { createHash } from "node:crypto";
import { readFileSync, existsSync } from "node:fs";
import { join } from "node:path";
import { ROOT } from "../core/paths.js";
import { SPECS } from "./specs/index.js";
import type { VectorSpec } from "./specs/types.js";
import { findRoutine } from "../module/routines.js";
import { vectorPath, readVectors } from "./vectors.js";
import { toBitsHex } from "../core/float.js";
import { isOk } from "../module/status.js";
import { writeAtomic } from "../core/atomic.js";
import type { Trace } from "./compare-builds.js";

export const GOLDEN_DIR = join(ROOT, "vectors", "golden");

export function goldenPath(suite: string): string {
  return join(GOLDEN_DIR, `${suite}.bits`);
}

/**
 * SHA-256 of a suite's cases: the input columns of its vector file, as written (the golden file is only valid
 * for those cases; a regenerated file with the same inputs, another date or better references, keeps it).
 */
export function vectorDigest(suite: string): string {
  const spec = SPECS.find((s) => s.suite === suite);
  const v = readVectors(vectorPath(suite));
  const cols = (spec?.inputs ?? v.columns).map((n) => v.columns.indexOf(n));
  const h = createHash("sha256");
  for (const row of v.values) h.update(cols.map((c) => toBitsHex(row[c]!)).join(",") + "\n");
  return h.digest("hex");
}

function outputsOf(spec: VectorSpec): readonly string[] {
  const r = findRoutine(spec.routine);
  if (!r) throw new Error(`suite ${spec.suite}: unknown routine ${spec.routine}`);
  return r.outputs;
}

/** One line per row: status, then the bit patterns (or '-'). */
export function traceLines(t: Trace): string[] {
  const lines: string[] = [];
  for (let r = 0; r < t.statuses.length; r++) {
    const st = t.statuses[r]!;
    const cells = [String(st)];
    for (let j = 0; j < t.outputs; j++) cells.push(isOk(st) ? toBitsHex(t.values[r * t.outputs + j]!) : "-");
    lines.push(cells.join(","));
  }
  return lines;
}

/** The golden file text of a suite from the release module's trace. */
export function goldenText(spec: VectorSpec, t: Trace): string {
  const head = [
    "# areal determinism golden file: release module output bits (regenerate deliberately: npm run golden)",
    `# suite: ${spec.suite}`,
    `# cases sha256: ${vectorDigest(spec.suite)}`,
    `# rows: ${t.statuses.length}`,
    ["status", ...outputsOf(spec)].join(","),
  ];
  return [...head, ...traceLines(t)].join("\n") + "\n";
}

/** Write the golden file of every suite (or those named) from traces of the release module. */
export function writeGolden(traces: ReadonlyMap<string, Trace>): string[] {
  const written: string[] = [];
  for (const spec of SPECS) {
    const t = traces.get(spec.suite);
    if (!t) continue;
    writeAtomic(goldenPath(spec.suite), goldenText(spec, t));
    written.push(goldenPath(spec.suite));
  }
  return written;
}

/**
 * Differences between a trace and the suite's golden file: an empty list when every status and bit agrees.
 * A missing or stale golden file (vectors regenerated since) is reported as a difference naming the fix.
 */
export function goldenDifferences(spec: VectorSpec, t: Trace, max = 5): string[] {
  const path = goldenPath(spec.suite);
  if (!existsSync(path)) return [`${spec.suite}: no golden file (${path}); run 'npm run golden'`];
  const lines = readFileSync(path, "utf8").split("\n").filter((l) => l !== "");
  const sha = lines.find((l) => l.startsWith("# cases sha256: "))?.slice(16);
  if (sha !== vectorDigest(spec.suite)) return [`${spec.suite}: the golden file was made from other cases than vectors/${spec.suite}.csv; run 'npm run golden'`];
  const rows = lines.filter((l) => !l.startsWith("#")).slice(1);
  const got = traceLines(t);
  if (rows.length !== got.length) return [`${spec.suite}: golden file has ${rows.length} rows, the suite ${got.length}`];
  const out: string[] = [];
  const names = ["status", ...outputsOf(spec)];
  for (let r = 0; r < got.length && out.length < max; r++) {
    if (rows[r] === got[r]) continue;
    const a = rows[r]!.split(",");
    const b = got[r]!.split(",");
    const cols = names.filter((_, j) => a[j] !== b[j]);
    out.push(`${spec.suite} row ${r + 1} (${t.build}): ${cols.map((c) => `${c} ${a[names.indexOf(c)]} -> ${b[names.indexOf(c)]}`).join(", ")}`);
  }
  return out;
}
