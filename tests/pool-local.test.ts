/**
 * core/pool.ts runOrdered with `local` (the main thread as one of eval's workers): every job's result reaches
 * onResult once, in job order, whether a worker thread or this thread ran it; this thread runs jobs while the
 * worker's are queued, and a result that waits for an earlier job is one `local` was told to keep (its own
 * copy), so a later job run here cannot overwrite it. The worker here answers every job with an error value (a
 * check job of a suite that does not exist), which is enough to tell its results from this thread's.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { WorkerPool, type JobResult } from "../harness/core/pool.js";

describe("runOrdered with this thread as a worker", () => {
  let pool: WorkerPool;
  beforeAll(async () => {
    pool = await WorkerPool.start(1, { kind: "check", load: { build: "f64" } });
  });
  afterAll(async () => {
    await pool.close();
  });

  it("hands every result over once, in order, and a waiting local result is not overwritten", async () => {
    const N = 300;
    const jobs = Array.from({ length: N }, (_, n) => ({ suite: `no-such-suite-${n}`, n }))[Symbol.iterator]();
    const scratch = { n: -1 }; // what `local` writes each time, as eval's codec memory
    let waited = 0;
    const local = (job: { n: number }, atOnce: boolean): { n: number } => {
      scratch.n = job.n;
      if (atOnce) return scratch;
      waited++;
      return { ...scratch };
    };
    const seen: number[] = [];
    let here = 0;
    let there = 0;
    await pool.runOrdered<{ suite: string; n: number }, { n: number }>(jobs, (r: JobResult<{ n: number }>, job, index) => {
      expect(index).toBe(job.n);
      seen.push(index);
      if (r.ok) {
        expect(r.value.n).toBe(job.n); // its own result, not a later job's
        here++;
      } else {
        expect(r.message).toContain(`no-such-suite-${job.n}`);
        there++;
      }
    }, undefined, undefined, local);
    expect(seen).toEqual(Array.from({ length: N }, (_, i) => i));
    expect(here).toBeGreaterThan(0);
    expect(there).toBeGreaterThan(0);
    expect(waited).toBeGreaterThan(0); // some results of this thread waited for the worker's
  });

  it("a throw of `local` rejects the run once the worker's jobs are back", async () => {
    const jobs = Array.from({ length: 50 }, (_, n) => ({ suite: "none", n }))[Symbol.iterator]();
    const run = pool.runOrdered<{ suite: string; n: number }, number>(jobs, () => {}, undefined, undefined, () => {
      throw new RangeError("local failed");
    });
    await expect(run).rejects.toThrow("local failed");
  });
});
