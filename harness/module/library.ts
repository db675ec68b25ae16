/**
 * Native shared libraries (`--library FILE.so`) with the same ABI as a WebAssembly module: the names and
 * signatures of include/areal.h, `areal_out()` returning a pointer to AREAL_OUT_SLOTS reals, `areal_real_bytes()`.
 * Loaded through koffi (a foreign-function interface with prebuilt binaries in its npm package).
 *
 * A shared library has no typed exports to read, so the signature of each symbol is the one include/areal.h
 * declares for that name (a C library compiled against the header has it). A symbol the header does not name
 * is not called.
 *
 * Two ways to run one:
 *   openLibrary    in this process: for trusted code (areal's own native build, `--build native`).
 *   loadLibrary    in a child process (library-host.ts) served through two named pipes with blocking reads, so
 *                  calls stay synchronous like WebAssembly calls. A crash (a signal) ends the child, not the
 *                  harness: the call that was running is reported with its export, its inputs and the signal.
 */
import { execFileSync, spawn } from "node:child_process";
import { closeSync, existsSync, mkdtempSync, openSync, readFileSync, readSync, rmSync, writeSync } from "node:fs";
import { createRequire } from "node:module";
import { constants, tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { compiledScript } from "../core/paths.js";
import { ModuleError, setRowCaller, rowByRow, forEachRow, type Kernels } from "./load.js";
import { ROUTINES } from "./routines.js";
import { ABI_VERSION, CORE_EXPORTS, OUT_SLOTS, kernelExports, kernelSignature, type ExportInfo, type ValType } from "./signatures.js";

/** The exports found in a library: name -> parameter types ("i32", "f64" or "f32"). */
export type LibraryTable = ReadonlyMap<string, readonly ValType[]>;

interface Koffi {
  load(path: string): { func(name: string, result: string, params: string[]): (...a: number[]) => unknown };
  view(ptr: unknown, len: number): ArrayBuffer;
}

/** koffi, loaded on first use (every other command pays nothing for it). */
function koffi(): Koffi {
  try {
    return createRequire(import.meta.url)("koffi") as Koffi;
  } catch (err) {
    throw new ModuleError(`--library needs the npm package koffi (run 'npm install'): ${(err as Error).message}`);
  }
}

/** A library opened in this process: its kernels and the export table. */
export function openLibrary(path: string, label = path): { kernels: Kernels; table: LibraryTable } {
  if (!existsSync(path)) throw new ModuleError(`${label}: no such file: ${path}`);
  const ffi = koffi();
  let lib: ReturnType<Koffi["load"]>;
  try {
    lib = ffi.load(resolve(path));
  } catch (err) {
    throw new ModuleError(`${label}: not a loadable shared library (${(err as Error).message})`);
  }
  const find = (name: string, result: string, params: string[]): ((...a: number[]) => unknown) | undefined => {
    try {
      return lib.func(name, result, params);
    } catch {
      return undefined;
    }
  };
  const outFn = find("areal_out", "void *", []);
  const bytesFn = find("areal_real_bytes", "int32", []);
  if (!outFn || !bytesFn) throw new ModuleError(`${label}: the library lacks areal_out() or areal_real_bytes() (include/areal.h)`);
  const realBytes = Number(bytesFn());
  if (realBytes !== 4 && realBytes !== 8) throw new ModuleError(`${label}: areal_real_bytes() returned ${realBytes}, expected 4 or 8`);
  const ptr = outFn();
  if (ptr === null) throw new ModuleError(`${label}: areal_out() returned a null pointer`);
  const buf = ffi.view(ptr, OUT_SLOTS * realBytes);
  const out = realBytes === 8 ? new Float64Array(buf) : new Float32Array(buf);
  const real = realBytes === 8 ? "f64" : "f32";
  const fns = new Map<string, (...a: number[]) => number>();
  const table = new Map<string, readonly ValType[]>();
  const cType = (t: string): string => (t === "i32" ? "int32" : t === "f64" ? "double" : "float");
  const add = (name: string, params: readonly ValType[]): void => {
    const fn = find(name, "int32", params.map(cType));
    if (!fn) return;
    fns.set(name, fn as (...a: number[]) => number);
    table.set(name, params);
  };
  for (const c of CORE_EXPORTS) if (c.name !== "areal_out") add(c.name, []);
  for (const [name, { inputs }] of kernelExports(ROUTINES)) add(name, kernelSignature(inputs, real).params);
  if (fns.has("areal_abi_version")) {
    const v = fns.get("areal_abi_version")!();
    if (v !== ABI_VERSION) throw new ModuleError(`${label}: areal_abi_version() returned ${v}; this harness implements ABI version ${ABI_VERSION} (docs/abi.md)`);
  }
  const kernels = tableKernels(label, realBytes, out, table, (name, args) => fns.get(name)!(...args));
  // The batch entry points areal_rows_NAME (scripts/build-native.mjs generates them beside the module): one
  // foreign call per chunk of rows, the typed arrays passed by reference.
  const rowFns = new Map<string, (...a: unknown[]) => number>();
  if (realBytes === 8) {
    for (const name of table.keys()) {
      const fn = find(`areal_rows_${name}`, "int32", ["int32", "double *", "int32", "double *", "int32 *"]);
      if (fn) rowFns.set(name, fn as (...a: unknown[]) => number);
    }
  }
  if (rowFns.size > 0) {
    const each = rowByRow(kernels);
    setRowCaller(kernels, (name, args, na, rows, o, nOut, status) => {
      const fn = rowFns.get(name);
      if (!fn || nOut > OUT_SLOTS) return each(name, args, na, rows, o, nOut, status);
      if (na !== table.get(name)!.length) throw new ModuleError(`${label}: ${name} takes ${table.get(name)!.length} arguments, got ${na}`);
      fn(rows, args, nOut, o, status);
    });
  }
  return { kernels, table };
}

/** Kernels over a table of exports and a function that calls one (checks the name and the argument count). */
function tableKernels(label: string, realBytes: 4 | 8, out: Float64Array | Float32Array, table: LibraryTable, raw: (name: string, args: readonly number[]) => number): Kernels {
  const call = (name: string, args: readonly number[]): number => {
    const params = table.get(name);
    if (!params) throw new ModuleError(`${label}: no export named ${name}`);
    if (args.length !== params.length) throw new ModuleError(`${label}: ${name} takes ${params.length} arguments, got ${args.length}`);
    return raw(name, args);
  };
  const exportsObj: Record<string, unknown> = {};
  for (const name of table.keys()) exportsObj[name] = (...a: number[]): number => call(name, a);
  const memory = new WebAssembly.Memory({ initial: 0, maximum: 0 }); // a library has no linear memory to inspect
  return {
    label,
    realBytes,
    exportNames: [...table.keys()],
    out,
    memory,
    exports: exportsObj as WebAssembly.Exports,
    has: (name) => table.has(name),
    arity: (name) => table.get(name)?.length ?? -1,
    call,
  };
}

/** The export table as `areal check` reads a module's: each found symbol with the signature the header gives it. */
export function librarySignatures(table: LibraryTable): Map<string, ExportInfo> {
  const m = new Map<string, ExportInfo>([["memory", { kind: "memory" }]]);
  for (const c of CORE_EXPORTS) m.set(c.name, { kind: "function", signature: c.signature });
  for (const c of CORE_EXPORTS) if (!c.required && !table.has(c.name)) m.delete(c.name);
  for (const [name, params] of table) {
    if (CORE_EXPORTS.some((c) => c.name === name)) continue;
    m.set(name, { kind: "function", signature: { params, results: ["i32"] } });
  }
  return m;
}

// ---------------------------------------------------------------------------------------------------------
// in a child process

/** The compiled host script: beside this file in dist/, or dist/harness/module when this file runs from source. */
function hostPath(): string {
  try {
    return compiledScript("module/library-host.js", "the library host");
  } catch (err) {
    throw new ModuleError((err as Error).message);
  }
}

/** Response: i32 status, u32 spare, OUT_SLOTS f64 slots. */
export const LIBRARY_RESPONSE_BYTES = 8 + 8 * OUT_SLOTS;
const live = new Set<{ close(): void }>();

/** Sleep without the event loop (the caller is inside a synchronous call). */
function pause(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/**
 * How a child that closed its pipe ended: "signal SIGSEGV", "exit code 3", or undefined when unknown. The child
 * stays a zombie until the event loop reaps it, and the event loop is not running during a synchronous call,
 * so its wait status is still in /proc/PID/stat (field 52, Linux 3.5 and later).
 */
export function childEnd(pid: number): string | undefined {
  for (let i = 0; i < 200; i++) {
    let stat: string;
    try {
      stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    } catch {
      return undefined; // no /proc here, or already reaped
    }
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" "); // fields from 3 on
    if (f[0] === "Z" || f[0] === "X") {
      const status = Number(f[49]);
      if (!Number.isInteger(status)) return undefined;
      const sig = status & 0x7f;
      if (sig === 0) return `exit code ${(status >> 8) & 0xff}`;
      const name = Object.entries(constants.signals).find(([, n]) => n === sig)?.[0];
      return `signal ${name ?? sig}`;
    }
    pause(5);
  }
  return undefined;
}

/** Request marker of a batch of rows (library-host.ts): then u32 export index, u32 arguments, u32 rows, u32 outputs. */
export const LIBRARY_BATCH = 0xfffffffe;
/** Rows per batch request: the request and its response stay within a few hundred KB. */
const LIBRARY_BATCH_ROWS = 4096;

/** One child process serving a library (loadLibrary): its pipes, its handshake, reads that name the child's end. */
interface LibraryChild {
  readonly info: { error?: string; realBytes?: 4 | 8; exports?: [string, ValType[]][] };
  send(q: Buffer): void;
  /** Read n bytes of the response; throws ModuleError naming the child's end and `what()` when it ended. */
  read(buf: Buffer, n: number, what: () => string): void;
  readonly closed: boolean;
  close(): void;
}

function startChild(path: string, label: string): LibraryChild {
  const dir = mkdtempSync(join(tmpdir(), "areal-library-"));
  const reqPath = join(dir, "req");
  const respPath = join(dir, "resp");
  execFileSync("mkfifo", [reqPath, respPath]);
  const child = spawn(process.execPath, [hostPath(), resolve(path), reqPath, respPath, label], { stdio: ["ignore", "ignore", "pipe"] });
  let stderr = "";
  child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
  child.unref();
  (child.stderr as unknown as { unref(): void }).unref();
  const req = openSync(reqPath, "w");
  const resp = openSync(respPath, "r");
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
        // the child is gone already
      }
      closeSync(req);
      closeSync(resp);
      rmSync(dir, { recursive: true, force: true });
      live.delete(handle);
    },
  };
  live.add(handle);
  const read = (buf: Buffer, n: number, what: () => string): void => {
    let got = 0;
    while (got < n) {
      const r = readSync(resp, buf, got, n - got, null);
      if (r === 0) {
        const end = child.pid !== undefined ? childEnd(child.pid) : undefined;
        handle.close();
        throw new ModuleError(`${label}: the library process ended (${end ?? "cause unknown"}) ${what()}${stderr.trim() ? `: ${stderr.trim()}` : ""}; nothing was written`);
      }
      got += r;
    }
  };
  // Handshake: u32 length, then JSON {realBytes, exports: [[name, params]...]} or {error}.
  const lenBuf = Buffer.alloc(4);
  read(lenBuf, 4, () => "while loading it");
  const hello = Buffer.alloc(lenBuf.readUInt32LE(0));
  read(hello, hello.length, () => "while loading it");
  const info = JSON.parse(hello.toString("utf8")) as LibraryChild["info"];
  if (info.error !== undefined) handle.close();
  return {
    info,
    send: (q) => writeSync(req, q),
    read,
    get closed() {
      return closed;
    },
    close: () => handle.close(),
  };
}

/**
 * A library run in a child process. The child loads it with openLibrary, sends its export table, then answers
 * calls one at a time, or many rows per request (a batch: Kernels batch calls, load.ts callRows). The child
 * ends when the pipes close (closeLibraries, or this process's exit). A child that ends during a batch is
 * replaced by a fresh one that runs the batch's rows one call at a time, so the message names the call that
 * ended it, as without batches.
 */
export function loadLibrary(path: string, label = path): { kernels: Kernels; signatures: Map<string, ExportInfo> } {
  if (!existsSync(path)) throw new ModuleError(`--library: no such file: ${path}`);
  let proc = startChild(path, label);
  const info = proc.info;
  if (info.error !== undefined) throw new ModuleError(info.error);
  const table = new Map(info.exports!);
  const index = new Map([...table.keys()].map((n, i) => [n, i]));
  const realBytes = info.realBytes!;
  const out = realBytes === 8 ? new Float64Array(OUT_SLOTS) : new Float32Array(OUT_SLOTS);
  const rbuf = Buffer.alloc(LIBRARY_RESPONSE_BYTES);
  const raw = (name: string, args: readonly number[]): number => {
    if (proc.closed) throw new ModuleError(`${label}: the library process was closed`);
    const q = Buffer.alloc(8 + 8 * args.length);
    q.writeUInt32LE(index.get(name)!, 0);
    q.writeUInt32LE(args.length, 4);
    args.forEach((a, i) => q.writeDoubleLE(a, 8 + 8 * i));
    proc.send(q);
    proc.read(rbuf, LIBRARY_RESPONSE_BYTES, () => `in ${name}(${args.join(", ")})`);
    for (let i = 0; i < OUT_SLOTS; i++) out[i] = rbuf.readDoubleLE(8 + 8 * i);
    return rbuf.readInt32LE(0);
  };
  const kernels = tableKernels(label, realBytes, out, table, raw);
  // A batch: request = marker, export, arguments, rows, outputs, then the rows' arguments (f64); response = the
  // rows' statuses (as f64), then their outputs (f64).
  const batch = (name: string, args: Float64Array, at: number, na: number, rows: number, o: Float64Array, nOut: number, status: Int32Array): void => {
    const q = Buffer.alloc(20 + 8 * rows * na);
    q.writeUInt32LE(LIBRARY_BATCH, 0);
    q.writeUInt32LE(index.get(name)!, 4);
    q.writeUInt32LE(na, 8);
    q.writeUInt32LE(rows, 12);
    q.writeUInt32LE(nOut, 16);
    Buffer.from(args.buffer, args.byteOffset + 8 * at * na, 8 * rows * na).copy(q, 20);
    const resp = Buffer.alloc(8 * rows * (1 + nOut));
    try {
      proc.send(q);
      proc.read(resp, resp.length, () => `in a batch of ${name}`);
    } catch (err) {
      if (!(err instanceof ModuleError)) throw err;
      replay(name, args, at, na, rows, err);
    }
    const f = new Float64Array(resp.buffer, resp.byteOffset, rows * (1 + nOut));
    for (let r = 0; r < rows; r++) status[at + r] = f[r]!;
    o.set(f.subarray(rows, rows + rows * nOut), at * nOut);
  };
  // The child ended during a batch: a fresh child runs its rows one call at a time; the call that ends it is named.
  const replay = (name: string, args: Float64Array, at: number, na: number, rows: number, first: ModuleError): never => {
    proc = startChild(path, label);
    forEachRow(args, na, at, rows, (a) => raw(name, a)); // throws, naming the call, when the child ends
    proc.close();
    throw first;
  };
  setRowCaller(kernels, (name, args, na, rows, o, nOut, status) => {
    const params = table.get(name);
    if (!params) throw new ModuleError(`${label}: no export named ${name}`);
    if (na !== params.length) throw new ModuleError(`${label}: ${name} takes ${params.length} arguments, got ${na}`);
    if (proc.closed) throw new ModuleError(`${label}: the library process was closed`);
    if (nOut > OUT_SLOTS) return rowByRow(kernels)(name, args, na, rows, o, nOut, status);
    for (let at = 0; at < rows; at += LIBRARY_BATCH_ROWS) batch(name, args, at, na, Math.min(LIBRARY_BATCH_ROWS, rows - at), o, nOut, status);
  });
  return { kernels, signatures: librarySignatures(table) };
}

/** End every library child this process started (tests call it; the children also end at process exit). */
export function closeLibraries(): void {
  for (const h of [...live]) h.close();
}
