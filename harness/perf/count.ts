/**
 * `areal count`: exact retired-instruction counts per kernel call on real instruction sets.
 *
 * Method (measured recipe in the project notes; tools in toolchain.ts):
 *   1. wasm2c (wabt) translates the module to C; the C compiler of each target builds it with the wasm2c runtime
 *      (bare metal: a copy of the runtime with two fixes, see runtimeDir).
 *   2. A C driver generated per kernel (driverSource) instantiates the module and calls the kernel N times with
 *      the case's inputs (bit-exact constants). Its two arguments are fixed-width ("0"/"1" for typical/worst,
 *      N in seven digits), and it runs with an empty environment, so libc start-up costs the same in every run.
 *   3. QEMU runs it with areal's plugin (count/insn-plugin.c), which prints the instructions retired. The count
 *      of one call is (count at N = 2000 - count at N = 1000) / 1000: start-up, instantiation and exit cancel.
 *      The driver's exit code is the kernel's status, checked against the expected class (ok or error).
 *   4. Cortex-M4F only: the size of each kernel's image (arm-none-eabi-size, linked with --gc-sections, so only
 *      what the kernel reaches) minus an image that instantiates the module and calls nothing.
 * Inputs: vectors/count-inputs.json (typical and worst inputs per export, with the argument for the worst).
 */
import { execFile } from "node:child_process";
import { existsSync, mkdirSync, renameSync, readFileSync } from "node:fs";
import { basename, join } from "node:path";
import { promisify } from "node:util";
import { BUILD_DIR, ROOT, VECTORS_DIR } from "../core/paths.js";
import { writeAtomic } from "../core/atomic.js";
import { abiExport, choicesOf } from "../module/routines.js";
import { TARGET_SPECS, WASM2C_RUNTIME, COMMON_CFLAGS, onPath, type TargetName } from "./toolchain.js";

const run = promisify(execFile);
export const COUNT_DIR = join(BUILD_DIR, "count");
export const INPUTS_FILE = join(VECTORS_DIR, "count-inputs.json");
export const PLUGIN_SOURCE = join(ROOT, "harness", "perf", "count", "insn-plugin.c");
/** The two call counts whose difference is 1000 calls. */
export const N_LOW = 1000;
export const N_HIGH = 2000;

/** One input case: the export's arguments by parameter name (an enumeration by its word), an optional setup call. */
export interface CountCase {
  readonly args: Readonly<Record<string, number | string>>;
  readonly setup?: { readonly export: string; readonly args: Readonly<Record<string, number | string>> };
  /** Why these inputs: for a worst case, the argument from the iteration caps and the code paths. */
  readonly why: string;
  /** For a worst case: how it was found (count-screen.ts). */
  readonly measured?: string;
}
export interface KernelInputs {
  readonly typical: CountCase;
  readonly worst: CountCase;
  /** The worst case of a single-precision module, where `worst` leaves its domain once rounded to f32. */
  readonly worst_f32?: CountCase;
}

/** The worst case for a module: worst_f32 when the export takes f32 arguments and the file has one. */
export function worstFor(inp: KernelInputs, sig: Signature | undefined): CountCase {
  return inp.worst_f32 !== undefined && sig?.params.includes("f32") ? inp.worst_f32 : inp.worst;
}

/** The typical and worst inputs of every export (vectors/count-inputs.json). */
export function readCountInputs(file = INPUTS_FILE): Record<string, KernelInputs> {
  const j = JSON.parse(readFileSync(file, "utf8")) as { kernels: Record<string, KernelInputs> };
  return j.kernels;
}

type CType = "f64" | "f32" | "u32" | "u64";
export interface Signature {
  readonly symbol: string;
  readonly params: readonly CType[];
}

/** Translate a module with wasm2c into dir/NAME.c and .h; the signatures of its exports, from the header. */
export async function translate(wasm: string, dir: string, name: string): Promise<Map<string, Signature>> {
  mkdirSync(dir, { recursive: true });
  await run("wasm2c", [wasm, "-n", "areal", "-o", join(dir, `${name}.c`)]);
  const header = readFileSync(join(dir, `${name}.h`), "utf8").split("\n");
  const sigs = new Map<string, Signature>();
  for (let i = 0; i + 1 < header.length; i++) {
    const m = /^\/\* export: '([^']+)' \*\/$/.exec(header[i]!);
    const p = /^u32 (\w+)\(Z_areal_instance_t\*((?:, (?:f64|f32|u32|u64))*)\);$/.exec(header[i + 1] ?? "");
    if (!m || !p) continue;
    sigs.set(m[1]!, { symbol: p[1]!, params: p[2] ? (p[2].slice(2).split(", ") as CType[]) : [] });
  }
  return sigs;
}

/** The C constant of one argument, bit-exact: f64 and f32 as their bit patterns. */
function constant(t: CType, v: number): string {
  const dv = new DataView(new ArrayBuffer(8));
  if (t === "f64") {
    dv.setFloat64(0, v);
    return `f64_of(0x${dv.getBigUint64(0).toString(16).padStart(16, "0")}ull)`;
  }
  if (t === "f32") {
    dv.setFloat32(0, v);
    return `f32_of(0x${dv.getUint32(0).toString(16).padStart(8, "0")}u)`;
  }
  return `${v >>> 0}u`;
}

/** The argument values of a call in parameter order (missing ones take the ABI default). */
export function argValues(exportName: string, given: Readonly<Record<string, number | string>>): number[] {
  const x = abiExport(exportName);
  for (const k of Object.keys(given)) if (!x.params.some((p) => p.name === k)) throw new Error(`count inputs: ${exportName} has no parameter ${k}`);
  return x.params.map((p) => {
    const v = given[p.name] ?? p.default;
    if (v === undefined) throw new Error(`count inputs: ${exportName} needs ${p.name}`);
    if (typeof v === "string") {
      const e = p.enum !== undefined ? choicesOf(p.enum)[v] : undefined;
      if (e === undefined) throw new Error(`count inputs: ${exportName}.${p.name}: '${v}' is not a word of its enumeration`);
      return e;
    }
    return v;
  });
}

function callText(sig: Signature, exportName: string, given: Readonly<Record<string, number | string>>): { decl: string; call: string } {
  const vals = argValues(exportName, given);
  if (vals.length !== sig.params.length) throw new Error(`count: ${exportName} takes ${sig.params.length} arguments in the module, the ABI table has ${vals.length}`);
  const decl = vals.map((v, i) => `  const ${sig.params[i] === "f64" ? "double" : sig.params[i] === "f32" ? "float" : "uint32_t"} a${i} = ${constant(sig.params[i]!, v)};`).join("\n");
  return { decl, call: `${sig.symbol}(&inst${vals.map((_, i) => `, a${i}`).join("")})` };
}

/**
 * The C driver of one kernel: argument 1 picks the case (0 typical, 1 worst; a driver without cases
 * instantiates and calls nothing), argument 2 is N in seven digits. Only the last two arguments are read (semihosting adds its own).
 * The exit code is the status of the last call.
 */
export function driverSource(header: string, sigs: Map<string, Signature>, exportName: string | undefined, cases: readonly CountCase[] = []): string {
  const l = [`/* Generated by harness/perf/count.ts (areal count). Do not edit. */`, "#include <stdint.h>", "#include <string.h>", `#include "${header}"`,
    "static Z_areal_instance_t inst;",
    "static double f64_of(uint64_t b) { double d; memcpy(&d, &b, 8); return d; }",
    "static float f32_of(uint32_t b) { float f; memcpy(&f, &b, 4); return f; }"];
  // One function per case, never inlined: a case's loop compiles the same whatever the other cases hold.
  if (exportName !== undefined) {
    const sig = sigs.get(exportName)!;
    cases.forEach((cs, c) => {
      l.push(`static __attribute__((noinline)) uint32_t case_${c}(uint32_t n) {`, "  uint32_t s = 0;");
      if (cs.setup) {
        const ss = sigs.get(cs.setup.export);
        if (!ss) throw new Error(`count inputs: ${exportName}: the module has no setup export ${cs.setup.export}`);
        const st = callText(ss, cs.setup.export, cs.setup.args);
        l.push("  {", st.decl, `  if (${st.call} >= 16u) return 99u;`, "  }");
      }
      const t = callText(sig, exportName, cs.args);
      l.push(t.decl, `  for (uint32_t i = 0; i < n; i++) s = ${t.call};`, "  return s;", "}");
    });
  }
  l.push("static uint32_t run_case(int c, uint32_t n) {", "  (void)c; (void)n; (void)f64_of; (void)f32_of;");
  cases.forEach((_, c) => l.push(`  if (c == ${c}) return case_${c}(n);`));
  l.push("  return 0;", "}", "int main(int argc, char **argv) {",
    "  if (argc < 3 || strlen(argv[argc - 1]) != 7) return 100;",
    "  const char *nd = argv[argc - 1];", "  uint32_t n = 0;",
    "  for (int i = 0; i < 7; i++) n = n * 10u + (uint32_t)(nd[i] - '0');",
    "  wasm_rt_init();", "  Z_areal_init_module();", "  Z_areal_instantiate(&inst);",
    "  int c = 0;", "  for (const char *p = argv[argc - 2]; *p; p++) c = c * 10 + (*p - '0');",
    "  return (int)run_case(c, n);", "}", "");
  return l.join("\n");
}

/**
 * The wasm2c runtime for a target: Debian's files as they are, or for bare metal a patched copy in
 * build/count/rt-bare/: arm-none-eabi uses short enums, so va_arg must read the promoted int, not
 * wasm_rt_type_t (else a hard fault at instantiate); and <sys/mman.h> is a stub (the 32-bit runtime
 * bounds-checks and never maps memory).
 */
export function runtimeDir(bareMetal: boolean): string {
  if (!bareMetal) return WASM2C_RUNTIME;
  const dir = join(COUNT_DIR, "rt-bare");
  mkdirSync(join(dir, "sys"), { recursive: true });
  for (const f of ["wasm-rt.h", "wasm-rt-impl.h"]) keep(join(dir, f), readFileSync(join(WASM2C_RUNTIME, f), "utf8"));
  const src = readFileSync(join(WASM2C_RUNTIME, "wasm-rt-impl.c"), "utf8");
  const fixed = src.replaceAll("va_arg(args, wasm_rt_type_t)", "(wasm_rt_type_t)va_arg(args, int)");
  if (fixed === src) throw new Error("count: the wasm2c runtime changed (no va_arg(args, wasm_rt_type_t) to fix); check the bare-metal patch");
  keep(join(dir, "wasm-rt-impl.c"), fixed);
  keep(join(dir, "sys", "mman.h"), [
    "/* areal count: bare metal has no mmap; the 32-bit wasm2c runtime bounds-checks and never calls these. */",
    "#define PROT_NONE 0", "#define PROT_READ 1", "#define PROT_WRITE 2", "#define MAP_PRIVATE 2", "#define MAP_ANONYMOUS 0x20",
    "#define MAP_FAILED ((void *)-1)",
    "static inline void *mmap(void *a, unsigned long n, int p, int f, int d, long o) { (void)a; (void)n; (void)p; (void)f; (void)d; (void)o; return MAP_FAILED; }",
    "static inline int munmap(void *a, unsigned long n) { (void)a; (void)n; return -1; }",
    "static inline int mprotect(void *a, unsigned long n, int p) { (void)a; (void)n; (void)p; return -1; }", ""].join("\n"));
  return dir;
}

/**
 * Write a file only when its text differs, through a rename: compilers running at the same time (two kernels
 * at once, or another count) never read a half-written header.
 */
function keep(path: string, text: string): void {
  if (existsSync(path) && readFileSync(path, "utf8") === text) return;
  writeAtomic(path, text);
}

/** Build the plugin (host gcc) into build/count/, once per run. */
export async function buildPlugin(dir = COUNT_DIR): Promise<string> {
  mkdirSync(dir, { recursive: true });
  const out = join(dir, "insn-plugin.so");
  // Built beside, then renamed: a count running at the same time keeps loading a whole file.
  const tmp = `${out}.${process.pid}.tmp`;
  await run("gcc", ["-O2", "-shared", "-fPIC", "-o", tmp, PLUGIN_SOURCE]);
  renameSync(tmp, out);
  return out;
}

/** The module and runtime objects of one target and one build, in dir. */
export async function buildObjects(target: TargetName, dir: string, name: string): Promise<string[]> {
  const spec = TARGET_SPECS[target];
  const rt = runtimeDir(spec.bareMetal);
  const flags = [...COMMON_CFLAGS, ...spec.cflags, "-w", "-I", rt, "-I", dir];
  const mod = join(dir, `${name}.${target}.o`);
  const rto = join(dir, `rt.${target}.o`);
  await run(spec.cc, [...flags, "-c", join(dir, `${name}.c`), "-o", mod], { maxBuffer: 1 << 24 });
  await run(spec.cc, [...flags, "-c", join(rt, "wasm-rt-impl.c"), "-o", rto]);
  return [mod, rto];
}

/** Compile and link one driver into an image. */
export async function linkDriver(target: TargetName, dir: string, driverC: string, objects: readonly string[], image: string): Promise<void> {
  const spec = TARGET_SPECS[target];
  const rt = runtimeDir(spec.bareMetal);
  await run(spec.cc, [...COMMON_CFLAGS, ...spec.cflags, "-w", "-I", rt, "-I", dir, driverC, ...objects, ...spec.ldflags, "-lm", "-o", image]);
}

/** The instruction classes the plugin reports (count/insn-plugin.c classify()), in its order. */
export const INSN_CLASSES = ["fdiv", "fp", "mem", "branch", "int"] as const;
export type InsnClass = (typeof INSN_CLASSES)[number];

/** The plugin's "areal-class NAME N" lines; every class must be there (an older plugin build is an error). */
function classCounts(stderr: string, target: TargetName): Record<InsnClass, number> {
  const out = {} as Record<InsnClass, number>;
  for (const c of INSN_CLASSES) {
    const m = new RegExp(`areal-class ${c} (\\d+)`).exec(stderr);
    if (!m) throw new Error(`count: ${target}: the plugin reported no '${c}' class count (rebuild build/count/insn-plugin.so)`);
    out[c] = Number(m[1]);
  }
  return out;
}

/** Run one image under QEMU with an empty environment: the instructions retired (in all, by class) and the exit code. */
export async function countRun(target: TargetName, image: string, caseIndex: number, n: number, plugin: string): Promise<{ insns: number; classes: Record<InsnClass, number>; code: number }> {
  const [cmd, ...args] = TARGET_SPECS[target].command(image, [String(caseIndex), String(n).padStart(7, "0")], plugin);
  const exe = onPath(cmd!) ?? cmd!;
  let stderr = "";
  let code = 0;
  try {
    const r = await run(exe, args, { env: {}, maxBuffer: 1 << 20 });
    stderr = r.stderr;
  } catch (err) {
    const e = err as { code?: number; stderr?: string };
    if (typeof e.code !== "number") throw err;
    code = e.code;
    stderr = e.stderr ?? "";
  }
  const m = /areal-insns (\d+)/.exec(stderr);
  if (!m) throw new Error(`count: ${target}: no count from ${cmd} (${stderr.trim().slice(0, 200)})`);
  return { insns: Number(m[1]), classes: classCounts(stderr, target), code };
}

/** Instructions of one call of case c: the difference of N_HIGH and N_LOW calls over their difference. */
export async function perCall(target: TargetName, image: string, c: number, plugin: string, stateful = false): Promise<{ insns: number; classes: Record<InsnClass, number>; status: number }> {
  const lo = await countRun(target, image, c, N_LOW, plugin);
  const hi = await countRun(target, image, c, N_HIGH, plugin);
  if (lo.code !== hi.code) throw new Error(`count: ${target}: ${basename(image)} case ${c}: exit codes differ (${lo.code}, ${hi.code})`);
  const d = hi.insns - lo.insns;
  const n = N_HIGH - N_LOW;
  // A kernel that continues a state (integrate_step) may differ call to call (software floating point on
  // cortex-m4f): its count is the mean over the calls, rounded up; a stateless kernel's must be whole.
  const per = (x: number): number => (stateful ? Math.ceil(x / n) : x / n);
  const classes = Object.fromEntries(INSN_CLASSES.map((k) => [k, per(hi.classes[k] - lo.classes[k])])) as Record<InsnClass, number>;
  if (stateful) return { insns: per(d), classes, status: lo.code };
  if (d % n !== 0) throw new Error(`count: ${target}: ${basename(image)} case ${c}: ${d} instructions over ${n} calls is not a whole number per call`);
  return { insns: d / n, classes, status: lo.code };
}

