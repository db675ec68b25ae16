/**
 * `areal trajectory --plan FILE` with `"transition": true` (docs/trajectory-plan.md), through the real entry point:
 * the CSV gains `symp_dev` and `phi_11` .. `phi_66` on every row, documented in its header; the last row's Phi is
 * integrate_transition's for the same run (the one-shot call is the outside check of the stepwise plumbing: the
 * CSV must carry the very bits); a `symp` budget broken is named with the step the kernel reports, exit 1; `symp`
 * without `transition` is a plan error naming the field, exit 2. And `areal eval integrate-transition`: a broken
 * symplectic budget counts in the summary and exits 1, its `symp_step` column the one-shot call's.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release, areal } from "./helpers.js";
import { METHODS } from "./integrate-helpers.js";
import { slotsOf } from "../harness/module/routines.js";

const PHI = Array.from({ length: 36 }, (_, q) => `phi_${Math.floor(q / 6) + 1}${(q % 6) + 1}`);
const PLAN = {
  mission: "Marrowfield Survey",
  spacecraft: "QUILLWORT-2",
  epoch: "2027-03-14T06:00:00",
  mu: 398600.4418,
  radius: 6378.137,
  j2: 1.0826266836e-3,
  j3: -2.5326564853e-6,
  r: [503.432475293, -871.970625388, 6997.57661265],
  v: [-6.50670610609, -3.75664852189, 0],
  method: "rk4",
  step: 60,
  steps: 120,
  transition: true,
};
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-trajectory-phi-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function planFile(name: string, changes: Record<string, unknown>): string {
  const p = join(dir, `${name}.json`);
  writeFileSync(p, JSON.stringify({ ...PLAN, ...changes }));
  return p;
}

function csvOf(path: string): { header: string[]; cols: string[]; rows: number[][] } {
  const lines = readFileSync(path, "utf8").split("\n").filter((l) => l !== "");
  const header = lines.filter((l) => l.startsWith("#"));
  const data = lines.filter((l) => !l.startsWith("#"));
  return { header, cols: data[0]!.split(","), rows: data.slice(1).map((l) => l.split(",").map(Number)) };
}

/** max |Phi~^T J Phi~ - J| of the scale-free Phi~ = D^-1 Phi D (D = diag(L, L, L, V, V, V)), recomputed here. */
function defectHere(phi: readonly number[]): number {
  const L = Math.hypot(...PLAN.r);
  const d = (i: number): number => (i < 3 ? L : Math.sqrt(PLAN.mu / L));
  const P = (i: number, j: number): number => (phi[6 * i + j]! * d(j)) / d(i);
  let worst = 0;
  for (let a = 0; a < 6; a++) {
    for (let b = 0; b < 6; b++) {
      let s = 0;
      for (let i = 0; i < 3; i++) s += P(i, a) * P(i + 3, b) - P(i + 3, a) * P(i, b);
      worst = Math.max(worst, Math.abs(s - (a < 3 && b === a + 3 ? 1 : a >= 3 && b === a - 3 ? -1 : 0)));
    }
  }
  return worst;
}

/** integrate_transition for the plan, one shot: Phi and the symplectic summary. */
function oneShot(budget: number): { phi: number[]; sympStep: number; sympDev: number } {
  const k = release();
  const S: Readonly<Record<string, number>> = slotsOf("integrate_transition", "symp_dev", "symp_step", ...PHI);
  const st = k.call("integrate_transition", [PLAN.mu, ...PLAN.r, ...PLAN.v, PLAN.step, PLAN.steps, METHODS.rk4, PLAN.j2, PLAN.j3,
    PLAN.radius, 0, 0, 0, 0, budget]);
  expect(st).toBe(0);
  const at = (n: string): number => k.out[S[n]!]!;
  return { phi: PHI.map(at), sympStep: at("symp_step"), sympDev: at("symp_dev") };
}

describe("areal trajectory with the transition matrix", () => {
  it("writes symp_dev and phi_11..phi_66 on every row, documented, with integrate_transition's bits at the end", () => {
    const csv = join(dir, "phi.csv");
    const res = areal("trajectory", "--plan", planFile("phi", {}), "--csv", csv, "--oem", join(dir, "phi.oem"), "--date", "2026-12-05");
    expect(res.code, res.err).toBe(0);
    const { header, cols, rows } = csvOf(csv);
    for (const c of ["symp_dev", ...PHI]) {
      expect(cols).toContain(c);
      expect(header.some((h) => h.startsWith(`# column ${c} [`))).toBe(true);
    }
    expect(header.some((h) => h.includes("# column phi_14 [s]: d x / d vx0"))).toBe(true);
    expect(rows.length).toBe(PLAN.steps + 1);
    const at = (row: number[], c: string): number => row[cols.indexOf(c)]!;
    // step 0: Phi = I, defect 0
    PHI.forEach((c, q) => expect(at(rows[0]!, c)).toBe(q % 7 === 0 ? 1 : 0));
    expect(at(rows[0]!, "symp_dev")).toBe(0);
    const last = rows[rows.length - 1]!;
    const ref = oneShot(0);
    expect(PHI.map((c) => at(last, c))).toEqual(ref.phi);
    // the largest symp_dev of the rows is the kernel's running maximum
    expect(Math.max(...rows.map((r) => at(r, "symp_dev")))).toBe(ref.sympDev);
    expect(res.err).toMatch(/symp \d/);
    // each row's symp_dev is the defect of that row's Phi (recounted here; rounding 1e-12 relative + 1e-13)
    for (const r of rows) {
      const d = defectHere(PHI.map((c) => at(r, c)));
      expect(Math.abs(at(r, "symp_dev") - d)).toBeLessThanOrEqual(1e-12 * d + 1e-13);
    }
  });

  it("symp_dev is this step's defect, not the running maximum: with verlet it goes down as well as up", () => {
    const csv = join(dir, "verlet.csv");
    const res = areal("trajectory", "--plan", planFile("verlet", { method: "verlet" }), "--csv", csv, "--oem", join(dir, "verlet.oem"), "--date", "2026-12-05");
    expect(res.code, res.err).toBe(0);
    const { cols, rows } = csvOf(csv);
    const d = rows.map((r) => r[cols.indexOf("symp_dev")]!);
    expect(d.some((x, i) => i > 0 && x < d[i - 1]!)).toBe(true);
  });

  it("a symp budget broken is named with the kernel's first step; exit 1", () => {
    const budget = 1e-6;
    const ref = oneShot(budget);
    expect(ref.sympStep).toBeGreaterThan(0);
    const res = areal("trajectory", "--plan", planFile("budget", { budgets: { symp: budget } }), "--csv", join(dir, "b.csv"),
      "--oem", join(dir, "b.oem"), "--date", "2026-12-05");
    expect(res.code).toBe(1);
    expect(res.err).toContain(`budget broken: symp deviation above ${budget} first at step ${ref.sympStep} `);
  });

  it("a symp budget without transition is a plan error naming the field; exit 2", () => {
    const res = areal("trajectory", "--plan", planFile("nophi", { transition: false, budgets: { symp: 1e-6 } }), "--csv",
      join(dir, "n.csv"), "--oem", join(dir, "n.oem"));
    expect(res.code).toBe(2);
    expect(res.err).toContain("budgets.symp");
    const bad = areal("trajectory", "--plan", planFile("badphi", { transition: "yes" }), "--csv", join(dir, "y.csv"), "--oem", join(dir, "y.oem"));
    expect(bad.code).toBe(2);
    expect(bad.err).toContain("$.transition: expected a boolean");
  });
});

describe("areal eval integrate-transition", () => {
  it("a broken symplectic budget is counted in the summary, exit 1; symp_step is the kernel's", () => {
    const budget = 1e-6;
    const head = "mu,r0x,r0y,r0z,v0x,v0y,v0z,step,steps,method,j2,j3,radius,symp_budget";
    const row = (m: string): string => [PLAN.mu, ...PLAN.r, ...PLAN.v, PLAN.step, PLAN.steps, m, PLAN.j2, PLAN.j3, PLAN.radius, budget].join(",");
    const input = join(dir, "eval-in.csv");
    writeFileSync(input, [head, row("rk4"), row("yoshida4")].join("\n") + "\n");
    const out = join(dir, "eval-out.csv");
    const r = areal("eval", "integrate-transition", "--input", input, "--out", out);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/2 rows \(2 ok; an invariant budget broken on 1 of them/);
    const { cols, rows } = csvOf(out);
    const c = cols.indexOf("symp_step");
    expect(rows.map((x) => x[c])).toEqual([oneShot(budget).sympStep, -1]);
  });
});
