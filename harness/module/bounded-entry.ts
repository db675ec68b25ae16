/**
 * The worker thread side of bounded.ts: instantiate one foreign module (load.ts instantiate, so the same
 * checks and messages), then serve calls through the shared buffer until the thread is terminated. The
 * thread never returns to its event loop: it waits for a request with Atomics.wait, runs it, copies the output
 * slots from the module's memory as it is after the call, and answers. Errors go to the port first, then the
 * state says `failed`, so the waiting thread finds the message with receiveMessageOnPort.
 */
import { workerData } from "node:worker_threads";
import { ownThreadId } from "../core/thread-cpu.js";
import { instantiate, ModuleError, type Kernels } from "./load.js";
import { BATCH, CTRL, SHARED, STATE, callText, type BoundedInfo, type BoundedInit } from "./bounded.js";

const init = workerData as BoundedInit;
const ctrl = new Int32Array(init.sab, 0, SHARED.ctrlWords);
const argv = new Float64Array(init.sab, SHARED.argsByte, SHARED.maxArgs);
const outv = new Float64Array(init.sab, SHARED.outByte, SHARED.outSlots);
const bv = new Float64Array(init.batch, 0, BATCH.doubles);

function answer(state: number): void {
  Atomics.store(ctrl, CTRL.state, state);
  Atomics.notify(ctrl, CTRL.state);
}

function fail(message: string): void {
  init.port.postMessage({ message });
  answer(STATE.failed);
}

/** The memory bound, checked after instantiation and after every call. */
function memoryOver(k: Kernels, what: string): string | undefined {
  const n = k.memory.buffer.byteLength;
  if (n <= init.memoryLimit) return undefined;
  return `${init.label}: the module's memory grew to ${(n / 1048576).toFixed(0)} MB in ${what}, over the limit of ${(init.memoryLimit / 1048576).toFixed(0)} MB; the module was stopped, nothing was written`;
}

function serve(k: Kernels): void {
  const names = k.exportNames;
  const args: number[] = [];
  for (;;) {
    let s = Atomics.load(ctrl, CTRL.state);
    while (s !== STATE.request && s !== STATE.rows) {
      Atomics.wait(ctrl, CTRL.state, s);
      s = Atomics.load(ctrl, CTRL.state);
    }
    const name = names[ctrl[CTRL.fn]!]!;
    if (s === STATE.rows) {
      if (!serveRows(k, name, args)) return;
      answer(STATE.done);
      continue;
    }
    args.length = ctrl[CTRL.nargs]!;
    for (let i = 0; i < args.length; i++) args[i] = argv[i]!;
    let status: number;
    try {
      status = k.call(name, args);
    } catch (err) {
      fail(err instanceof ModuleError ? err.message : `${init.label}: ${callText(name, args)} failed (${(err as Error).message}); the module is faulty, nothing was written`);
      return;
    }
    if (k.memory.buffer.byteLength > init.memoryLimit) {
      fail(memoryOver(k, callText(name, args))!);
      return;
    }
    const o = k.out; // taken after the call: a module that grew its memory has a new buffer
    for (let i = 0; i < SHARED.outSlots; i++) outv[i] = o[i]!;
    ctrl[CTRL.status] = status;
    answer(STATE.done);
  }
}

/**
 * A request of many rows (BATCH): each row called as `serve` calls one, the index of the row written to the
 * control word `row` before its call (the waiting thread holds each call to the limit by it). False on a failure
 * (reported, the thread is done).
 */
function serveRows(k: Kernels, name: string, args: number[]): boolean {
  const na = ctrl[CTRL.nargs]!;
  const rows = ctrl[CTRL.rows]!;
  const nOut = ctrl[CTRL.nout]!;
  const outAt = rows * na;
  const stAt = rows * (na + nOut);
  args.length = na;
  for (let r = 0; r < rows; r++) {
    for (let i = 0; i < na; i++) args[i] = bv[r * na + i]!;
    Atomics.store(ctrl, CTRL.row, r);
    let status: number;
    try {
      status = k.call(name, args);
    } catch (err) {
      fail(err instanceof ModuleError ? err.message : `${init.label}: ${callText(name, args)} failed (${(err as Error).message}); the module is faulty, nothing was written`);
      return false;
    }
    if (k.memory.buffer.byteLength > init.memoryLimit) {
      fail(memoryOver(k, callText(name, args))!);
      return false;
    }
    const o = k.out; // taken after the call: a module that grew its memory has a new buffer
    for (let i = 0; i < nOut; i++) bv[outAt + r * nOut + i] = o[i]!;
    bv[stAt + r] = status;
  }
  return true;
}

Atomics.store(ctrl, CTRL.tid, ownThreadId() ?? 0);

answer(STATE.started);
let k: Kernels | undefined;
try {
  k = instantiate(new Uint8Array(init.bytes), init.label);
} catch (err) {
  fail(err instanceof ModuleError ? err.message : `${init.label}: ${(err as Error).message}`);
}
if (k) {
  const over = memoryOver(k, "its start function");
  if (over) fail(over);
  else {
    const info: BoundedInfo = { realBytes: k.realBytes, exports: k.exportNames.map((n) => [n, k!.arity(n)] as const) };
    init.port.postMessage(info);
    answer(STATE.idle);
    serve(k);
  }
}
