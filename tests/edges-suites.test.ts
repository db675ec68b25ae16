/**
 * The edges of every Kepler, anomaly and element kernel's domain (docs/edges.md): each suite's vector file holds
 * seeded `edge-*` groups there, appended after its other cases, and both builds meet the suite's own limits on
 * them. The references are the suites' independent decimal.js ones (harness/verify/reference/), stored in
 * vectors/<suite>.csv; the limits come from vectors/limits.json.
 *
 * The table in docs/edges.md and README.md is this file's measurement: `AREAL_EDGES_TABLE=1 npx vitest run
 * tests/edges-suites.test.ts` prints, per kernel and edge, the worst error, the conditioning there and the worst
 * ratio error / conditioning (conditioning at least one unit: 1 ulp, or 2^-53 relative, or 2^-53 max(1, |ref|)
 * absolute; on the single-precision build the two-body suites' cond_* columns, per f64 ulp of an input, are
 * scaled by 2^29 to one f32 ulp). The Kepler suites store no conditioning column; there it is the root's, from implicit
 * differentiation of Kepler's equation (common practice): one ulp of e or M moves E by
 * (|sin E| ulp(e) + ulp(M)) / (1 - e cos E), H by (|sinh H| ulp(e) + ulp(M)) / (e cosh H - 1), D by ulp(M) / (1 + D^2).
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import { findSpec } from "../harness/verify/specs/index.js";
import { runSuite } from "../harness/verify/check.js";
import { readVectors, vectorPath, col, type VectorSet } from "../harness/verify/vectors.js";
import { findRoutine } from "../harness/module/routines.js";
import { ulpDistance, ulpDistance32 } from "../harness/core/float.js";
import { isOk } from "../harness/module/status.js";
import type { Kernels } from "../harness/module/load.js";

/** The edge groups each suite must hold (docs/edges.md), at least MIN_CASES cases each. */
const EDGES: Readonly<Record<string, readonly string[]>> = {
  "kepler-elliptic": ["edge-M0", "edge-e0", "edge-e1", "edge-revs", "edge-huge"],
  "kepler-hyperbolic": ["edge-M0", "edge-e1", "edge-huge-e", "edge-huge-M"],
  "kepler-parabolic": ["edge-ends", "edge-mid", "edge-wide"],
  "true-to-anomaly": ["edge-nu0", "edge-e0", "edge-e1-", "edge-parabola", "edge-e1+", "edge-huge-e", "edge-revs"],
  "anomaly-to-true": ["edge-x0", "edge-e0", "edge-e1-", "edge-parabola", "edge-e1+", "edge-huge-e", "edge-revs"],
  "true-to-mean": ["edge-nu0", "edge-e0", "edge-e1-", "edge-parabola", "edge-e1+", "edge-huge-e", "edge-revs"],
  "time-of-flight": ["edge-scale", "edge-e0", "edge-e1", "edge-huge-e", "edge-pi", "edge-revs"],
  elements: ["edge-e0", "edge-e1-", "edge-e1+", "edge-huge-e", "edge-i0", "edge-ipi", "edge-nu", "edge-scale", "edge-rectilinear"],
  state: ["edge-e0", "edge-e1-", "edge-e1+", "edge-huge-e", "edge-i0", "edge-ipi", "edge-nu", "edge-scale", "edge-rectilinear"],
  equinoctial: ["edge-e0", "edge-e1-", "edge-e1+", "edge-huge-e", "edge-i0", "edge-nu", "edge-scale", "edge-rectilinear"],
  "from-equinoctial": ["edge-e0", "edge-e1", "edge-huge-e", "edge-i0", "edge-ipi", "edge-L", "edge-scale", "edge-rectilinear"],
};
const MIN_CASES = 3;

const edgeRows = (v: VectorSet, tag?: string): number[] =>
  v.tags.flatMap((t, i) => (t.startsWith("edge-") && (tag === undefined || t === tag) ? [i] : []));

/** The conditioning (in the comparison's own unit) of a Kepler suite's case, from implicit differentiation. */
function keplerCond(suite: string, row: readonly number[], v: VectorSet, single: boolean): number {
  const u = (x: number): number => (single ? 2 ** (Math.floor(Math.log2(Math.abs(x) || 2 ** -149)) - 23) : 2 ** (Math.floor(Math.log2(Math.abs(x) || 2 ** -1074)) - 52));
  const ulpOf = (x: number): number => Math.max(u(x), single ? 2 ** -149 : 2 ** -1074);
  if (suite.startsWith("kepler-parabolic")) {
    const D = row[col(v, "D_ref")]!;
    return ulpOf(row[col(v, "M")]!) / (1 + D * D) / ulpOf(D);
  }
  const e = row[col(v, "e")]!;
  const M = row[col(v, "M")]!;
  if (suite.startsWith("kepler-elliptic")) {
    const E = row[col(v, "E_ref")]!;
    return (Math.abs(Math.sin(E)) * ulpOf(e) + ulpOf(M)) / ((1 - e) + e * (1 - Math.cos(E))) / ulpOf(E);
  }
  const H = row[col(v, "H_ref")]!;
  return (Math.abs(Math.sinh(H)) * ulpOf(e) + ulpOf(M)) / ((e - 1) + e * (Math.cosh(H) - 1)) / ulpOf(H);
}

export interface EdgeFigure {
  suite: string;
  tag: string;
  output: string;
  cases: number;
  /** Worst error (the comparison's metric) and the conditioning on that case. */
  err: number;
  cond: number;
  /** Worst of err / max(cond, one unit) over the group's cases. */
  ratio: number;
  metric: string;
}

/** Per-edge figures of one suite on one build: every compared output, every edge group. */
function measure(suite: string, k: Kernels): EdgeFigure[] {
  const spec = findSpec(suite)!;
  const v = readVectors(vectorPath(suite));
  const routine = findRoutine(spec.routine)!;
  const argCols = routine.inputs.map((inp) => col(v, inp.name));
  const outIndex = new Map(routine.outputs.map((o, i) => [o, i]));
  const isSingle = k.realBytes === 4;
  const figs = new Map<string, EdgeFigure>();
  for (const r of edgeRows(v)) {
    const row = v.values[r]!;
    const args = argCols.map((c) => row[c]!);
    if (isSingle && args.some((x) => Math.fround(x) !== x || (x !== 0 && Math.abs(x) < 1.1754943508222875e-38))) continue;
    if (!isOk(k.call(routine.exportName, args))) continue; // status failures are the check's business (runSuite)
    for (const c of spec.compare) {
      const refs = c.refGroup?.map((n) => col(v, n)) ?? [col(v, c.ref)];
      const outs = c.group?.map((n) => outIndex.get(n)!) ?? [outIndex.get(c.output)!];
      const want = Math.hypot(...refs.map((q) => row[q]!));
      if (Number.isNaN(want)) continue;
      const absErr = Math.hypot(...outs.map((s, q) => k.out[s]! - row[refs[q]!]!));
      const w1 = row[refs[0]!]!;
      const got1 = k.out[outs[0]!]!;
      let err: number;
      let cond: number;
      let unit: number;
      if (c.metric === "ulp") {
        err = isSingle ? ulpDistance32(got1, Math.fround(w1)) : ulpDistance(got1, w1);
        cond = c.cond ? row[col(v, c.cond)]! : suite.startsWith("kepler-") ? keplerCond(suite, row, v, isSingle) : 0;
        unit = 1;
      } else {
        const eps = isSingle ? 2 ** -24 : 2 ** -53;
        err = c.metric === "rel" ? (want === 0 ? absErr : absErr / want) : absErr;
        // The two-body cond_* columns are per f64 ulp of an input; one f32 ulp is 2^29 of them.
        cond = c.cond ? row[col(v, c.cond)]! * (isSingle ? 2 ** 29 : 1) : 0;
        unit = c.metric === "rel" ? eps : eps * Math.max(1, Math.abs(w1));
      }
      const ratio = err / Math.max(cond, unit);
      const key = `${v.tags[r]}|${c.output}`;
      const f = figs.get(key) ?? { suite, tag: v.tags[r]!, output: c.output, cases: 0, err: 0, cond: 0, ratio: 0, metric: c.metric };
      f.cases++;
      if (err > f.err || (err === f.err && f.cases === 1)) {
        f.err = err;
        f.cond = cond;
      }
      f.ratio = Math.max(f.ratio, ratio);
      figs.set(key, f);
    }
  }
  return [...figs.values()];
}

const fig = (x: number): string => (x === 0 ? "0" : Number.isInteger(x) && x < 1e6 ? String(x) : x.toPrecision(2));
const printed: EdgeFigure[] = [];

for (const suite of Object.keys(EDGES)) {
  describe(`${suite}: the edges of the domain`, () => {
    const v = readVectors(vectorPath(suite));
    it(`holds the edge groups ${EDGES[suite]!.join(", ")} (at least ${MIN_CASES} cases each)`, () => {
      for (const tag of EDGES[suite]!) expect(edgeRows(v, tag).length, tag).toBeGreaterThanOrEqual(MIN_CASES);
    });
    it("release build: every edge case solved within the suite's limits", () => {
      const res = runSuite(findSpec(suite)!, release(), { rows: edgeRows(v), vectors: v });
      expect(res.reasons).toEqual([]);
      printed.push(...measure(suite, release()));
    });
    const f32 = findSpec(`${suite}-f32in`);
    if (f32 !== undefined) {
      const v32 = readVectors(vectorPath(f32.suite));
      it(`${f32.suite}: the companion keeps edge cases; single-precision build within its limits there`, () => {
        const rows = edgeRows(v32);
        expect(rows.length).toBeGreaterThan(0);
        const res = runSuite(f32, single(), { rows, vectors: v32 });
        expect(res.reasons).toEqual([]);
        printed.push(...measure(f32.suite, single()).map((f) => ({ ...f, suite: `${f.suite} (f32 build)` })));
      });
    }
  });
}

describe("the measured table", () => {
  it("prints the worst error / conditioning per kernel and edge when AREAL_EDGES_TABLE is set", () => {
    if (process.env.AREAL_EDGES_TABLE === undefined) return;
    const lines = printed.map((f) => `| ${f.suite} | ${f.tag} | ${f.output} | ${f.cases} | ${fig(f.err)} ${f.metric} | ${fig(f.cond)} | ${fig(f.ratio)} |`);
    process.stdout.write(["| suite | edge | output | cases | worst error | conditioning there | worst error / cond |", "| --- | --- | --- | --- | --- | --- | --- |", ...lines].join("\n") + "\n");
  });
});
