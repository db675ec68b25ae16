/**
 * `areal compare a.csv b.csv` for real traces: b's columns renamed to a's (--map), columns left out or picked
 * (--ignore, --only), status read as a number or a word (0 and ok are the same status), tolerances per column in
 * ulp, relative or absolute, and the first and the worst rows beyond the tolerance per column. Exit 1 on a
 * difference beyond the tolerance. The expected ulp counts are from the IEEE 754 binary64 layout (one ulp of a
 * double in [1, 2) is 2^-52), not from the code under test.
 */
import { describe, it, expect } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { compareCsv, parseTolerance } from "../harness/verify/compare-files.js";
import { areal } from "./helpers.js";

const OURS = "e,M,E,iterations,status\n0.5,1,1.5,3,ok\n0.9,0.25,1.25,2,ok\n2,1,NaN,NaN,out-of-domain\n0.1,3,3,2,ok\n";
// E: row 1 is 2 ulp above 1.5 (ulp 2^-52 in [1, 2)), row 2 is 1e-10 off, row 4 the same; status as codes.
const THEIRS = `ecc,mean,ecc_anom,rc,flag\n0.5,1,${1.5 + 2 * 2 ** -52},0,x\n0.9,0.25,${1.25 + 1e-10},0,y\n2,1,NaN,17,z\n0.1,3,3,0,w\n`;
const MAP = { ecc: "e", mean: "M", ecc_anom: "E", rc: "status" };

describe("compare a.csv b.csv with mapped columns, status codes and tolerances per column", () => {
  it("status 0 and ok (17 and out-of-domain) are the same; a different status is beyond any tolerance", () => {
    const c = compareCsv(OURS, "ours", THEIRS, "theirs", { map: MAP, only: ["status"] });
    expect(c.columns.map((d) => [d.column, d.columnB, d.differing])).toEqual([["status", "rc", 0]]);
    expect(c.firstBeyond).toBeUndefined();
    const d = compareCsv(OURS, "ours", THEIRS.replace("2,1,NaN,17", "2,1,NaN,18"), "theirs", { map: MAP, only: ["status"], tol: { "*": { kind: "abs", value: 1e300 } } });
    expect(d.columns[0]).toMatchObject({ beyond: 1, first: { row: 3, a: "out-of-domain", b: "18" } });
  });

  it("a tolerance per column in ulp or relative; the first and the worst rows beyond it", () => {
    const c = compareCsv(OURS, "ours", THEIRS, "theirs", { map: MAP, ignore: ["iterations", "flag"], tol: { E: { kind: "ulp", value: 2 } } });
    const e = c.columns.find((d) => d.column === "E")!;
    expect(e.maxUlp).toBeGreaterThan(2); // 1e-10 is about 450,000 ulp at 1.25
    expect(e).toMatchObject({ differing: 2, beyond: 1, first: { row: 2 }, worst: { row: 2 } });
    const within = compareCsv(OURS, "ours", THEIRS, "theirs", { map: MAP, ignore: ["iterations", "flag"], tol: { E: { kind: "rel", value: 1e-9 } } });
    expect(within.firstBeyond).toBeUndefined();
    const strict = compareCsv(OURS, "ours", THEIRS, "theirs", { map: MAP, ignore: ["iterations", "flag"], tol: { E: { kind: "ulp", value: 1 } } });
    expect(strict.columns.find((d) => d.column === "E")).toMatchObject({ beyond: 2, first: { row: 1, diff: 2 }, worst: { row: 2 } });
  });

  it("tolerance syntax: 4ulp, 1e-12rel, 1e-9abs, a bare number is absolute; anything else is refused", () => {
    expect(parseTolerance("4ulp")).toEqual({ kind: "ulp", value: 4 });
    expect(parseTolerance("1e-12rel")).toEqual({ kind: "rel", value: 1e-12 });
    expect(parseTolerance("1e-9abs")).toEqual({ kind: "abs", value: 1e-9 });
    expect(parseTolerance("0.5")).toEqual({ kind: "abs", value: 0.5 });
    for (const bad of ["-1ulp", "ulp", "4 ulps", "1e-9 m", ""]) expect(parseTolerance(bad)).toBeUndefined();
  });

  it("through the CLI: exit 1 beyond, 0 within; bad options name the flag (exit 2)", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-cmp-user-"));
    const a = join(dir, "ours.csv");
    const b = join(dir, "theirs.csv");
    writeFileSync(a, OURS);
    writeFileSync(b, THEIRS);
    const maps = Object.entries(MAP).flatMap(([t, o]) => ["--map", `${t}=${o}`]);
    const r = areal("compare", a, b, ...maps, "--ignore", "iterations", "--ignore", "flag", "--tol", "E=4ulp");
    expect(r.code).toBe(1);
    expect(r.out).toContain("not compared: iterations, flag");
    expect(r.out).toMatch(/E: first row 2: 1\.25 vs 1\.2500000001 \(\d+ ulp\); worst row 2/);
    expect(areal("compare", a, b, ...maps, "--only", "E", "--only", "status", "--tol", "E=1e-9rel").code).toBe(0);
    const bad = areal("compare", a, b, "--tol", "E=4ulps");
    expect(bad.code).toBe(2);
    expect(bad.err).toContain("--tol: 'E=4ulps'");
    expect(areal("compare", a, b, "--map", "nope=e").err).toContain("--map nope=e: ");
    expect(areal("compare", a, b).err).toContain("rename with --map theirs=ours");
  });
});
