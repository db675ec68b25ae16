/**
 * Calling a module the harness did not write (`--module`) with every call bounded in time and memory. The
 * module runs in a worker thread of its own (bounded-entry.ts); a call is handed over through shared memory
 * and this thread waits for the answer with Atomics.wait, so `call` stays synchronous like a direct WebAssembly
 * call. The limit counts the CPU time of the module's thread where the system reports it (Linux: the thread's
 * /proc stat), so a paused or starved process does not time out a call that is merely waiting for a core; a
 * wall-time cap of WALL_CAP_FACTOR times the limit bounds a module that blocks without running. A call (or the
 * module's start function) over either bound has its worker terminated, which stops any WebAssembly code, and
 * throws a ModuleError naming the module, the export, the inputs and the bound. After each call the worker
 * copies the output slots out of the module's memory as it is then (a module may grow its memory) and refuses a
 * module whose memory has grown past MEMORY_LIMIT_BYTES. Batch calls (eval's rows, BATCH) hand many rows over
 * at once; the worker writes the index of the row it is calling, and each row has the limit of its own.
 * Built-in builds do not come here: their kernels are ours, bounded by their iteration caps (load.ts).
 */
import { Worker, MessageChannel, receiveMessageOnPort, type MessagePort } from "node:worker_threads";
import { existsSync, readFileSync } from "node:fs";
import { threadCpuMs } from "../core/thread-cpu.js";
import { compiledScript } from "../core/paths.js";
import { ModuleError, setRowCaller, type Kernels } from "./load.js";

/** Default time limit of one call into a foreign module, start function included (seconds; --call-limit). */
export const DEFAULT_CALL_LIMIT_S = 10;
/** A foreign module's memory may not grow past this (bytes): 256 MiB, far above what a kernel needs. */
export const MEMORY_LIMIT_BYTES = 256 * 1024 * 1024;
/** How long a worker thread may take to start, before the module's own time counts (ours, not the module's). */
const WORKER_START_MS = 60_000;
/** A call may take this many times its limit in wall time, whatever CPU it used (a module blocked in a wait). */
export const WALL_CAP_FACTOR = 10;
/** The shortest wait between two readings of the thread's CPU time (milliseconds). */
const MIN_SLICE_MS = 20;

/** Layout of the shared buffer: control words, then the arguments, then the output slots (as f64). */
export const SHARED = { ctrlWords: 16, maxArgs: 32, outSlots: 64, argsByte: 64, outByte: 64 + 8 * 32, bytes: 64 + 8 * 32 + 8 * 64 } as const;
/** Control word indices (rows, nout, row: a request of many rows, see BATCH; tid: the worker thread's id, for its CPU time). */
export const CTRL = { state: 0, fn: 1, nargs: 2, status: 3, rows: 4, nout: 5, row: 6, tid: 7 } as const;
/** States of the control word `state` (rows: a request of many rows). */
export const STATE = { boot: 0, started: 1, idle: 2, request: 3, done: 4, failed: 5, rows: 6 } as const;
/**
 * The second shared buffer, for requests of many rows (Kernels batch calls, load.ts callRows): `doubles` f64
 * words, row r's arguments at [r * nargs], then the outputs of the rows at [rows * nargs + r * nout], then the
 * statuses at [rows * (nargs + nout) + r]. The worker writes the index of the row it is about to call into the
 * control word `row` before each call, so the waiting thread holds each call to the limit and names its inputs.
 */
export const BATCH = { doubles: 1 << 15 } as const;
/** How often the waiting thread looks at the row being called, as a fraction of the limit (a call is stopped within limit * (1 + 1/8) of its CPU time). */
const LIMIT_SLICES = 8;

/** What the worker reports once the module is instantiated. */
export interface BoundedInfo {
  readonly realBytes: 4 | 8;
  readonly exports: readonly (readonly [string, number])[];
}

/** What the worker is given. */
export interface BoundedInit {
  readonly bytes: Uint8Array;
  readonly label: string;
  readonly sab: SharedArrayBuffer;
  /** The rows of a batch request (BATCH). */
  readonly batch: SharedArrayBuffer;
  readonly port: MessagePort;
  readonly memoryLimit: number;
}

function entryPath(): string {
  return compiledScript("module/bounded-entry.js", "the module worker script");
}

/** Parse a --call-limit value (seconds, a positive number up to a day); the message names the flag. */
export function parseCallLimit(v: string | undefined, flag = "--call-limit"): number {
  if (v === undefined) return DEFAULT_CALL_LIMIT_S;
  const s = Number(v);
  if (!/^\s*[0-9.eE+-]+\s*$/.test(v) || !Number.isFinite(s) || s <= 0 || s > 86400) throw new ModuleError(`${flag}: '${v}' is not a number of seconds above 0 and up to 86400`);
  return s;
}

/** Which bound a wait ended on: the answer came, the CPU-time limit, or the wall-time cap. */
type WaitEnd = "answered" | "cpu" | "wall";

/**
 * Wait until the worker leaves state `from`, for at most `limitMs` of the worker thread's CPU time (wall time
 * where the system does not report a thread's CPU time) and WALL_CAP_FACTOR * limitMs of wall time.
 */
function awaitAnswer(ctrl: Int32Array, from: number, limitMs: number): WaitEnd {
  const tid = Atomics.load(ctrl, CTRL.tid);
  const cpu0 = threadCpuMs(tid);
  const t0 = performance.now();
  let slice = limitMs;
  for (;;) {
    Atomics.wait(ctrl, CTRL.state, from, slice);
    if (Atomics.load(ctrl, CTRL.state) !== from) return "answered";
    const wall = performance.now() - t0;
    const used = cpuOrWall(cpu0, threadCpuMs(tid), wall);
    const end = overLimit(used, wall, limitMs);
    if (end) return end;
    slice = Math.max(MIN_SLICE_MS, Math.min(limitMs - used, WALL_CAP_FACTOR * limitMs - wall));
  }
}

/** The CPU time used since `cpu0` where both readings exist, else the wall time. */
function cpuOrWall(cpu0: number | undefined, cpu: number | undefined, wallMs: number): number {
  return cpu0 === undefined || cpu === undefined ? wallMs : cpu - cpu0;
}

/** Which bound a call has passed, if any: `used` (CPU or wall time) against the limit, wall time against the cap. */
function overLimit(usedMs: number, wallMs: number, limitMs: number): "cpu" | "wall" | undefined {
  if (usedMs >= limitMs) return "cpu";
  if (wallMs >= WALL_CAP_FACTOR * limitMs) return "wall";
  return undefined;
}

/** How a bound that ended a wait reads in a message. */
function boundText(end: WaitEnd, limitS: number): string {
  return end === "wall"
    ? `within ${WALL_CAP_FACTOR * limitS} s of wall time (${WALL_CAP_FACTOR} x --call-limit ${limitS} s, the wall-time cap)`
    : `within ${limitS} s (--call-limit)`;
}

/** The inputs of a call as text for messages: `name(1, 2.5)`. */
function callText(name: string, args: readonly number[]): string {
  return `${name}(${args.join(", ")})`;
}

/**
 * Load a module file into a worker thread of its own and return it as Kernels whose every call is bounded by
 * `limitS` seconds. Throws ModuleError (not WebAssembly, imports, a start function over the limit, a trap).
 */
export function loadBounded(path: string, limitS = DEFAULT_CALL_LIMIT_S, label = path): Kernels {
  if (!existsSync(path)) throw new ModuleError(`${label}: no such file: ${path}`);
  const bytes = new Uint8Array(readFileSync(path));
  const sab = new SharedArrayBuffer(SHARED.bytes);
  const ctrl = new Int32Array(sab, 0, SHARED.ctrlWords);
  const argv = new Float64Array(sab, SHARED.argsByte, SHARED.maxArgs);
  const out = new Float64Array(sab, SHARED.outByte, SHARED.outSlots);
  const batch = new SharedArrayBuffer(8 * BATCH.doubles);
  const bv = new Float64Array(batch);
  const { port1, port2 } = new MessageChannel();
  const init: BoundedInit = { bytes, label, sab, batch, port: port2, memoryLimit: MEMORY_LIMIT_BYTES };
  const worker = new Worker(entryPath(), { workerData: init, transferList: [port2], resourceLimits: { maxOldGenerationSizeMb: 64 } });
  worker.unref();
  port1.unref();
  let dead = false;
  const stop = (): void => {
    dead = true;
    void worker.terminate();
    port1.close();
  };
  const failure = (): string => {
    const m = receiveMessageOnPort(port1)?.message as { message?: string } | undefined;
    return m?.message ?? `${label}: the module's worker stopped without a message`;
  };
  // The worker's own start-up is ours; the module's instantiation (its start function) has the call limit.
  Atomics.wait(ctrl, CTRL.state, STATE.boot, WORKER_START_MS);
  const startEnd = Atomics.load(ctrl, CTRL.state) === STATE.started ? awaitAnswer(ctrl, STATE.started, limitS * 1000) : "answered";
  const s0 = Atomics.load(ctrl, CTRL.state);
  if (s0 !== STATE.idle) {
    const msg = s0 === STATE.failed ? failure() : s0 === STATE.started
      ? `${label}: the module's start function did not return ${boundText(startEnd, limitS)}; the module was stopped`
      : `${label}: the module's worker thread did not start`;
    stop();
    throw new ModuleError(msg);
  }
  const info = receiveMessageOnPort(port1)?.message as BoundedInfo;
  const index = new Map(info.exports.map(([n], i) => [n, i]));
  const arity = new Map(info.exports);
  const call = (name: string, args: readonly number[]): number => {
    if (dead) throw new ModuleError(`${label}: the module was stopped after an earlier failure`);
    const i = index.get(name);
    if (i === undefined) throw new ModuleError(`${label}: no export named ${name}`);
    if (args.length > SHARED.maxArgs) throw new ModuleError(`${label}: ${name} called with ${args.length} arguments, more than ${SHARED.maxArgs}`);
    for (let a = 0; a < args.length; a++) argv[a] = args[a]!;
    ctrl[CTRL.fn] = i;
    ctrl[CTRL.nargs] = args.length;
    Atomics.store(ctrl, CTRL.state, STATE.request);
    Atomics.notify(ctrl, CTRL.state);
    const end = awaitAnswer(ctrl, STATE.request, limitS * 1000);
    const s = Atomics.load(ctrl, CTRL.state);
    if (s === STATE.done) return ctrl[CTRL.status]!;
    const msg = s === STATE.failed ? failure() : `${label}: ${callText(name, args)} did not return ${boundText(end, limitS)}; the module was stopped, nothing was written`;
    stop();
    throw new ModuleError(msg);
  };
  /**
   * One request of `rows` rows (they fit in BATCH): the limit holds for each call, as for `call`. The waiting
   * thread wakes every limit / LIMIT_SLICES and notes when it first saw each row being called; a row seen for
   * the whole limit is a call that did not return (stopped between limit and limit * (1 + 1 / LIMIT_SLICES)).
   */
  const callBatch = (name: string, i: number, args: Float64Array, at: number, na: number, rows: number, o: Float64Array, nOut: number, status: Int32Array): void => {
    bv.set(args.subarray(at * na, (at + rows) * na), 0);
    ctrl[CTRL.fn] = i;
    ctrl[CTRL.nargs] = na;
    ctrl[CTRL.rows] = rows;
    ctrl[CTRL.nout] = nOut;
    Atomics.store(ctrl, CTRL.row, -1);
    Atomics.store(ctrl, CTRL.state, STATE.rows);
    Atomics.notify(ctrl, CTRL.state);
    const limitMs = limitS * 1000;
    const tid = Atomics.load(ctrl, CTRL.tid);
    let seen = -2;
    let wall0 = 0;
    let cpu0: number | undefined;
    for (;;) {
      Atomics.wait(ctrl, CTRL.state, STATE.rows, limitMs / LIMIT_SLICES);
      const s = Atomics.load(ctrl, CTRL.state);
      if (s === STATE.done) break;
      if (s !== STATE.rows) {
        stop();
        throw new ModuleError(failure());
      }
      // Each row's clock starts when this thread first sees its index: CPU time of the worker thread from there.
      const row = Atomics.load(ctrl, CTRL.row);
      const now = performance.now();
      const cpu = threadCpuMs(tid);
      if (row !== seen) {
        seen = row;
        wall0 = now;
        cpu0 = cpu;
        continue;
      }
      const end = overLimit(cpuOrWall(cpu0, cpu, now - wall0), now - wall0, limitMs);
      if (end) {
        const r = Math.max(0, row); // -1: the worker has not taken the request (a worker that died)
        const a = Array.from(args.subarray((at + r) * na, (at + r + 1) * na));
        stop();
        throw new ModuleError(`${label}: ${callText(name, a)} did not return ${boundText(end, limitS)}; the module was stopped, nothing was written`);
      }
    }
    const outAt = rows * na;
    const stAt = rows * (na + nOut);
    o.set(bv.subarray(outAt, outAt + rows * nOut), at * nOut);
    for (let r = 0; r < rows; r++) status[at + r] = bv[stAt + r]!;
  };
  const exportsObj: Record<string, unknown> = {};
  for (const [n] of info.exports) exportsObj[n] = (...a: number[]): number => call(n, a);
  const kernels: Kernels = {
    label,
    realBytes: info.realBytes,
    exportNames: info.exports.map(([n]) => n),
    out,
    memory: new WebAssembly.Memory({ initial: 0 }),
    exports: exportsObj as WebAssembly.Exports,
    has: (name) => index.has(name),
    arity: (name) => arity.get(name) ?? -1,
    call,
    close: stop,
  };
  setRowCaller(kernels, (name, args, na, rows, o, nOut, status) => {
    if (dead) throw new ModuleError(`${label}: the module was stopped after an earlier failure`);
    const i = index.get(name);
    if (i === undefined) throw new ModuleError(`${label}: no export named ${name}`);
    if (na > SHARED.maxArgs) throw new ModuleError(`${label}: ${name} called with ${na} arguments, more than ${SHARED.maxArgs}`);
    const per = Math.floor(BATCH.doubles / (na + nOut + 1));
    for (let at = 0; at < rows; at += per) callBatch(name, i, args, at, na, Math.min(per, rows - at), o, nOut, status);
  });
  return kernels;
}

export { callText };
