/**
 * Build selection: every way the harness can run the kernels, behind the one `Kernels` interface.
 *   f64     the release WebAssembly module (default)
 *   f32     the single-precision WebAssembly module (same source, real = f32)
 *   debug   the unoptimised WebAssembly module with assertions
 *   js      the same assembly/*.ts sources run as JavaScript on the host Math (jsbuild.ts)
 *   native  the release module translated to C by wasm2c and compiled (`npm run build:native`), driven
 *           through a pair of named pipes with a fixed binary protocol (native/runner.c)
 */
import { execFileSync, spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { closeSync, existsSync, mkdtempSync, openSync, readFileSync, readSync, rmSync, writeSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { BUILD_DIR, BUILD_FILES } from "../core/paths.js";
import { loadBuild, loadFile, ModuleError, type Kernels } from "./load.js";
import { loadJsBuild } from "./jsbuild.js";
import { readSignatures, ABI_VERSION, OUT_SLOTS, type ExportInfo } from "./signatures.js";

/** The built-in builds, in the order help text lists them. */
export const BUILDS = ["f64", "f32", "js", "native", "debug"] as const;
export type BuildName = (typeof BUILDS)[number];

export const BUILD_SUMMARY: Readonly<Record<BuildName, string>> = {
  f64: "release WebAssembly module (build/areal.wasm)",
  f32: "single-precision WebAssembly module (build/areal-f32.wasm)",
  js: "same sources as JavaScript on the host Math",
  native: "release module via wasm2c and the C compiler (build/native/areal-native)",
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

/** An external module: its kernels and the exact signature of every export (from the binary). */
export function loadModule(path: string): { kernels: Kernels; signatures: Map<string, ExportInfo> } {
  if (!existsSync(path)) throw new ModuleError(`--module: no such file: ${path}`);
  const bytes = readFileSync(path);
  let signatures: Map<string, ExportInfo>;
  try {
    signatures = readSignatures(bytes, path);
  } catch (err) {
    throw new ModuleError((err as Error).message);
  }
  const kernels = loadFile(path);
  if (kernels.has("areal_abi_version")) {
    const v = kernels.call("areal_abi_version", []);
    if (v !== ABI_VERSION) throw new ModuleError(`${path}: areal_abi_version() returned ${v}; this harness implements ABI version ${ABI_VERSION} (docs/abi.md)`);
  }
  return { kernels, signatures };
}

// ---------------------------------------------------------------------------------------------------------
// native

export const NATIVE_DIR = join(BUILD_DIR, "native");
export const NATIVE_EXE = join(NATIVE_DIR, "areal-native");

/** Why the native build cannot run here, or undefined when it can. */
export function nativeUnavailable(): string | undefined {
  if (!existsSync(NATIVE_EXE)) return "the native build is missing (build/native/areal-native): run 'npm run build:native' (needs wasm2c from the 'wabt' package and a C compiler)";
  const infoPath = join(NATIVE_DIR, "build.json");
  if (!existsSync(infoPath) || !existsSync(BUILD_FILES.f64)) return "the native build has no build.json or build/areal.wasm is missing: run 'npm run build' then 'npm run build:native'";
  const info = JSON.parse(readFileSync(infoPath, "utf8")) as { sha256?: string };
  const now = createHash("sha256").update(readFileSync(BUILD_FILES.f64)).digest("hex");
  if (info.sha256 !== now) return "the native build is stale (build/areal.wasm changed since it was translated): run 'npm run build:native'";
  return undefined;
}

const RESPONSE_BYTES = 8 + 8 * OUT_SLOTS;
const live = new Set<{ close(): void }>();

/** The native runner's export table: name -> (index, parameter count). */
function nativeExports(): Map<string, { index: number; params: string[] }> {
  const text = execFileSync(NATIVE_EXE, ["list"], { encoding: "utf8" });
  const m = new Map<string, { index: number; params: string[] }>();
  text.trim().split("\n").forEach((line, index) => {
    const [name, ...params] = line.trim().split(/\s+/);
    if (name) m.set(name, { index, params });
  });
  return m;
}

/**
 * The native build as Kernels. The runner is started once and served synchronously: a request is written to
 * one named pipe and the response read from another, both with blocking system calls, so `call` stays
 * synchronous like a WebAssembly call. The runner ends when the pipes close (closeNative, or process exit).
 */
export function loadNative(label = "native"): Kernels {
  const why = nativeUnavailable();
  if (why) throw new ModuleError(why);
  const table = nativeExports();
  const dir = mkdtempSync(join(tmpdir(), "areal-native-"));
  const reqPath = join(dir, "req");
  const respPath = join(dir, "resp");
  execFileSync("mkfifo", [reqPath, respPath]);
  const child = spawn(NATIVE_EXE, ["serve", reqPath, respPath], { stdio: ["ignore", "ignore", "inherit"] });
  child.unref();
  // Both opens block until the runner opens the other end (it opens req, then resp: the same order).
  const req = openSync(reqPath, "w");
  const resp = openSync(respPath, "r");
  const rbuf = Buffer.alloc(RESPONSE_BYTES);
  let closed = false;
  const handle = {
    close(): void {
      if (closed) return;
      closed = true;
      try {
        const end = Buffer.alloc(8);
        end.writeUInt32LE(0xffffffff, 0);
        writeSync(req, end);
      } catch {
        // the runner is gone already
      }
      closeSync(req);
      closeSync(resp);
      rmSync(dir, { recursive: true, force: true });
      live.delete(handle);
    },
  };
  live.add(handle);
  const raw = (index: number, args: readonly number[]): number => {
    if (closed) throw new ModuleError(`${label}: the native runner was closed`);
    const q = Buffer.alloc(8 + 8 * args.length);
    q.writeUInt32LE(index, 0);
    q.writeUInt32LE(args.length, 4);
    args.forEach((a, i) => q.writeDoubleLE(a, 8 + 8 * i));
    writeSync(req, q);
    let got = 0;
    while (got < RESPONSE_BYTES) {
      const n = readSync(resp, rbuf, got, RESPONSE_BYTES - got, null);
      if (n === 0) throw new ModuleError(`${label}: the native runner stopped (see its message above)`);
      got += n;
    }
    return rbuf.readInt32LE(0);
  };
  const idx = (name: string): { index: number; params: string[] } => {
    const e = table.get(name);
    if (!e) throw new ModuleError(`${label}: no export named ${name}`);
    return e;
  };
  const base = raw(idx("areal_out").index, []);
  const realBytes = raw(idx("areal_real_bytes").index, []);
  if (realBytes !== 8) throw new ModuleError(`${label}: the native runner reports ${realBytes}-byte reals; only the f64 module is translated`);
  const memory = new WebAssembly.Memory({ initial: 1, maximum: 1 });
  const out = new Float64Array(memory.buffer, base, OUT_SLOTS);
  const exportsObj: Record<string, unknown> = {};
  const call = (name: string, args: readonly number[]): number => {
    const e = idx(name);
    if (args.length !== e.params.length) throw new ModuleError(`${label}: ${name} takes ${e.params.length} arguments, got ${args.length}`);
    const st = raw(e.index, args);
    for (let i = 0; i < OUT_SLOTS; i++) out[i] = rbuf.readDoubleLE(8 + 8 * i);
    return st;
  };
  for (const name of table.keys()) exportsObj[name] = (...a: number[]): number => call(name, a);
  exportsObj.memory = memory;
  return {
    label,
    realBytes: 8,
    exportNames: [...table.keys()],
    out,
    memory,
    exports: exportsObj as WebAssembly.Exports,
    has: (name) => table.has(name),
    arity: (name) => table.get(name)?.params.length ?? -1,
    call,
  };
}

/** Stop every native runner this process started (tests call it; the runners also stop at process exit). */
export function closeNative(): void {
  for (const h of [...live]) h.close();
}
