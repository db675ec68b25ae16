// `npm run build:native`: the release module (build/areal.wasm) translated to C by wasm2c and compiled with the
// system C compiler into build/native/areal-native, a small runner (native/runner.c) that reads the same CSV as
// `areal eval` and serves the harness (`--build native`).
//
// Needs: wasm2c with its runtime (Debian/Ubuntu package `wabt`, 1.0.30 or later: the instance-struct API) and a C
// compiler (`cc`, or $CC). Where either is missing it says so and exits 0 (the rest of areal does not need it);
// `--require` (or AREAL_REQUIRE_NATIVE=1) makes that an error, for CI.
//
// Compiler flags: -O2 -std=c99 -ffp-contract=off. The last one matters: with contraction on, the compiler may fuse
// a * b + c into one fused multiply-add (one rounding instead of two) wherever the target has FMA (for example with
// -march=native on a recent x86-64, or by default on AArch64), and the results stop matching the WebAssembly
// module's bits. WebAssembly itself never fuses. Do not add -ffast-math or -Ofast for the same reason.
import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync, statSync, renameSync } from "node:fs";
import { delimiter, dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const outDir = join(root, "build", "native");
const wasm = join(root, "build", "areal.wasm");
const require_ = process.argv.includes("--require") || process.env.AREAL_REQUIRE_NATIVE === "1";

// WASM_RT_MEMCHECK_SIGNAL_HANDLER=0: memory accesses are bounds-checked in code, so the runtime needs no signal
// handlers (plain C99, no POSIX). The kernels never go out of bounds; the check only costs a compare.
export const CFLAGS = ["-O2", "-std=c99", "-ffp-contract=off", "-DWASM_RT_MEMCHECK_SIGNAL_HANDLER=0"];

function say(msg) {
  process.stderr.write(`build:native: ${msg}\n`);
}

function unavailable(msg) {
  say(`${msg}; the native build is skipped (everything else works without it)`);
  process.exit(require_ ? 1 : 0);
}

/** The first executable of these names on PATH. */
function onPath(names) {
  for (const dir of (process.env.PATH ?? "").split(delimiter)) {
    for (const n of names) {
      const p = join(dir, n);
      try {
        if (dir && statSync(p).isFile()) return p;
      } catch {
        // not here
      }
    }
  }
  return undefined;
}

/** The wasm2c runtime (wasm-rt.h, wasm-rt-impl.c), looked for beside the wasm2c binary's install prefix. */
function findRuntime(wasm2c) {
  const prefix = dirname(dirname(wasm2c));
  const dirs = [process.env.WASM2C_RUNTIME, join(prefix, "share", "wabt", "wasm2c"), join(prefix, "src", "wasm2c"), join(prefix, "include"), join(prefix, "wasm2c")].filter(Boolean);
  const impl = dirs.find((d) => existsSync(join(d, "wasm-rt-impl.c")));
  const header = dirs.find((d) => existsSync(join(d, "wasm-rt.h")));
  return impl && header ? { impl, header } : undefined;
}

if (!existsSync(wasm)) {
  say("build/areal.wasm is missing: run 'npm run build' first");
  process.exit(1);
}
if (!existsSync(join(root, "dist", "harness", "module", "routines.js"))) {
  say("dist/ is missing: run 'npm run build' first");
  process.exit(1);
}
const wasm2c = process.env.WASM2C ?? onPath(["wasm2c"]);
if (!wasm2c) unavailable("no wasm2c on PATH (install the 'wabt' package, e.g. apt-get install wabt)");
const runtime = findRuntime(wasm2c);
if (!runtime) unavailable(`wasm2c at ${wasm2c} has no runtime sources (wasm-rt.h, wasm-rt-impl.c) beside it; set WASM2C_RUNTIME to their folder`);
const cc = process.env.CC ?? onPath(["cc", "gcc", "clang"]);
if (!cc) unavailable("no C compiler found (cc, gcc, clang or $CC)");

mkdirSync(outDir, { recursive: true });
const w2cVersion = execFileSync(wasm2c, ["--version"], { encoding: "utf8" }).trim();
execFileSync(wasm2c, [wasm, "-n", "areal", "-o", join(outDir, "areal.c")], { stdio: "inherit" });

// ---- the generated table: exports (from the translated header), routines and status words (from dist/) ----
const header = readFileSync(join(outDir, "areal.h"), "utf8");
if (!/Z_areal_instance_t/.test(header)) unavailable(`${w2cVersion} generates the old global-state API; wasm2c 1.0.30 or later is needed`);
const exportsFound = [];
const lines = header.split("\n");
for (let i = 0; i + 1 < lines.length; i++) {
  const m = /^\/\* export: '([^']+)' \*\/$/.exec(lines[i]);
  if (!m) continue;
  const proto = /^(\w+) (\w+)\(Z_areal_instance_t\*((?:, \w+)*)\);$/.exec(lines[i + 1]);
  if (!proto || proto[1] !== "u32") continue; // kernels and core functions return an i32; skips the memory
  const params = proto[3] ? proto[3].split(", ").slice(1) : [];
  if (!params.every((p) => p === "f64" || p === "f32" || p === "u32")) continue;
  exportsFound.push({ name: m[1], cname: proto[2], params });
}
const { ROUTINES } = await import(pathToFileURL(join(root, "dist", "harness", "module", "routines.js")).href);
const { STATUS_WORDS, FIRST_ERROR } = await import(pathToFileURL(join(root, "dist", "harness", "module", "status.js")).href);
const { exactHex } = await import(pathToFileURL(join(root, "dist", "harness", "core", "float.js")).href);
const cstr = (s) => JSON.stringify(s);
const cnum = (x) => (Number.isNaN(x) ? "NAN" : x === Infinity ? "INFINITY" : x === -Infinity ? "-INFINITY" : exactHex(x));
const t = [];
t.push("/* Generated by scripts/build-native.mjs from build/native/areal.h and dist/harness (routines, status). Do not edit. */");
t.push("#ifndef AREAL_TABLE_H", "#define AREAL_TABLE_H", "#include <math.h>", "#include <stdint.h>", '#include "areal.h"', "");
t.push("typedef struct { const char *name; int nparams; const char *params; int32_t (*call)(Z_areal_instance_t *, const double *); } areal_export_t;");
t.push("typedef struct { const char *word; double value; } areal_choice_t;");
t.push("typedef struct { const char *name; int has_default; double def; int nchoices; const areal_choice_t *choices; } areal_input_t;");
t.push("typedef struct { const char *name; const char *export_name; int ninputs; const areal_input_t *inputs; int noutputs; const char *const *outputs; } areal_routine_t;");
t.push("typedef struct { int32_t code; const char *word; } areal_status_t;", "");
exportsFound.forEach((e, i) => {
  const args = e.params.map((p, j) => (p === "f64" ? `a[${j}]` : p === "f32" ? `(f32)a[${j}]` : `(u32)(int32_t)a[${j}]`));
  t.push(`static int32_t areal_call_${i}(Z_areal_instance_t *in, const double *a) { ${e.params.length ? "" : "(void)a; "}return (int32_t)${e.cname}(${["in", ...args].join(", ")}); }`);
});
t.push(`#define AREAL_N_EXPORTS ${exportsFound.length}`);
t.push("static const areal_export_t AREAL_EXPORTS[] = {");
exportsFound.forEach((e, i) => t.push(`  {${cstr(e.name)}, ${e.params.length}, ${cstr(e.params.map((p) => (p === "f64" ? "d" : p === "f32" ? "f" : "i")).join(""))}, areal_call_${i}},`));
t.push("};", "");
// One routine entry per input set: the main one, then each alternative (the runner takes the first whose columns exist).
const entries = [];
for (const r of ROUTINES) {
  entries.push({ name: r.name, exportName: r.exportName, inputs: r.inputs, outputs: r.outputs });
  for (const alt of r.alternatives ?? []) entries.push({ name: r.name, exportName: alt.exportName, inputs: alt.inputs, outputs: r.outputs });
}
entries.forEach((r, i) => {
  r.inputs.forEach((inp, j) => {
    const ch = Object.entries(inp.choices ?? {});
    if (ch.length) t.push(`static const areal_choice_t areal_choices_${i}_${j}[] = {${ch.map(([w, v]) => `{${cstr(w)}, ${cnum(v)}}`).join(", ")}};`);
  });
  t.push(`static const areal_input_t areal_inputs_${i}[] = {${r.inputs.map((inp, j) => {
    const nch = Object.keys(inp.choices ?? {}).length;
    return `{${cstr(inp.name)}, ${inp.default !== undefined ? 1 : 0}, ${cnum(inp.default ?? 0)}, ${nch}, ${nch ? `areal_choices_${i}_${j}` : "0"}}`;
  }).join(", ")}};`);
  t.push(`static const char *const areal_outputs_${i}[] = {${r.outputs.map(cstr).join(", ")}};`);
});
t.push(`#define AREAL_N_ROUTINES ${entries.length}`);
t.push("static const areal_routine_t AREAL_ROUTINES[] = {");
entries.forEach((r, i) => t.push(`  {${cstr(r.name)}, ${cstr(r.exportName)}, ${r.inputs.length}, areal_inputs_${i}, ${r.outputs.length}, areal_outputs_${i}},`));
t.push("};", "");
const st = Object.entries(STATUS_WORDS);
t.push(`#define AREAL_FIRST_ERROR ${FIRST_ERROR}`, `#define AREAL_N_STATUS ${st.length}`);
t.push(`static const areal_status_t AREAL_STATUS[] = {${st.map(([c, w]) => `{${c}, ${cstr(w)}}`).join(", ")}};`);
t.push("", "#endif", "");
writeFileSync(join(outDir, "areal_table.h"), t.join("\n"));

// ---- compile ----
const exe = join(outDir, "areal-native");
const tmpExe = `${exe}.tmp`;
// The wasm2c runtime (memory allocation, traps) is host glue, not numeric code: it needs POSIX and GNU
// extensions (mmap, alloca), so it is compiled on its own as gnu99; the translated module and the runner are C99.
const rtObj = join(outDir, "wasm-rt-impl.o");
const rtArgs = ["-O2", "-std=gnu99", "-ffp-contract=off", "-DWASM_RT_MEMCHECK_SIGNAL_HANDLER=0", "-I", runtime.header, "-I", runtime.impl,
  "-c", join(runtime.impl, "wasm-rt-impl.c"), "-o", rtObj];
const args = [...CFLAGS, "-I", outDir, "-I", runtime.header, "-I", runtime.impl,
  join(outDir, "areal.c"), join(root, "native", "runner.c"), rtObj, "-lm", "-o", tmpExe];
for (const a of [rtArgs, args]) {
  try {
    execFileSync(cc, a, { stdio: "inherit" });
  } catch {
    say(`the C compiler failed: ${cc} ${a.join(" ")}`);
    process.exit(1);
  }
}
renameSync(tmpExe, exe);
const ccVersion = execFileSync(cc, ["--version"], { encoding: "utf8" }).split("\n")[0];
const sha256 = createHash("sha256").update(readFileSync(wasm)).digest("hex");
writeFileSync(join(outDir, "build.json"), JSON.stringify({ module: "build/areal.wasm", sha256, wasm2c: w2cVersion, cc: ccVersion, cflags: CFLAGS }, null, 2) + "\n");
say(`built build/native/areal-native (${exportsFound.length} exports; ${ccVersion}; ${CFLAGS.join(" ")})`);
