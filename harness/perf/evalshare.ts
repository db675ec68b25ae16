/**
 * The kernel's share of `areal eval` time, for `areal bench`: one generated input of kepler-elliptic rows (e
 * uniform in [0, 1), M uniform in [-pi, pi], written as shortest round-trip decimals, the form eval writes),
 * cut into chunks of whole lines as evaluateFile cuts a file (CHUNK_BYTES), then timed in one run:
 *   bytes    evaluateBytes over every chunk (what eval runs, without the file reading and writing: the codec
 *            module parses and formats, core/codec.ts);
 *   string   evaluateLines over the same chunks decoded (the string path eval used before, kept as reference);
 *   kernel   the kernel alone over the same rows, parsed beforehand (callRows: one batch per chunk).
 * Each is run `reps` times interleaved (bytes, string, kernel, bytes, ...); the figure is the fastest pass (the
 * one least disturbed by other load on a shared machine). kernelShare = t(kernel) / t(bytes).
 */
import { Rng } from "../core/rng.js";
import { CHUNK_BYTES } from "../core/stream.js";
import { codec } from "../core/codec.js";
import { callRows, type Kernels } from "../module/load.js";
import { findRoutine } from "../module/routines.js";
import { evaluateBytes, evaluateLines, prepareEval } from "../run/evaluate.js";

export interface EvalShare {
  readonly routine: string;
  readonly rows: number;
  readonly chunkBytes: number;
  readonly reps: number;
  /** Rows per second of evaluateBytes (parse, kernel, format). */
  readonly bytesRowsPerS: number;
  /** Rows per second of evaluateLines (the string path). */
  readonly stringRowsPerS: number;
  /** Kernel calls per second over the same rows (batched per chunk, inputs parsed beforehand). */
  readonly kernelCallsPerS: number;
  /** t(kernel) / t(bytes): the kernel's part of eval's time (the rest is reading and writing CSV). */
  readonly kernelShare: number;
  /** t(string) / t(bytes). */
  readonly bytesVsString: number;
  /** Cells the codec left to Number() in the bytes passes (it decides every decimal of up to 19 digits: 0 here). */
  readonly parsesLeftToNumber: number;
}

/** The generated input: the header, then chunks of whole lines (UTF-8). */
export function evalShareInput(rows: number): { chunks: Uint8Array[]; args: Float64Array[] } {
  const rng = new Rng(20261219);
  const enc = new TextEncoder();
  const chunks: Uint8Array[] = [];
  const args: Float64Array[] = [];
  let text = "";
  let a: number[] = [];
  const flush = (): void => {
    chunks.push(enc.encode(text));
    args.push(Float64Array.from(a));
    text = "";
    a = [];
  };
  for (let i = 0; i < rows; i++) {
    const e = rng.uniform();
    const M = rng.between(-Math.PI, Math.PI);
    const line = `${e},${M}\n`;
    if (text.length + line.length > CHUNK_BYTES) flush();
    text += line;
    a.push(e, M);
  }
  if (text.length > 0) flush();
  return { chunks, args };
}

/** Time eval's parts over `rows` generated rows on `k` (the release module). */
export function measureEvalShare(k: Kernels, rows: number, reps = 3): EvalShare {
  const routine = findRoutine("kepler-elliptic")!;
  const plan = prepareEval(routine, ["e", "M"], "bench", k);
  const { chunks, args } = evalShareInput(rows);
  const texts = chunks.map((c) => new TextDecoder().decode(c));
  const nOut = routine.outputs.length;
  const out = new Float64Array(Math.ceil(CHUNK_BYTES / 4) * nOut);
  const status = new Int32Array(Math.ceil(CHUNK_BYTES / 4));
  let sink = 0;
  const passes = {
    bytes: (): void => {
      for (const c of chunks) sink += evaluateBytes(routine, plan, 2, "bench", k, c, 1).bytes.length;
    },
    string: (): void => {
      for (const t of texts) sink += evaluateLines(routine, plan, 2, "bench", k, t, 1).text.length;
    },
    kernel: (): void => {
      for (const a of args) callRows(k, plan.exportName, a, 2, a.length / 2, out, nOut, status);
      sink += status[0]!;
    },
  };
  const best = { bytes: Infinity, string: Infinity, kernel: Infinity };
  const unsure0 = codec().unsureCount;
  for (let r = 0; r < reps; r++) {
    for (const name of ["bytes", "string", "kernel"] as const) {
      const t0 = performance.now();
      passes[name]();
      best[name] = Math.min(best[name], (performance.now() - t0) / 1000);
    }
  }
  if (sink === 0) throw new Error("eval bench produced no output");
  return {
    routine: routine.name, rows, chunkBytes: CHUNK_BYTES, reps,
    bytesRowsPerS: rows / best.bytes, stringRowsPerS: rows / best.string, kernelCallsPerS: rows / best.kernel,
    kernelShare: best.kernel / best.bytes, bytesVsString: best.string / best.bytes,
    parsesLeftToNumber: codec().unsureCount - unsure0,
  };
}
