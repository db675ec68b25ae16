// `npm run build:native` (also run by `npm install`): areal's own kernels as native code, a shared library
// build/native/libareal-native.so with the ABI of include/areal.h, loaded in-process through koffi for
// `--build native` (harness/module/builds.ts).
//
//   1. asc compiles assembly/index.ts with the release options plus `--disable bulk-memory --disable
//      nontrapping-f2i` (build/native/areal-native.wasm): the npm package wasm2c (an Emscripten build of an early
//      wabt wasm2c, a dependency, so `npm install` brings it) predates those two features. Neither changes a
//      floating-point operation; tests/builds-native.test.ts and `areal compare --builds f64,native` prove the
//      native library's bits equal the release module's on every vector case.
//   2. wasm2c translates it to C (areal_w2c.c, areal_w2c.h) with its runtime (wasm-rt-impl.c).
//   3. A generated wrapper (areal_lib.c) exports each kernel under its ABI name, calls the module's start once
//      when the library loads, and gives areal_out() as a pointer into the module's memory.
//   4. The C compiler ($CC, cc, gcc or clang) builds the shared library.
//
// Compiler flags: -O2 -std=c99 -ffp-contract=off. The last one matters: with contraction on, the compiler may fuse
// a * b + c into one fused multiply-add (one rounding instead of two) wherever the target has FMA (for example with
// -march=native on a recent x86-64, or by default on AArch64), and the results stop matching the WebAssembly
// module's bits. WebAssembly itself never fuses. Do not add -ffast-math or -Ofast for the same reason.
//
// Where no C compiler is found it says so in one line and exits 0 (the rest of areal does not need it);
// `--require` (or AREAL_REQUIRE_NATIVE=1) makes that an error, for CI.
import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync, statSync, renameSync } from "node:fs";
import { delimiter, dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const outDir = join(root, "build", "native");
const require_ = process.argv.includes("--require") || process.env.AREAL_REQUIRE_NATIVE === "1";

export const CFLAGS = ["-O2", "-std=c99", "-ffp-contract=off"];
/** The asc options of the native-source module on top of the release target. */
export const ASC_EXTRA = ["--disable", "bulk-memory", "--disable", "nontrapping-f2i"];

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

const w2cDir = join(root, "node_modules", "wasm2c");
if (!existsSync(join(w2cDir, "wasm2c.js"))) unavailable("the npm package wasm2c is not installed (run 'npm install')");
const cc = process.env.CC ?? onPath(["cc", "gcc", "clang"]);
if (!cc) unavailable("no C compiler found (cc, gcc, clang or $CC; on Debian: apt-get install gcc)");

mkdirSync(outDir, { recursive: true });
const release = join(root, "build", "areal.wasm");
// The release module is hashed once: the up-to-date check and build.json take the same value.
const currentSha = existsSync(release) ? createHash("sha256").update(readFileSync(release)).digest("hex") : undefined;
const infoPath = join(outDir, "build.json");
if (!process.argv.includes("--force") && existsSync(join(outDir, "libareal-native.so")) && existsSync(infoPath)
  && currentSha !== undefined && JSON.parse(readFileSync(infoPath, "utf8")).release_sha256 === currentSha) {
  say("build/native/libareal-native.so is up to date (build/areal.wasm unchanged; --force rebuilds)");
  process.exit(0);
}
const wasm = join(outDir, "areal-native.wasm");
execFileSync(join(root, "node_modules", ".bin", "asc"), ["assembly/index.ts", "--target", "release", ...ASC_EXTRA, "--outFile", wasm, "--textFile", join(outDir, "areal-native.wat")], { cwd: root, stdio: "inherit" });
execFileSync(process.execPath, [join(w2cDir, "wasm2c.js"), wasm, "-o", join(outDir, "areal_w2c.c")], { cwd: outDir, stdio: "inherit" });

// ---- the wrapper: every exported function of the translated module under its ABI name ----
const header = readFileSync(join(outDir, "areal_w2c.h"), "utf8").split("\n");
const ctype = { f64: "double", f32: "float", u32: "int32_t" };
const fns = [];
for (let i = 0; i + 1 < header.length; i++) {
  const m = /^\/\* export: '([^']+)' \*\/$/.exec(header[i]);
  if (!m) continue;
  const proto = /^extern u32 \(\*WASM_RT_ADD_PREFIX\((\w+)\)\)\(([^)]*)\);$/.exec(header[i + 1]);
  if (!proto) continue; // the memory, or a non-i32 result
  const params = proto[2] === "void" || proto[2] === "" ? [] : proto[2].split(", ");
  if (!params.every((p) => p in ctype)) continue;
  fns.push({ name: m[1], sym: proto[1], params });
}
if (!fns.some((f) => f.name === "areal_out")) unavailable("the translated module has no areal_out export (wasm2c output not understood)");
const w = [];
w.push("/* Generated by scripts/build-native.mjs from the wasm2c translation of the release kernels. Do not edit. */");
w.push("#include <stdint.h>", '#include "areal_w2c.h"', "", '#define AREAL_EXPORT __attribute__((visibility("default")))', "");
w.push("/* The module's start (data segments, globals) runs once, when the library is loaded. */");
w.push("__attribute__((constructor)) static void areal_native_start(void) { init(); }", "");
w.push("AREAL_EXPORT double *areal_out(void) { return (double *)(void *)(Z_memory->data + Z_areal_outZ_iv()); }");
for (const f of fns) {
  if (f.name === "areal_out") continue;
  const decl = f.params.map((p, j) => `${ctype[p]} a${j}`).join(", ") || "void";
  const args = f.params.map((p, j) => (p === "u32" ? `(u32)a${j}` : `a${j}`)).join(", ");
  w.push(`AREAL_EXPORT int32_t ${f.name}(${decl}) { return (int32_t)${f.sym}(${args}); }`);
}
// Batch entry points, one per kernel (not part of include/areal.h; library.ts uses them when it finds them):
// areal_rows_NAME(rows, args, n_out, out, status) calls NAME once per row, row r's arguments at
// args[r * NPARAMS ...] (as doubles; integer parameters converted), its status to status[r] and its first n_out
// output slots to out[r * n_out ...]. One foreign call per chunk of rows instead of one per row.
w.push("", "#include <stddef.h>");
for (const f of fns) {
  if (f.name === "areal_out" || f.params.length === 0) continue;
  const np = f.params.length;
  const args = f.params.map((p, j) => (p === "u32" ? `(u32)(int32_t)a[${j}]` : p === "f32" ? `(f32)a[${j}]` : `a[${j}]`)).join(", ");
  w.push(`AREAL_EXPORT int32_t areal_rows_${f.name}(int32_t rows, const double *args, int32_t n_out, double *out, int32_t *status) {`,
    `  for (int32_t r = 0; r < rows; r++) {`,
    `    const double *a = args + (size_t)r * ${np};`,
    `    status[r] = (int32_t)${f.sym}(${args});`,
    `    const double *o = areal_out();`,
    `    for (int32_t i = 0; i < n_out; i++) out[(size_t)r * n_out + i] = o[i];`,
    `  }`,
    `  return rows;`,
    `}`);
}
w.push("");
writeFileSync(join(outDir, "areal_lib.c"), w.join("\n"));

// ---- compile ----
const lib = join(outDir, "libareal-native.so");
const tmp = `${lib}.tmp`;
const args = [...CFLAGS, "-shared", "-fPIC", "-fvisibility=hidden", "-I", outDir, "-I", w2cDir,
  join(outDir, "areal_w2c.c"), join(outDir, "areal_lib.c"), join(w2cDir, "wasm-rt-impl.c"), "-lm", "-o", tmp];
try {
  execFileSync(cc, args, { stdio: ["ignore", "inherit", "inherit"] });
} catch {
  say(`the C compiler failed: ${cc} ${args.join(" ")}`);
  process.exit(require_ ? 1 : 0);
}
renameSync(tmp, lib);
const ccVersion = execFileSync(cc, ["--version"], { encoding: "utf8" }).split("\n")[0];
const sha256 = currentSha;
const w2cVersion = JSON.parse(readFileSync(join(w2cDir, "package.json"), "utf8")).version;
writeFileSync(join(outDir, "build.json"), JSON.stringify({ library: "build/native/libareal-native.so", release_sha256: sha256, asc_extra: ASC_EXTRA, wasm2c: `npm wasm2c ${w2cVersion}`, cc: ccVersion, cflags: CFLAGS }, null, 2) + "\n");
say(`built build/native/libareal-native.so (${fns.length - 1} exports; ${ccVersion}; ${CFLAGS.join(" ")})`);
