/**
 * module/load.ts: a batch of rows through an object without a batch caller (one `call` a row: rowByRow, the one
 * loop the harness has for that) gives the statuses and outputs of the module's own batch caller, and
 * forEachRow hands each row's arguments with its index.
 */
import { describe, it, expect } from "vitest";
import { callRows, forEachRow, type Kernels } from "../harness/module/load.js";
import { findRoutine } from "../harness/module/routines.js";
import { Rng } from "../harness/core/rng.js";
import { isOk } from "../harness/module/status.js";
import { release } from "./helpers.js";

describe("callRows one row at a time", () => {
  it("equals the batch caller on 2,000 kepler-elliptic rows (statuses and every output bit)", () => {
    const k = release();
    const r = findRoutine("kepler-elliptic")!;
    const rows = 2000;
    const nOut = r.outputs.length;
    const rng = new Rng(11);
    const args = new Float64Array(2 * rows);
    for (let i = 0; i < rows; i++) {
      args[2 * i] = i % 50 === 0 ? 1.5 : rng.uniform(); // some out of the domain
      args[2 * i + 1] = rng.between(-10, 10);
    }
    const run = (kk: Kernels): { out: Float64Array; st: Int32Array } => {
      const out = new Float64Array(rows * nOut).fill(-7);
      const st = new Int32Array(rows);
      callRows(kk, r.exportName, args, 2, rows, out, nOut, st);
      return { out, st };
    };
    const plain: Kernels = { label: k.label, realBytes: k.realBytes, exportNames: k.exportNames, has: k.has, arity: k.arity, call: (n, a) => k.call(n, a), get out() { return k.out; }, memory: k.memory, exports: k.exports };
    const batch = run(k);
    const single = run(plain);
    expect([...single.st]).toEqual([...batch.st]);
    // every output of the ok rows (a failed row's slots hold whatever the module left: not compared)
    const bits = (o: Float64Array): string[] => [...batch.st].flatMap((s, i) => (isOk(s) ? [Buffer.from(o.buffer, 8 * i * nOut, 8 * nOut).toString("hex")] : []));
    expect(bits(single.out)).toEqual(bits(batch.out));
    expect(new Set(batch.st).size).toBeGreaterThan(1);
  });

  it("forEachRow: rows from..from + rows - 1, each with its arguments", () => {
    const args = Float64Array.from([0, 1, 10, 11, 20, 21, 30, 31]);
    const seen: string[] = [];
    forEachRow(args, 2, 1, 2, (a, r) => seen.push(`${r}:${a.join(",")}`));
    expect(seen).toEqual(["1:10,11", "2:20,21"]);
  });
});
