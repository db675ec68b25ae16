/**
 * Sweeps split into shards and merged: the merge of shards 1..n is the single run's file, field by field and
 * byte for byte (with the single run itself spread over worker threads); the merge refuses missing, duplicate
 * and mismatched shards; shard k of n is a fixed set of cases; the per-case error estimate agrees with an
 * independent decimal.js evaluation at 100 digits.
 * The worker threads run dist/harness/run/worker-entry.js (`npm run build` first).
 */
import { describe, it, expect, beforeAll } from "vitest";
import { Decimal } from "decimal.js";
import { release, run } from "./helpers.js";
import { findRoutine, type Routine } from "../harness/module/routines.js";
import {
  checkGrid, runSweep, formatSweep, shardRange, caseInputs, unitHash, moduleIdentity, totalCases,
  ellipticErrorUlps, hyperbolicErrorUlps, parabolicErrorUlps, ulpAt, SWEEP_CHUNK, type Grid, type SweepDoc,
} from "../harness/run/sweep.js";
import { mergeSweeps, type SweepFile } from "../harness/run/merge.js";
import { Rng } from "../harness/core/rng.js";

const elliptic = findRoutine("kepler-elliptic")!;
const hyperbolic = findRoutine("kepler-hyperbolic")!;

async function sweep(routine: Routine, g: Grid, k: number, n: number, workers: number): Promise<SweepDoc> {
  const load = { build: "f64" };
  return runSweep(routine, g, { shard: { k, n }, workers, load, kernels: release(), module: moduleIdentity(load, "f64") });
}

async function shards(routine: Routine, g: Grid, n: number): Promise<SweepFile[]> {
  const out: SweepFile[] = [];
  for (let k = 1; k <= n; k++) out.push({ path: `part-${k}.json`, text: formatSweep(await sweep(routine, g, k, n, 1)) });
  return out;
}

// Corner-heavy elliptic grid (e towards 1 on a log scale, M over decades) plus seeded random points: more
// cases than one worker job, so the single run below really is spread over two worker threads.
const ellGrid = checkGrid(
  {
    inputs: { e: { from: 0, to: 0.9999999, count: 600, spacing: "log-near-1" }, M: { from: 1e-12, to: 3.2, count: 450, spacing: "log" } },
    random: { count: 100000, seed: 11 },
    checks: 4,
    worst: 3,
  },
  "test grid",
  elliptic,
);
// A hyperbolic grid whose e starts below 1: out-of-domain statuses to count and list.
const hypGrid = checkGrid({ inputs: { e: { from: 0.5, to: 3, count: 50 }, M: { from: -30, to: 30, count: 41 } }, checks: 3, worst: 2 }, "hyp grid", hyperbolic);

let single: SweepDoc;
let parts: SweepFile[];

beforeAll(async () => {
  expect(totalCases(ellGrid)).toBeGreaterThan(SWEEP_CHUNK);
  single = await sweep(elliptic, ellGrid, 1, 1, 2);
  parts = await shards(elliptic, ellGrid, 3);
});

describe("merge equals a single run", () => {
  it("elliptic, 3 shards against one run on 2 workers: every field, then the bytes", () => {
    const merged = mergeSweeps(parts);
    for (const key of Object.keys(single) as (keyof SweepDoc)[]) expect(merged[key], key).toEqual(single[key]);
    expect(Object.keys(merged)).toEqual(Object.keys(single));
    expect(formatSweep(merged)).toBe(formatSweep(single));
    // The summary is not empty: every case counted, estimates, worst cases checked with decimal.js.
    expect(single.cases).toBe(totalCases(ellGrid));
    expect(Object.values(single.status).reduce((a, b) => a + b, 0)).toBe(single.cases);
    expect(Object.values(single.iterations).reduce((a, b) => a + b, 0)).toBe(single.status.ok);
    expect(single.error!.worst).toHaveLength(3);
    for (const w of single.error!.worst) expect(w.ulp).toBeTypeOf("number");
    expect(single.reference!.checked).toBeGreaterThanOrEqual(5);
  });

  it("hyperbolic with failures, 4 shards in any order of files", async () => {
    const one = await sweep(hyperbolic, hypGrid, 1, 1, 1);
    const p = await shards(hyperbolic, hypGrid, 4);
    const merged = mergeSweeps([p[2]!, p[0]!, p[3]!, p[1]!]);
    expect(formatSweep(merged)).toBe(formatSweep(one));
    expect(one.status["out-of-domain"]).toBe(10 * 41); // e = 0.5 + 2.5 j / 49: j = 0..9 lie below 1
    expect(one.failures[0]!.status).toBe("out-of-domain");
    expect(one.failures.map((f) => f.index)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  });

  it("refuses a missing, a duplicate and a mismatched shard, naming the files", async () => {
    expect(() => mergeSweeps([parts[0]!, parts[2]!])).toThrow(/missing shard 2\/3; given: part-1\.json, part-3\.json/);
    expect(() => mergeSweeps([parts[0]!, parts[1]!, { path: "copy.json", text: parts[1]!.text }])).toThrow(/shard 2\/3 given twice: part-2\.json and copy\.json/);
    const other = checkGrid({ inputs: { e: { from: 0, to: 0.9, count: 10 }, M: { from: 0, to: 1, count: 10 } } }, "g2", elliptic);
    const foreign = { path: "foreign.json", text: formatSweep(await sweep(elliptic, other, 2, 3, 1)) };
    expect(() => mergeSweeps([parts[0]!, foreign, parts[2]!])).toThrow(/foreign\.json: grid differs from part-1\.json/);
    const wrongN = { path: "n4.json", text: formatSweep(await sweep(elliptic, other, 1, 4, 1)) };
    expect(() => mergeSweeps([foreign, wrongN])).toThrow(/n4\.json: number of shards differs/);
    const moved = JSON.parse(parts[1]!.text) as { shard: { first: number } };
    moved.shard.first += 1;
    expect(() => mergeSweeps([parts[0]!, { path: "moved.json", text: JSON.stringify(moved) }, parts[2]!])).toThrow(/moved\.json: shard 2\/3 covers cases/);
    const otherModule = JSON.parse(parts[1]!.text) as { module: { label: string } };
    otherModule.module.label = "f32";
    expect(() => mergeSweeps([parts[0]!, { path: "f32.json", text: JSON.stringify(otherModule) }, parts[2]!])).toThrow(/f32\.json: module differs/);
    expect(() => mergeSweeps([{ path: "x.json", text: "{}" }])).toThrow(/x\.json: not a sweep file/);
  });
});

describe("grid descriptions", () => {
  it("name the field that is wrong", () => {
    const bad = (g: unknown): unknown => () => checkGrid(g, "g.json", elliptic);
    expect(bad({ inputs: { e: { from: 0, to: 1 } } })).toThrow(/g\.json: inputs\.M is missing/);
    expect(bad({ inputs: { e: { from: 0, to: 0.5, count: 2.5 }, M: { from: 0, to: 1 } } })).toThrow(/g\.json: inputs\.e\.count must be a whole number/);
    expect(bad({ inputs: { e: { from: 0, to: 0.5 }, M: { from: 0, to: 1 }, x: { from: 0, to: 1 } } })).toThrow(/inputs\.x: routine kepler-elliptic has no input 'x'/);
    expect(bad({ inputs: { e: { from: 0, to: 1, spacing: "log-near-1" }, M: { from: 0, to: 1 } } })).toThrow(/inputs\.e: log-near-1 spacing needs from and to below 1/);
    expect(bad({ inputs: { e: { from: 0, to: 0.5 }, M: { from: 0, to: 1, spacing: "cubic" } } })).toThrow(/inputs\.M\.spacing: 'cubic' is not one of/);
    expect(bad({ inputs: { e: { from: 0, to: 0.5 }, M: { from: 0, to: 1 } }, random: { count: 5 } })).toThrow(/random\.seed must be a whole number/);
    expect(bad({ inputs: { e: { from: 0, to: 0.5 }, M: { from: 0, to: 1 } }, seed: 3 })).toThrow(/unknown field 'seed'/);
  });

  it("log spacing: evenly spaced logarithms with exact end points; log-near-1 crowds towards 1", () => {
    const g = checkGrid({ inputs: { e: { from: 0.9, to: 0.999999, count: 6, spacing: "log-near-1" }, M: { from: 1e-8, to: 1e2, count: 11, spacing: "log" } } }, "g", elliptic);
    const Ms = Array.from({ length: 11 }, (_, j) => caseInputs(elliptic, g, j)[1]!);
    expect(Ms[0]).toBe(1e-8);
    expect(Ms[10]).toBe(1e2);
    Ms.forEach((M, j) => expect(Math.log10(M)).toBeCloseTo(j - 8, 12));
    const es = Array.from({ length: 6 }, (_, j) => caseInputs(elliptic, g, j * 11)[0]!);
    es.forEach((e, j) => expect(Math.log10(1 - e)).toBeCloseTo(-1 - j, 9));
  });
});

describe("shards are fixed sets of cases", () => {
  it("shard ranges are contiguous and cover every case once, also with more shards than cases", () => {
    for (const [total, n] of [[10, 3], [7, 7], [3, 5], [320000, 3], [2 ** 40 + 3, 1000]] as const) {
      let next = 0;
      for (let k = 1; k <= n; k++) {
        const r = shardRange(total, k, n);
        expect(r.first).toBe(next);
        expect(r.end).toBeGreaterThanOrEqual(r.first);
        next = r.end;
      }
      expect(next).toBe(total);
    }
  });

  it("the recorded cases are the cases their numbers name (grid odometer and random points)", () => {
    const recorded = [...single.reference!.samples, ...single.error!.worst];
    expect(recorded.some((c) => c.index >= 600 * 450)).toBe(true); // at least one random point
    for (const c of recorded) {
      const want = caseInputs(elliptic, ellGrid, c.index);
      expect([c.inputs.e, c.inputs.M]).toEqual(want);
      const [st, E] = run(release(), "kepler_elliptic", want);
      expect(st).toBe(0);
      expect(c.got).toBe(E);
    }
  });

  it("the counter-based random numbers lie in [0, 1) and average 1/2", () => {
    let sum = 0;
    let outside = 0;
    const n = 100000;
    for (let i = 0; i < n; i++) {
      const u = unitHash(7, i, i % 3);
      if (!(u >= 0 && u < 1)) outside++;
      sum += u;
    }
    expect(outside).toBe(0);
    expect(Math.abs(sum / n - 0.5)).toBeLessThan(0.005); // 1/sqrt(12 n) = 0.0009: five standard deviations
    expect(unitHash(7, 5, 0)).not.toBe(unitHash(8, 5, 0));
    expect(unitHash(7, 5, 0)).not.toBe(unitHash(7, 5, 1));
  });
});

// The exact value of a double in decimal.js, from its integer significand and a power of two (decimal.js
// reads the hex-float form 0x1.xp-N with 2^-N taken through a shortest decimal string when N < 54, which is
// not exact; this path avoids it).
const D = Decimal.clone({ precision: 100 });
function exact(x: number): Decimal {
  const v = new DataView(new ArrayBuffer(8));
  v.setFloat64(0, x);
  const bits = v.getBigUint64(0);
  const ex = Number((bits >> 52n) & 0x7ffn);
  const man = (bits & ((1n << 52n) - 1n)) | (ex === 0 ? 0n : 1n << 52n);
  const r = new D(man.toString()).times(new D(2).pow(Math.max(ex, 1) - 1075));
  return bits >> 63n ? r.neg() : r;
}

describe("the error estimate against decimal.js", () => {
  /** Newton distance f/f' in ULPs of x at 100 digits: the signed distance to the root to first order. */
  const truth = (f: Decimal, fp: Decimal, x: number): number => f.div(fp).abs().div(ulpAt(x)).toNumber();

  it("elliptic: within 0.02 ULP where |E| <= 1 (series form), within 1.5 ULP elsewhere; a moved root shows up", () => {
    const rng = new Rng(5);
    const k = release();
    for (let i = 0; i < 60; i++) {
      const e = i % 2 ? 1 - Math.pow(10, -rng.between(0.3, 12)) : rng.uniform();
      const M = i % 3 ? Math.pow(10, -rng.between(0, 10)) : rng.between(-7, 7);
      const [st, E] = run(k, "kepler_elliptic", [e, M]);
      expect(st).toBe(0);
      let atRoot = 0;
      for (const moved of [0, 3]) {
        const x = moved === 0 ? E! : E! + moved * ulpAt(E!);
        const X = exact(x);
        const f = X.minus(exact(e).times(D.sin(X))).minus(exact(M));
        const want = truth(f, new D(1).minus(exact(e).times(D.cos(X))), x);
        const got = ellipticErrorUlps(e, M, x);
        expect(Math.abs(got - want), `e=${e} M=${M} E=${x}`).toBeLessThan(Math.abs(x) <= 1 ? 0.02 : 1.5);
        if (moved === 0) atRoot = got;
        // Three ULPs further on: |d + 3| + |d| >= 3, so the estimate cannot hide the move.
        else expect(got + atRoot).toBeGreaterThan(Math.abs(x) <= 1 ? 2.9 : 2);
      }
    }
  });

  it("hyperbolic and parabolic: within 0.02 ULP near periapsis, 1.5 ULP elsewhere", () => {
    const rng = new Rng(6);
    const k = release();
    for (let i = 0; i < 30; i++) {
      const e = 1 + Math.pow(10, rng.between(-8, 1));
      const M = Math.pow(10, rng.between(-8, 3));
      const [st, H] = run(k, "kepler_hyperbolic", [e, M]);
      expect(st).toBe(0);
      const X = exact(H!);
      const f = exact(e).times(D.sinh(X)).minus(X).minus(exact(M));
      const want = truth(f, exact(e).times(D.cosh(X)).minus(1), H!);
      expect(Math.abs(hyperbolicErrorUlps(e, M, H!) - want), `e=${e} M=${M}`).toBeLessThan(Math.abs(H!) <= 1 ? 0.02 : 1.5);
      const [st2, Dp] = run(k, "kepler_parabolic", [M]);
      expect(st2).toBe(0);
      const Y = exact(Dp!);
      const g = Y.plus(Y.pow(3).div(3)).minus(exact(M));
      expect(Math.abs(parabolicErrorUlps(M, Dp!) - truth(g, Y.pow(2).plus(1), Dp!)), `M=${M}`).toBeLessThan(0.02);
    }
  });
});
