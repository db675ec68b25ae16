/**
 * The worker thread's side of workers.ts: set up once (load the module, prepare the routine), then answer
 * jobs one at a time. Each worker has its own instance of the kernel module, so the module's output region
 * and state are never shared. Errors go back as values with their name and message; the caller decides.
 */
import { parentPort } from "node:worker_threads";
import type { FromWorker, JobResult, KernelSource, ToWorker, WorkerInit } from "../core/pool.js";
import { instantiateModule, isWasmBuild, type Kernels } from "../module/load.js";
import { findRoutine, type Routine } from "../module/routines.js";
import { RangeReader, CHUNK_BYTES } from "../core/stream.js";
import { OutputSlots } from "../core/pool.js";
import type { Grid } from "./sweep.js";
import type { CheckJob } from "../verify/check.js";

type Handler = (job: unknown) => { value: unknown; transfer?: ArrayBuffer[] };

/**
 * An eval worker's output slots: more than the jobs the pool has out at once for two workers (4 a worker and
 * 2, core/pool.ts runOrdered), each four default chunks (an output of about 1.5 times its input for two
 * inputs and two outputs); a larger output goes as a buffer of its own.
 */
const EVAL_SLOTS = 12;
const EVAL_SLOT_BYTES = 4 * CHUNK_BYTES;

/**
 * The worker's kernels: a WebAssembly build from the module its parent compiled (nothing compiled here, nor the
 * code of the other builds loaded: builds.ts with its JavaScript build takes a worker tens of milliseconds to
 * load), anything else through builds.ts.
 */
async function load(src: KernelSource): Promise<Kernels> {
  const b = src.build ?? "f64";
  if (src.module === undefined && src.compiled !== undefined && isWasmBuild(b)) return instantiateModule(src.compiled, b);
  const { loadModule, loadNamedBuild, isBuildName } = await import("../module/builds.js");
  if (src.module !== undefined) return loadModule(src.module, src.callLimit).kernels;
  if (!isBuildName(b)) throw new Error(`unknown build '${b}'`);
  return loadNamedBuild(b);
}

function routineOf(name: string): Routine {
  const r = findRoutine(name);
  if (!r) throw new Error(`unknown routine '${name}'`);
  return r;
}

/** The handler of a worker's jobs; each kind imports only what it runs (a worker starts sooner). */
async function setUp(init: WorkerInit): Promise<Handler> {
  const k = await load(init.load);
  switch (init.kind) {
    case "eval": {
      const [{ prepareEval, evalRange }, { useCodecModule }] = await Promise.all([import("./evaluate.js"), import("../core/codec.js")]);
      if (init.codec !== undefined) useCodecModule(init.codec);
      const routine = routineOf(init.routine);
      const plan = prepareEval(routine, init.columns, init.source);
      const src = { reader: new RangeReader(init.path, init.first, init.size, init.source), columns: init.columns, source: init.source };
      const slots = new OutputSlots(EVAL_SLOT_BYTES, EVAL_SLOTS);
      return (job) => {
        const { start, end } = job as { start: number; end: number };
        const r = evalRange(routine, plan, src, k, start, end); // r.bytes: a view of the codec's memory
        const shared = slots.put(r.bytes);
        if (shared !== undefined) return { value: { ...r, bytes: new Uint8Array(0), shared } };
        const own = r.bytes.slice();
        return { value: { ...r, bytes: own }, transfer: [own.buffer] };
      };
    }
    case "check": {
      const [{ runSuite }, { findSpec }] = await Promise.all([import("../verify/check.js"), import("../verify/specs/index.js")]);
      return (job) => {
        const { suite, limits } = job as CheckJob;
        const spec = findSpec(suite);
        if (!spec) throw new Error(`unknown suite '${String(suite)}'`);
        return { value: runSuite(spec, k, { limits }) };
      };
    }
    case "sweep": {
      const { sweepRange } = await import("./sweep.js");
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
    setUp(m.init).then(
      (h) => {
        handler = h;
        port.postMessage({ type: "ready" } satisfies FromWorker);
      },
      (err: unknown) => port.postMessage({ type: "fatal", name: (err as Error).name ?? "Error", message: (err as Error).message ?? String(err) } satisfies FromWorker),
    );
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
