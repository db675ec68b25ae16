// `npm run golden`: regenerate the determinism golden files (vectors/golden/<suite>.bits) from the release
// module, deliberately (harness/golden.ts describes the format). Runs from dist/ (npm run golden builds first).
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const dist = (p) => import(pathToFileURL(join(root, "dist", "harness", p)).href);
const { SPECS } = await dist("verify/specs/index.js");
const { traceSuite } = await dist("verify/compare-builds.js");
const { loadBuild } = await dist("module/load.js");
const { writeGolden } = await dist("verify/golden.js");
const { vectorPath } = await dist("verify/vectors.js");
import { existsSync } from "node:fs";

const k = loadBuild("f64");
const have = SPECS.filter((s) => existsSync(vectorPath(s.suite)));
for (const s of SPECS) if (!have.includes(s)) process.stderr.write(`skipped ${s.suite}: no vector file yet (npm run vectors)\n`);
const traces = new Map(have.map((s) => [s.suite, traceSuite(s, k)]));
for (const p of writeGolden(traces)) process.stderr.write(`wrote ${p.slice(root.length + 1)}\n`);
