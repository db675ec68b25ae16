/**
 * The worker thread's side of workers.ts: set up once (load the module, prepare the routine), then answer
 * jobs one at a time. Each worker has its own instance of the kernel module, so the module's output region
 * and state are never shared. Errors go back as values with their name and message; the caller decides.
 */
import { parentPort } from "node:worker_threads";
import type { FromWorker, JobResult, KernelSource, ToWorker, WorkerInit } from "../core/pool.js";
import type { Kernels } from "../module/load.js";
import { loadModule, loadNamedBuild, isBuildName } from "../module/builds.js";
import { findRoutine, type Routine } from "../module/routines.js";
import { prepareEval, evalRange } from "./evaluate.js";
import { runSuite, type CheckJob } from "../verify/check.js";
import { findSpec } from "../verify/specs/index.js";
import { sweepRange, type Grid } from "./sweep.js";

type Handler = (job: unknown) => { value: unknown; transfer?: ArrayBuffer[] };

function load(src: KernelSource): Kernels {
  if (src.module !== undefined) return loadModule(src.module, src.callLimit).kernels;
  const b = src.build ?? "f64";
  if (!isBuildName(b)) throw new Error(`unknown build '${b}'`);
  return loadNamedBuild(b);
}

function routineOf(name: string): Routine {
  const r = findRoutine(name);
  if (!r) throw new Error(`unknown routine '${name}'`);
  return r;
}

function setUp(init: WorkerInit): Handler {
  const k = load(init.load);
  switch (init.kind) {
    case "eval": {
      const routine = routineOf(init.routine);
      const plan = prepareEval(routine, init.columns, init.source);
      return (job) => {
        const { start, end } = job as { start: number; end: number };
        const r = evalRange(routine, plan, init, k, start, end);
        return { value: r, transfer: [r.bytes.buffer as ArrayBuffer] };
      };
    }
    case "check":
      return (job) => {
        const { suite, limits } = job as CheckJob;
        const spec = findSpec(suite);
        if (!spec) throw new Error(`unknown suite '${String(suite)}'`);
        return { value: runSuite(spec, k, { limits }) };
      };
    case "sweep": {
      const routine = routineOf(init.routine);
      const g = init.grid as Grid;
      return (job) => {
        const { first, end } = job as { first: number; end: number };
        return { value: sweepRange(routine, g, k, first, end) };
      };
    }
  }
}

const port = parentPort;
if (!port) throw new Error("worker-entry.js runs as a worker thread (workers.ts starts it)");
let handler: Handler | undefined;
port.on("message", (m: ToWorker) => {
  if (m.type === "init") {
    try {
      handler = setUp(m.init);
      port.postMessage({ type: "ready" } satisfies FromWorker);
    } catch (err) {
      port.postMessage({ type: "fatal", name: (err as Error).name ?? "Error", message: (err as Error).message ?? String(err) } satisfies FromWorker);
    }
    return;
  }
  let result: JobResult<unknown>;
  let transfer: ArrayBuffer[] = [];
  try {
    if (!handler) throw new Error("worker used before set-up");
    const r = handler(m.job);
    result = { ok: true, value: r.value };
    transfer = r.transfer ?? [];
  } catch (err) {
    result = { ok: false, name: (err as Error).constructor?.name ?? "Error", message: (err as Error).message ?? String(err) };
  }
  port.postMessage({ type: "done", id: m.id, result } satisfies FromWorker, transfer);
});
