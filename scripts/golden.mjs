// `npm run golden`: regenerate the determinism golden files (vectors/golden/<suite>.bits) from the release
// module, deliberately (harness/verify/golden.ts describes the format). Runs from dist/ (npm run golden builds first).
// The golden bits are written by the code under test, so they are written only after every accuracy suite passes
// on that same build against the references: otherwise it refuses, names the failing suites, and exits 1.
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { existsSync } from "node:fs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const dist = (p) => import(pathToFileURL(join(root, "dist", "harness", p)).href);
const { SPECS } = await dist("verify/specs/index.js");
const { traceSuite } = await dist("verify/compare-builds.js");
const { loadBuild } = await dist("module/load.js");
const { writeGolden } = await dist("verify/golden.js");
const { vectorPath } = await dist("verify/vectors.js");
const { runSuite } = await dist("verify/check.js");

const k = loadBuild("f64");
const have = SPECS.filter((s) => existsSync(vectorPath(s.suite)));
for (const s of SPECS) if (!have.includes(s)) process.stderr.write(`skipped ${s.suite}: no vector file yet (npm run vectors)\n`);
const failed = [];
for (const s of have) {
  const r = runSuite(s, k);
  if (r.verdict !== "pass") failed.push(`${s.suite}: ${r.verdict}${r.reasons.length ? ` (${r.reasons.join("; ")})` : ""}`);
}
if (failed.length > 0) {
  process.stderr.write(`golden: refused, no file written: the release build does not pass every accuracy suite:\n  ${failed.join("\n  ")}\n`);
  process.exit(1);
}
const traces = new Map(have.map((s) => [s.suite, traceSuite(s, k)]));
for (const p of writeGolden(traces)) process.stderr.write(`wrote ${p.slice(root.length + 1)}\n`);
