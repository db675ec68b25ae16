/**
 * `areal merge part-*.json`: combine the shard files of one sweep into the file a single unsharded run writes,
 * byte for byte. Every shard of 1..n must be there exactly once, and all must describe the same sweep (routine,
 * module, grid, case count, number of shards); otherwise the merge stops and says which file is wrong.
 */
import { basename } from "node:path";
import {
  SWEEP_FORMAT, SweepError, storedGrid, gridHash, shardRange, mergePartials, emptyPartial, docPartial, finishSweep,
  sweepRoutine, totalCases, type SweepDoc,
} from "./sweep.js";

/** A sweep file read from disk. */
export interface SweepFile {
  readonly path: string;
  readonly text: string;
}

function isObj(x: unknown): x is Record<string, unknown> {
  return typeof x === "object" && x !== null && !Array.isArray(x);
}

/** Parse a sweep file, with the file named in every message. */
export function readSweepDoc(f: SweepFile): SweepDoc {
  let d: unknown;
  try {
    d = JSON.parse(f.text);
  } catch (err) {
    throw new SweepError(`${f.path}: not JSON (${(err as Error).message})`);
  }
  if (!isObj(d) || d.format !== SWEEP_FORMAT) throw new SweepError(`${f.path}: not a sweep file (no "format": "${SWEEP_FORMAT}")`);
  const s = d.shard;
  if (!isObj(s) || typeof s.k !== "number" || typeof s.n !== "number" || typeof s.first !== "number" || typeof s.end !== "number") {
    throw new SweepError(`${f.path}: the "shard" field is missing or malformed`);
  }
  for (const key of ["routine", "grid_sha256"] as const) if (typeof d[key] !== "string") throw new SweepError(`${f.path}: the "${key}" field is missing`);
  if (typeof d.cases !== "number" || typeof d.cases_total !== "number") throw new SweepError(`${f.path}: the case counts are missing`);
  return d as unknown as SweepDoc;
}

/** Merge the shard files of one sweep. Throws SweepError on a missing, duplicate or mismatched shard. */
export function mergeSweeps(files: readonly SweepFile[]): SweepDoc {
  if (files.length === 0) throw new SweepError("merge needs at least one sweep file");
  const docs = files.map((f) => ({ path: f.path, doc: readSweepDoc(f) }));
  const first = docs[0]!;
  const same: [string, (d: SweepDoc) => unknown][] = [
    ["routine", (d) => d.routine],
    ["module", (d) => `${d.module?.label} ${d.module?.sha256 ?? ""}`.trim()],
    ["grid", (d) => d.grid_sha256],
    ["case count", (d) => d.cases_total],
    ["number of shards", (d) => d.shard.n],
  ];
  for (const { path, doc } of docs.slice(1)) {
    for (const [what, get] of same) {
      if (get(doc) !== get(first.doc)) {
        throw new SweepError(`${path}: ${what} differs from ${first.path} (${String(get(doc))} vs ${String(get(first.doc))}): not shards of one sweep`);
      }
    }
  }
  const routine = sweepRoutine(first.doc.routine);
  const g = storedGrid(first.doc.grid, first.path, routine);
  if (gridHash(g) !== first.doc.grid_sha256) throw new SweepError(`${first.path}: grid_sha256 does not match its grid (edited by hand?)`);
  const total = totalCases(g);
  const n = first.doc.shard.n;
  if (total !== first.doc.cases_total) throw new SweepError(`${first.path}: cases_total ${first.doc.cases_total} does not match its grid (${total})`);
  const byK = new Map<number, { path: string; doc: SweepDoc }>();
  for (const e of docs) {
    const { k } = e.doc.shard;
    const prev = byK.get(k);
    if (prev) throw new SweepError(`shard ${k}/${n} given twice: ${prev.path} and ${e.path}`);
    if (!Number.isInteger(k) || k < 1 || k > n) throw new SweepError(`${e.path}: shard ${k}/${n} is out of range`);
    const want = shardRange(total, k, n);
    if (e.doc.shard.first !== want.first || e.doc.shard.end !== want.end || e.doc.cases !== want.end - want.first) {
      throw new SweepError(`${e.path}: shard ${k}/${n} covers cases ${e.doc.shard.first}..${e.doc.shard.end} (${e.doc.cases} cases); shard ${k}/${n} of ${total} cases is ${want.first}..${want.end}`);
    }
    byK.set(k, e);
  }
  const missing: number[] = [];
  for (let k = 1; k <= n; k++) if (!byK.has(k)) missing.push(k);
  if (missing.length > 0) {
    const shown = missing.slice(0, 20).map((k) => `${k}/${n}`).join(", ");
    throw new SweepError(`missing shard${missing.length > 1 ? "s" : ""} ${shown}${missing.length > 20 ? `, ... (${missing.length} in all)` : ""}; given: ${docs.map((d) => basename(d.path)).join(", ")}`);
  }
  let acc = emptyPartial(routine);
  for (let k = 1; k <= n; k++) acc = mergePartials(acc, docPartial(byK.get(k)!.doc), g);
  return finishSweep(routine, g, first.doc.module, { k: 1, n: 1, first: 0, end: total }, acc);
}
