/**
 * A small pool of worker threads, each with its own instance of the kernel module (worker-entry.ts). Jobs go
 * out in order, as many in flight as the pool allows, and results come back to the caller strictly in job
 * order, whatever order the workers finish in: that is what keeps the output of N workers byte-identical to
 * the output of one. Memory is bounded by the number of jobs in flight, never by the size of the input.
 */
import { Worker } from "node:worker_threads";
import { availableParallelism } from "node:os";
import { compiledScript } from "./paths.js";

/** Which module a worker loads: a built-in build by name, or a module file. */
export interface KernelSource {
  readonly build?: string;
  readonly module?: string;
  /** Time limit of each call into `module`, in seconds. */
  readonly callLimit?: number;
  /**
   * The compiled module of `build` (a WebAssembly build), compiled once by the thread that starts the pool:
   * the worker instantiates it without compiling, and without loading the code of the other builds.
   */
  readonly compiled?: WebAssembly.Module;
}

/** What a worker is set up to do; it then takes jobs of the matching kind. */
export type WorkerInit =
  | { readonly kind: "eval"; readonly load: KernelSource; readonly routine: string; readonly columns: readonly string[]; readonly source: string; readonly path: string; readonly first: number; readonly size: number; readonly codec?: WebAssembly.Module }
  | { readonly kind: "check"; readonly load: KernelSource }
  | { readonly kind: "sweep"; readonly load: KernelSource; readonly routine: string; readonly grid: unknown };

/** A job's outcome as the worker reports it: its value, or the error it threw (name and message). */
export type JobResult<R> = { readonly ok: true; readonly value: R } | { readonly ok: false; readonly name: string; readonly message: string };

/** Messages between the pool and a worker. */
export type ToWorker = { readonly type: "init"; readonly init: WorkerInit } | { readonly type: "job"; readonly id: number; readonly job: unknown };
export type FromWorker =
  | { readonly type: "ready" }
  | { readonly type: "fatal"; readonly name: string; readonly message: string }
  | { readonly type: "done"; readonly id: number; readonly result: JobResult<unknown> };

/** The default number of workers: the number of cores Node reports. */
export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/** The compiled worker script: beside this file in dist/, or dist/harness when this file runs from source. */
function entryPath(): string {
  return compiledScript("run/worker-entry.js", "the worker script");
}

/** An error raised in a worker, carried back with its original name. */
export class WorkerJobError extends Error {
  constructor(readonly originalName: string, message: string) {
    super(message);
  }
}

export class WorkerPool {
  private constructor(private readonly workers: Worker[]) {}

  /** Start n workers and set each up with `init`; rejects with the first worker's set-up error. */
  static async start(n: number, init: WorkerInit): Promise<WorkerPool> {
    const path = entryPath();
    const workers = Array.from({ length: n }, () => new Worker(path));
    const pool = new WorkerPool(workers);
    try {
      await Promise.all(
        workers.map(
          (w) =>
            new Promise<void>((resolve, reject) => {
              const onMsg = (m: FromWorker): void => {
                w.off("message", onMsg);
                w.off("error", reject);
                if (m.type === "ready") resolve();
                else if (m.type === "fatal") reject(new WorkerJobError(m.name, m.message));
                else reject(new Error("worker: unexpected message before set-up"));
              };
              w.on("message", onMsg);
              w.once("error", reject);
              w.postMessage({ type: "init", init } satisfies ToWorker);
            }),
        ),
      );
    } catch (err) {
      await pool.close();
      throw err;
    }
    return pool;
  }

  get size(): number {
    return this.workers.length;
  }

  /**
   * Run every job of `jobs` and hand each result to `onResult` in job order. Each worker has up to
   * `perWorker` jobs queued (so it starts the next one without waiting for this thread to answer: with one
   * job each, a worker sat idle for a quarter of a run with 64 KB chunks), and at most `maxInFlight` jobs are
   * out or waiting for their turn at once. When `onResult` throws, no further job is sent and the promise
   * rejects with that error once the jobs already out have come back.
   *
   * With `local`, this thread is a worker too: whenever every worker has its jobs queued, this thread takes the
   * next job and runs it itself (one job a turn of the event loop, so the workers' answers are taken between
   * two), within the same `maxInFlight`. `local` is told whether its result is handed to `onResult` at once
   * (it is the next in order), before `local` runs again; a throw of `local` fails the run as `onResult`'s does.
   */
  runOrdered<J, R>(jobs: Iterator<J>, onResult: (r: JobResult<R>, job: J, index: number) => void, maxInFlight = 4 * this.workers.length + 2, perWorker = 3, local?: (job: J, handedAtOnce: boolean) => R): Promise<void> {
    return new Promise<void>((resolve, reject) => {
      // Jobs queued at each worker; a job goes to the worker with the fewest.
      const queued = new Map<Worker, number>(this.workers.map((w) => [w, 0]));
      const pick = (): Worker | undefined => {
        let best: Worker | undefined;
        for (const [w, n] of queued) if (n < perWorker && (best === undefined || n < queued.get(best)!)) best = w;
        return best;
      };
      const sent = new Map<number, J>();
      const done = new Map<number, JobResult<R>>();
      let next = 0;
      let flushed = 0;
      let exhausted = false;
      let failure: unknown;
      let out = 0;
      const listeners: [Worker, (m: FromWorker) => void, (e: Error) => void][] = [];
      let finished = false;
      let localDue = false;
      const finish = (): void => {
        finished = true;
        for (const [w, onMsg, onErr] of listeners) {
          w.off("message", onMsg);
          w.off("error", onErr);
        }
        if (failure !== undefined) reject(failure);
        else resolve();
      };
      const pump = (): void => {
        for (let w = pick(); w !== undefined && failure === undefined && !exhausted && next - flushed < maxInFlight; w = pick()) {
          const it = jobs.next();
          if (it.done) {
            exhausted = true;
            break;
          }
          queued.set(w, queued.get(w)! + 1);
          sent.set(next, it.value);
          out++;
          w.postMessage({ type: "job", id: next, job: it.value } satisfies ToWorker);
          next++;
        }
        if (local && !localDue && failure === undefined && !exhausted && next - flushed < maxInFlight) {
          localDue = true;
          setImmediate(runLocal);
        }
        if (out === 0 && (exhausted || failure !== undefined) && !localDue && !finished) finish();
      };
      // One job in this thread (`local`), when the workers are busy: its result is accounted like a worker's.
      const runLocal = (): void => {
        localDue = false;
        if (finished || failure !== undefined || exhausted || next - flushed >= maxInFlight) return pump();
        const it = jobs.next();
        if (it.done) {
          exhausted = true;
          return pump();
        }
        const id = next++;
        sent.set(id, it.value);
        try {
          done.set(id, { ok: true, value: local!(it.value, id === flushed) });
        } catch (err) {
          failure ??= err;
        }
        flush();
        pump();
      };
      const flush = (): void => {
        while (failure === undefined && done.has(flushed)) {
          const r = done.get(flushed)!;
          const job = sent.get(flushed)!;
          done.delete(flushed);
          sent.delete(flushed);
          try {
            onResult(r, job, flushed);
          } catch (err) {
            failure = err;
          }
          flushed++;
        }
      };
      for (const w of this.workers) {
        const onMsg = (m: FromWorker): void => {
          // A worker that failed was written off with all its jobs (onErr): a late answer of it changes nothing.
          if (m.type !== "done" || !queued.has(w)) return;
          out--;
          queued.set(w, queued.get(w)! - 1);
          done.set(m.id, m.result as JobResult<R>);
          flush();
          pump();
        };
        const onErr = (e: Error): void => {
          // The worker is gone, with every job queued at it: none of them will come back.
          out -= queued.get(w) ?? 0;
          queued.delete(w);
          failure ??= e;
          pump();
        };
        w.on("message", onMsg);
        w.on("error", onErr);
        listeners.push([w, onMsg, onErr]);
      }
      pump();
    });
  }

  /** Stop every worker. */
  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/** Parse a --workers value: a whole number from 1 to 256; the message names the flag. */
export function parseWorkers(v: string | undefined, flag = "--workers"): number {
  if (v === undefined) return defaultWorkers();
  if (!/^\d+$/.test(v) || Number(v) < 1 || Number(v) > 256) throw new RangeError(`${flag}: '${v}' is not a whole number from 1 to 256`);
  return Number(v);
}


/** Bytes a worker left in one of its shared output slots (OutputSlots): this thread reads them, then releases the slot. */
export interface SharedBytes {
  readonly sab: SharedArrayBuffer;
  readonly count: number;
  readonly slot: number;
  readonly length: number;
}

/** Offset of the slots' data after their flags (one Int32 a slot), 16-byte aligned. */
const slotsData = (count: number): number => (4 * count + 15) & ~15;

/**
 * A worker's output slots: shared memory it writes a job's output bytes into, reused job after job, so that a
 * job's output costs one copy and no fresh buffer or transfer (a copy into a new buffer and its transfer were a
 * quarter of an eval worker's time). A slot is taken by the worker (its flag 0 -> 1) and given back by the
 * thread that wrote the bytes out (releaseShared). Bytes that do not fit a slot, or a job finding every slot
 * still taken (more jobs out than slots), go the old way: a buffer of their own, transferred.
 */
export class OutputSlots {
  private readonly sab: SharedArrayBuffer;
  private readonly flags: Int32Array;
  private readonly data: Uint8Array;

  constructor(readonly slotBytes: number, readonly count: number) {
    this.sab = new SharedArrayBuffer(slotsData(count) + count * slotBytes);
    this.flags = new Int32Array(this.sab, 0, count);
    this.data = new Uint8Array(this.sab, slotsData(count));
  }

  /** Copy `bytes` into a free slot; undefined when they do not fit or no slot is free. */
  put(bytes: Uint8Array): SharedBytes | undefined {
    if (bytes.length > this.slotBytes) return undefined;
    for (let i = 0; i < this.count; i++) {
      if (Atomics.compareExchange(this.flags, i, 0, 1) !== 0) continue;
      this.data.set(bytes, i * this.slotBytes);
      return { sab: this.sab, count: this.count, slot: i, length: bytes.length };
    }
    return undefined;
  }
}

/** The bytes of a shared slot (a view: read them before releaseShared). */
export function sharedView(s: SharedBytes): Uint8Array {
  const slotBytes = (s.sab.byteLength - slotsData(s.count)) / s.count;
  return new Uint8Array(s.sab, slotsData(s.count) + s.slot * slotBytes, s.length);
}

/** Give a slot back to its worker. */
export function releaseShared(s: SharedBytes): void {
  Atomics.store(new Int32Array(s.sab, 0, s.count), s.slot, 0);
}
