/**
 * A broken invariant budget is not hidden by an ok status: `areal eval integrate` counts the rows whose run went
 * over a budget in its summary line and exits 1 (docs: `areal eval --help`); rows within their budgets leave the
 * summary and the exit code as before. The count is checked against the output's own *_step columns.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal } from "./helpers.js";

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-budgets-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const HEAD = "mu,r0x,r0y,r0z,v0x,v0y,v0z,step,steps,method,energy_budget";
// Invented low orbit (WGS 84 GM); RK4 at 60 s steps drifts in energy by about 1e-9 over 500 steps, Yoshida stays
// near 1e-11: a budget of 1e-12 breaks on the first, 1e-3 holds on the second.
const TIGHT = "398600.4418,7000,0,0,0,7.5,1,60,500,rk4,1e-12";
const LOOSE = "398600.4418,7000,0,0,0,7.5,1,60,500,yoshida4,1e-3";

describe("eval integrate and its budgets", () => {
  it("a broken budget is counted in the summary and the exit code is 1; the CSV's energy_step agrees", () => {
    const input = join(dir, "in.csv");
    writeFileSync(input, [HEAD, TIGHT, LOOSE, LOOSE].join("\n") + "\n");
    const out = join(dir, "out.csv");
    const r = areal("eval", "integrate", "--input", input, "--out", out);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/3 rows \(3 ok; an invariant budget broken on 1 of them/);
    const rows = readFileSync(out, "utf8").trim().split("\n");
    const c = rows[0]!.split(",").indexOf("energy_step");
    const over = rows.slice(1).filter((l) => Number(l.split(",")[c]) >= 0);
    expect(over.length).toBe(1);
  });

  it("rows within their budgets: exit 0 and no budget in the summary", () => {
    const input = join(dir, "ok.csv");
    writeFileSync(input, [HEAD, LOOSE].join("\n") + "\n");
    const r = areal("eval", "integrate", "--input", input, "--out", join(dir, "ok-out.csv"));
    expect(r.code).toBe(0);
    expect(r.err).not.toMatch(/invariant budget/);
  });
});
