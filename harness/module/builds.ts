/**
 * Build selection: every way the harness can run the kernels, behind the one `Kernels` interface.
 *   f64     the release WebAssembly module (default)
 *   f32     the single-precision WebAssembly module (same source, real = f32)
 *   debug   the unoptimised WebAssembly module with assertions
 *   js      the same assembly/*.ts sources run as JavaScript on the host Math (jsbuild.ts)
 *   native  the kernels translated to C by wasm2c and compiled into a shared library (`npm run build:native`),
 *           loaded in this process through koffi (library.ts)
 */
import { createHash } from "node:crypto";
import { copyFileSync, existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { isMainThread, threadId } from "node:worker_threads";
import { BUILD_DIR, BUILD_FILES } from "../core/paths.js";
import { loadBuild, ModuleError, type Kernels } from "./load.js";
import { loadJsBuild } from "./jsbuild.js";
import { readSignatures, checkKernelSignatures, ABI_VERSION, type ExportInfo } from "./signatures.js";
import { loadBounded, DEFAULT_CALL_LIMIT_S } from "./bounded.js";
import { ROUTINES } from "./routines.js";
import { openLibrary } from "./library.js";

/** The built-in builds, in the order help text lists them. */
export const BUILDS = ["f64", "f32", "js", "native", "debug"] as const;
export type BuildName = (typeof BUILDS)[number];

export const BUILD_SUMMARY: Readonly<Record<BuildName, string>> = {
  f64: "release WebAssembly module (build/areal.wasm)",
  f32: "single-precision WebAssembly module (build/areal-f32.wasm)",
  js: "same sources as JavaScript on the host Math",
  native: "the kernels via wasm2c and the C compiler, a shared library loaded in-process (build/native/libareal-native.so)",
  debug: "unoptimised WebAssembly module with assertions",
};

export function isBuildName(s: string): s is BuildName {
  return (BUILDS as readonly string[]).includes(s);
}

/** Load a built-in build by name. */
export function loadNamedBuild(name: BuildName): Kernels {
  switch (name) {
    case "js":
      return loadJsBuild("js");
    case "native":
      return loadNative();
    default:
      return loadBuild(name);
  }
}

/**
 * An external module (`--module`): its kernels and the exact signature of every export (from the binary). The
 * core exports and every kernel export the routine table knows are checked before any call (the same message
 * for every command), and the module runs in a worker thread of its own with every call, its start function
 * included, limited to `callLimitS` seconds (bounded.ts).
 */
export function loadModule(path: string, callLimitS = DEFAULT_CALL_LIMIT_S): { kernels: Kernels; signatures: Map<string, ExportInfo> } {
  if (!existsSync(path)) throw new ModuleError(`--module: no such file: ${path}`);
  const bytes = readFileSync(path);
  if (!WebAssembly.validate(bytes)) {
    try {
      new WebAssembly.Module(bytes);
    } catch (err) {
      throw new ModuleError(`${path}: not a WebAssembly module (${(err as Error).message})`);
    }
  }
  let signatures: Map<string, ExportInfo>;
  try {
    signatures = readSignatures(bytes, path);
  } catch (err) {
    throw new ModuleError((err as Error).message);
  }
  const kernels = loadBounded(path, callLimitS);
  try {
    checkKernelSignatures(signatures, kernels.realBytes, ROUTINES, path);
    if (kernels.has("areal_abi_version")) {
      const v = kernels.call("areal_abi_version", []);
      if (v !== ABI_VERSION) throw new ModuleError(`${path}: areal_abi_version() returned ${v}; this harness implements ABI version ${ABI_VERSION} (docs/abi.md)`);
    }
  } catch (err) {
    kernels.close?.();
    throw err instanceof ModuleError ? err : new ModuleError((err as Error).message);
  }
  return { kernels, signatures };
}

// ---------------------------------------------------------------------------------------------------------
// native

export const NATIVE_DIR = join(BUILD_DIR, "native");
export const NATIVE_LIB = join(NATIVE_DIR, "libareal-native.so");

/** Why the native build cannot run here, or undefined when it can. */
export function nativeUnavailable(): string | undefined {
  const info = join(NATIVE_DIR, "build.json");
  if (!existsSync(NATIVE_LIB) || !existsSync(info)) return "the native build is missing (build/native/libareal-native.so): run 'npm run build:native' (needs a C compiler: cc, gcc or clang)";
  if (!existsSync(BUILD_FILES.f64)) return "build/areal.wasm is missing: run 'npm run build' then 'npm run build:native'";
  const { release_sha256: was } = JSON.parse(readFileSync(info, "utf8")) as { release_sha256?: string };
  const now = createHash("sha256").update(readFileSync(BUILD_FILES.f64)).digest("hex");
  if (was !== now) return "the native build is stale (build/areal.wasm changed since it was built): run 'npm run build:native'";
  return undefined;
}

/**
 * The native build as Kernels: the shared library opened in this process through the same FFI path as
 * `--library` (library.ts), but without a child process: it is areal's own code, translated from the module.
 * Opened once per process; every caller shares the one instance (its output region is static storage).
 */
let nativeOpen: Kernels | undefined;
export function loadNative(label = "native"): Kernels {
  const why = nativeUnavailable();
  if (why) throw new ModuleError(why);
  nativeOpen ??= isMainThread ? openLibrary(NATIVE_LIB, label).kernels : openPrivateCopy(label);
  if (nativeOpen.realBytes !== 8) throw new ModuleError(`${label}: the native library reports ${nativeOpen.realBytes}-byte reals; only the f64 module is translated`);
  return nativeOpen;
}

/**
 * A worker thread's own instance: the library's output region and module memory are static storage, shared by
 * every thread that opens the same file, so each worker opens its own copy (a file is loaded once per path; the
 * copy is unlinked once loaded).
 */
function openPrivateCopy(label: string): Kernels {
  const dir = mkdtempSync(join(tmpdir(), "areal-native-"));
  const copy = join(dir, `libareal-native-${threadId}.so`);
  try {
    copyFileSync(NATIVE_LIB, copy);
    return openLibrary(copy, label).kernels;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

