// `npm run mutants`: the mutation check. Each mutant of mutants/catalogue.json (one small realistic change: a
// file, a distinctive piece of one line, its replacement, why it is realistic, the test files that should catch
// it) is applied in a scratch copy of the project (never in the working tree), the builds it needs are rebuilt
// there, and its test files run with vitest. Caught: a named test fails. Survived: they all pass. Pattern not
// found: the catalogue no longer fits the code (its own category, never counted as caught). Build failed: the
// mutant does not compile (not counted either). Equivalent mutants (marked with the reason) are not run.
//
//   node scripts/mutants.mjs [--only id,id] [--jobs N] [--json FILE] [--keep]
//
// Prints one line per mutant, the score (caught / run, equivalent and not-found apart) and the survivors; exits 1
// when a mutant survives or a pattern is not found.
import { spawn } from "node:child_process";
import { cpSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync, existsSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";
import { CODEC_TARGET, ascArgs } from "./asc-targets.mjs";

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), "..");
export const CATALOGUE = join(ROOT, "mutants", "catalogue.json");

/** Folders never copied into a scratch project (node_modules is linked, not copied). */
const SKIP = new Set(["node_modules", ".git", "coverage"]);

/**
 * A scratch copy of the project at `root` in a new temporary folder: every file but .git, with node_modules
 * linked to the original. Returns its path; remove it with removeScratch.
 */
export function scratchCopy(root = ROOT) {
  const dir = mkdtempSync(join(tmpdir(), "areal-mutant-"));
  cpSync(root, dir, {
    recursive: true,
    filter: (src) => {
      const rel = relative(root, src);
      return rel === "" || !SKIP.has(rel.split(/[\\/]/)[0]);
    },
  });
  symlinkSync(join(root, "node_modules"), join(dir, "node_modules"), "dir");
  return dir;
}

export function removeScratch(dir) {
  rmSync(dir, { recursive: true, force: true });
}

/**
 * Apply one textual change to `file` (relative to `dir`): `pattern` must occur exactly once (a distinctive piece
 * of one line). Returns "applied", "not-found" or "ambiguous" (more than one occurrence).
 */
export function applyPattern(dir, file, pattern, replacement) {
  const path = join(dir, file);
  if (!existsSync(path)) return "not-found";
  const text = readFileSync(path, "utf8");
  const at = text.indexOf(pattern);
  if (at < 0) return "not-found";
  if (text.indexOf(pattern, at + 1) >= 0) return "ambiguous";
  writeFileSync(path, text.slice(0, at) + replacement + text.slice(at + pattern.length));
  return "applied";
}

/** Run a command in `cwd`; resolves to { code, out } (stdout and stderr together). */
export function runIn(cwd, cmd, args, timeoutMs = 20 * 60_000) {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd, env: { ...process.env, NO_COLOR: "1", FORCE_COLOR: "0" } });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
    child.on("close", (code) => {
      clearTimeout(timer);
      resolve({ code: code ?? -1, out });
    });
  });
}

/**
 * What a mutant of `file` needs rebuilt: asc targets of asconfig.json for a kernel (the release build unless it
 * says), "codec" for the codec module (codec/asconfig.json), or "tsc" for the harness, whose compiled copy in dist/ is what the command line runs (tests that spawn
 * `areal` would otherwise test the unchanged harness).
 */
function targetsFor(m) {
  if (m.file.startsWith("harness/")) return ["tsc"];
  if (m.file.startsWith("codec/")) return [CODEC_TARGET];
  if (!m.file.startsWith("assembly/")) return [];
  return m.targets ?? ["release"];
}

/** Build what a changed kernel or harness file needs, in `dir`, as scripts/build.mjs builds it. */
export async function buildTargets(dir, targets) {
  for (const t of targets) {
    const args = t === "tsc"
      ? [join(dir, "node_modules", "typescript", "bin", "tsc"), "-p", "tsconfig.json"]
      : [join(dir, "node_modules", "assemblyscript", "bin", "asc.js"), ...ascArgs(t)];
    const r = await runIn(dir, process.execPath, args);
    if (r.code !== 0) return r;
  }
  return { code: 0, out: "" };
}

/** Run one mutant in its own scratch copy: { id, verdict, detail }. */
export async function runMutant(m, root = ROOT, keep = false) {
  if (m.equivalent) return { id: m.id, verdict: "equivalent", detail: m.equivalent };
  const dir = scratchCopy(root);
  try {
    const applied = applyPattern(dir, m.file, m.pattern, m.replacement);
    if (applied !== "applied") return { id: m.id, verdict: "pattern-not-found", detail: `${m.file}: pattern ${applied}` };
    const b = await buildTargets(dir, targetsFor(m));
    if (b.code !== 0) return { id: m.id, verdict: "build-failed", detail: b.out.split("\n").filter((l) => /ERROR|error/.test(l)).slice(0, 2).join(" | ") };
    const r = await runIn(dir, process.execPath, [join(dir, "node_modules", "vitest", "vitest.mjs"), "run", "--bail", "1", "--reporter", "dot", ...m.tests]);
    if (r.code === 0) return { id: m.id, verdict: "survived", detail: `passed: ${m.tests.join(" ")}` };
    const failed = [...new Set([...r.out.matchAll(/FAIL\s+(tests\/\S+\.test\.ts)/g)].map((x) => x[1]))];
    return { id: m.id, verdict: "caught", detail: failed.length ? `by ${failed.join(" ")}` : `vitest exit ${r.code}` };
  } finally {
    if (!keep) removeScratch(dir);
    else process.stderr.write(`kept ${dir}\n`);
  }
}

export function readCatalogue(path = CATALOGUE) {
  return JSON.parse(readFileSync(path, "utf8")).mutants;
}

/** Score line: caught / (caught + survived); equivalent, not found and not compiling counted apart. */
export function score(results) {
  const n = (v) => results.filter((r) => r.verdict === v).length;
  const caught = n("caught");
  const survived = n("survived");
  return {
    caught,
    survived,
    equivalent: n("equivalent"),
    notFound: n("pattern-not-found"),
    buildFailed: n("build-failed"),
    text: `mutation score: ${caught} / ${caught + survived} caught (${(100 * caught / Math.max(1, caught + survived)).toFixed(0)}%); ${n("equivalent")} equivalent, ${n("pattern-not-found")} pattern not found, ${n("build-failed")} not compiling`,
  };
}

async function main(argv) {
  const opt = { only: undefined, jobs: 1, json: undefined, keep: false };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--only") opt.only = new Set(argv[++i].split(","));
    else if (a === "--jobs") opt.jobs = Math.max(1, Number(argv[++i]) || 1);
    else if (a === "--json") opt.json = argv[++i];
    else if (a === "--keep") opt.keep = true;
    else if (a === "--help" || a === "-h") {
      process.stdout.write("usage: node scripts/mutants.mjs [--only id,id] [--jobs N] [--json FILE] [--keep]\n");
      return 0;
    } else {
      process.stderr.write(`mutants: unknown option ${a}\n`);
      return 2;
    }
  }
  const all = readCatalogue();
  const list = opt.only ? all.filter((m) => opt.only.has(m.id)) : all;
  const results = new Array(list.length);
  let next = 0;
  const worker = async () => {
    while (next < list.length) {
      const i = next++;
      const m = list[i];
      const r = await runMutant(m, ROOT, opt.keep);
      results[i] = r;
      process.stdout.write(`${r.verdict.padEnd(17)} ${m.id.padEnd(34)} ${r.detail}\n`);
    }
  };
  await Promise.all(Array.from({ length: Math.min(opt.jobs, list.length) }, worker));
  const s = score(results);
  process.stdout.write(`\n${s.text}\n`);
  const bad = results.filter((r) => r.verdict === "survived" || r.verdict === "pattern-not-found" || r.verdict === "build-failed");
  if (bad.length) process.stdout.write(`survivors and misfits:\n${bad.map((r) => `  ${r.verdict} ${r.id}: ${list.find((m) => m.id === r.id).why}`).join("\n")}\n`);
  if (opt.json) writeFileSync(opt.json, JSON.stringify({ score: s, results }, null, 2) + "\n");
  return s.survived > 0 || s.notFound > 0 ? 1 : 0;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  process.exitCode = await main(process.argv.slice(2));
}
