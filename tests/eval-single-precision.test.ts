/**
 * Single precision that changes what an input means is not hidden behind a status: `areal eval --build f32`
 * counts the rows whose inputs became infinite, became 0 or had e rounded to 1, names each kind in its summary
 * line and exits 1 (README, "Command line"); `areal check --build f32` names the same kinds among the rows it
 * skips and keeps its exit code. The expected kinds follow from IEEE 754-2008 binary32 (largest finite
 * 3.4028234663852886e38, smallest subnormal 2^-149, spacing 2^-24 just below 1 and 2^-23 just above), not from
 * the code under test; the check's count is recomputed here from the vector file.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal, single, release } from "./helpers.js";
import { evaluateCsv, LOST_IN_F32 } from "../harness/run/evaluate.js";
import { findRoutine } from "../harness/module/routines.js";
import { readVectors, vectorPath, col } from "../harness/verify/vectors.js";

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-single-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("eval on the f32 build", () => {
  // e = 1 - 1e-8 is within half a spacing (2^-25 = 2.98e-8) of 1; M = 1e39 is beyond the binary32 range; M = 1e-50
  // is below half the smallest subnormal (2^-150 = 7e-46). The first row keeps its meaning.
  const ROWS = ["e,M", "0.5,1", "0.99999999,1", "0.3,1e39", "0.3,1e-50"];

  it("counts and names the rows that lost their meaning, and exits 1", () => {
    const input = join(dir, "in.csv");
    writeFileSync(input, ROWS.join("\n") + "\n");
    const r = areal("eval", "kepler-elliptic", "--input", input, "--build", "f32", "--out", join(dir, "out.csv"));
    expect(r.code, r.err).toBe(1);
    expect(r.err).toContain("3 rows lost meaning in single precision: ");
    expect(r.err).toContain("e rounded to 1 (1)");
    expect(r.err).toContain("M beyond the f32 range, became infinite (1)");
    expect(r.err).toContain("M below the f32 range, became 0 (1)");
  });

  it("in process: the status counts carry the rows lost and each kind (what the command line's summary prints)", () => {
    const routine = findRoutine("kepler-elliptic")!;
    const text = ROWS.join("\n") + "\n";
    const st = evaluateCsv(routine, text, "in.csv", single()).statuses;
    expect(st[LOST_IN_F32]).toBe(3);
    expect(st[`${LOST_IN_F32}:e rounded to 1`]).toBe(1);
    expect(st[`${LOST_IN_F32}:M beyond the f32 range, became infinite`]).toBe(1);
    expect(st[`${LOST_IN_F32}:M below the f32 range, became 0`]).toBe(1);
    expect(Object.keys(evaluateCsv(routine, text, "in.csv", release()).statuses).some((w) => w.startsWith(LOST_IN_F32))).toBe(false);
  });

  it("the same rows on the f64 build: nothing lost, exit 0; on f32 rows that keep their meaning: exit 0", () => {
    const input = join(dir, "in64.csv");
    writeFileSync(input, ROWS.join("\n") + "\n");
    const r = areal("eval", "kepler-elliptic", "--input", input, "--out", join(dir, "out64.csv"));
    expect(r.code, r.err).toBe(0);
    expect(r.err).not.toContain("single precision");
    const ok = join(dir, "ok.csv");
    writeFileSync(ok, "e,M\n0.5,1\n0.9999,3\n");
    const s = areal("eval", "kepler-elliptic", "--input", ok, "--build", "f32", "--out", join(dir, "ok-out.csv"));
    expect(s.code, s.err).toBe(0);
    expect(s.err).not.toContain("single precision");
  });
});

describe("check on the f32 build", () => {
  it("names the kepler-hyperbolic rows whose e or M single precision cannot hold, and keeps exit 0", () => {
    const v = readVectors(vectorPath("kepler-hyperbolic"));
    const ce = col(v, "e");
    const cm = col(v, "M");
    // Rounding to nearest, ties to even: |x| >= 2^128 - 2^103 (F32_MAX plus half its spacing) overflows, |x| <= 2^-150
    // (half the smallest subnormal) goes to 0, 1 < e <= 1 + 2^-24 and 1 - 2^-25 <= e < 1 round to 1.
    const beyond = (x: number): boolean => Math.abs(x) >= 2 ** 128 - 2 ** 103;
    const below = (x: number): boolean => x !== 0 && Math.abs(x) <= 2 ** -150;
    const toOne = (e: number): boolean => (e > 1 && e - 1 <= 2 ** -24) || (e < 1 && 1 - e <= 2 ** -25);
    const rows = v.values.filter((row) => beyond(row[ce]!) || beyond(row[cm]!) || below(row[cm]!) || below(row[ce]!) || toOne(row[ce]!));
    expect(rows.length).toBeGreaterThan(0);
    const r = areal("check", "--build", "f32", "--suite", "kepler-hyperbolic");
    expect(r.code, r.err).toBe(0);
    const text = r.out.replace(/\n/g, " ");
    expect(text).toContain(`${rows.length} rows lost meaning in single precision: `);
    expect(text).toMatch(/e beyond the f32 range, became infinite \(\d+\)/);
  });
});
