/**
 * The invariant monitor (assembly/monitor.ts) is checked from outside: the invariants are recomputed here from
 * the state of every step (energy v^2/2 - mu/r, h = r x v, the eccentricity vector ((v^2 - mu/r) r - (r.v) v)/mu,
 * the areal velocity |h|/2: Kepler's second law), and mutant modules, built from the same sources with one
 * deliberate fault in the integrator, must be caught at the right step.
 * Earth GM 398600.4418 km^3/s^2 (WGS 84, NIMA TR8350.2).
 */
import { describe, it, expect, beforeAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync, readdirSync, copyFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { release, single, run, DEG } from "./helpers.js";
import { instantiate, type Kernels } from "../harness/module/load.js";
import { stateFromElements, METHODS, S, slot, read, STATE, FIRSTS, type Vec } from "./integrate-helpers.js";

const MU = 398600.4418;
const A = 7200;
const [R0, V0] = stateFromElements(MU, A, 0.1, 28.5 * DEG, 40 * DEG, 75 * DEG, 0);
const STEP = 10; // s, about 600 steps an orbit
const YOSHIDA4 = METHODS.yoshida4;
const VERLET = METHODS.verlet;
/** The slots of the integration layout, all of them (the monitor test reads every one). */
const NSLOTS = Object.keys(S).length;
const DEVS_NOW = ["energy_dev_now", "h_dev_now", "ecc_dev_now", "areal_dev_now"].map(slot);
const DEVS_MAX = ["energy_dev", "h_dev", "ecc_dev", "areal_dev"].map(slot);
const HV = ["hx", "hy", "hz"].map(slot);
const EV = ["ex", "ey", "ez"].map(slot);

interface StepInv {
  energy: number;
  h: Vec;
  ecc: Vec;
  areal: number;
}

function invariantsOf(r: Vec, v: Vec): StepInv {
  const rm = Math.hypot(...r);
  const v2 = v[0] ** 2 + v[1] ** 2 + v[2] ** 2;
  const rv = r[0] * v[0] + r[1] * v[1] + r[2] * v[2];
  const h: Vec = [r[1] * v[2] - r[2] * v[1], r[2] * v[0] - r[0] * v[2], r[0] * v[1] - r[1] * v[0]];
  const ecc = r.map((ri, i) => ((v2 - MU / rm) * ri - rv * v[i]!) / MU) as Vec;
  return { energy: v2 / 2 - MU / rm, h, ecc, areal: Math.hypot(...h) / 2 };
}

/** Step one at a time; per step the kernel's slots and the deviations recomputed here. */
function trace(k: Kernels, method: number, steps: number, budgets: [number, number, number, number]) {
  expect(k.call("integrate_begin", [MU, ...R0, ...V0, STEP, method, 0, 0, 1, ...budgets])).toBe(0);
  const i0 = invariantsOf(R0, V0);
  const h0 = Math.hypot(...i0.h);
  const rows: { kernel: number[]; dev: [number, number, number, number]; inv: StepInv }[] = [];
  for (let s = 1; s <= steps; s++) {
    expect(k.call("integrate_step", [1])).toBe(0);
    const o = Array.from(k.out.slice(0, NSLOTS));
    const [x, y, z, vx, vy, vz] = read(k, ...STATE) as [number, number, number, number, number, number];
    const inv = invariantsOf([x, y, z], [vx, vy, vz]);
    const dE = Math.abs(inv.energy - i0.energy) / Math.abs(i0.energy);
    const dH = Math.hypot(...inv.h.map((x, i) => x - i0.h[i]!)) / h0;
    const dC = Math.hypot(...inv.ecc.map((x, i) => x - i0.ecc[i]!));
    const dA = Math.abs(2 * inv.areal - h0) / h0;
    rows.push({ kernel: o, dev: [dE, dH, dC, dA], inv });
  }
  return rows;
}

/** The first step (1-based) whose deviation exceeds the budget, or -1. */
const firstOver = (devs: readonly number[], budget: number): number => {
  const i = devs.findIndex((d) => d > budget);
  return i < 0 ? -1 : i + 1;
};

describe("the monitor's invariants agree with those recomputed from the state of every step", () => {
  it("energy, h, eccentricity vector, areal velocity, their deviations and running maxima (yoshida4, 2,000 steps)", () => {
    const rows = trace(release(), YOSHIDA4, 2000, [0, 0, 0, 0]);
    const running = [0, 0, 0, 0];
    for (const { kernel: o, dev, inv } of rows) {
      expect(Math.abs(o[slot("energy")]! - inv.energy) / Math.abs(inv.energy)).toBeLessThan(1e-15);
      for (let i = 0; i < 3; i++) {
        expect(Math.abs(o[HV[i]!]! - inv.h[i]!)).toBeLessThan(1e-15 * Math.hypot(...inv.h));
        expect(Math.abs(o[EV[i]!]! - inv.ecc[i]!)).toBeLessThan(1e-14);
      }
      expect(Math.abs(o[slot("areal_velocity")]! - inv.areal) / inv.areal).toBeLessThan(1e-15);
      // The deviations are differences of nearly equal numbers: compare at the scale of their inputs.
      expect(Math.abs(o[DEVS_NOW[0]!]! - dev[0])).toBeLessThan(1e-15);
      expect(Math.abs(o[DEVS_NOW[1]!]! - dev[1])).toBeLessThan(1e-15);
      expect(Math.abs(o[DEVS_NOW[2]!]! - dev[2])).toBeLessThan(1e-14);
      expect(Math.abs(o[DEVS_NOW[3]!]! - dev[3])).toBeLessThan(1e-15);
      for (let i = 0; i < 4; i++) running[i] = Math.max(running[i]!, o[DEVS_NOW[i]!]!);
      expect(DEVS_MAX.map((j) => o[j])).toEqual(running); // the running maximum is over every step, not a sample
    }
  });

  it("the first step over a budget is the first step whose recomputed deviation exceeds it", () => {
    const rows = trace(release(), VERLET, 3000, [0, 0, 0, 0]);
    const devE = rows.map((r) => r.dev[0]);
    const devC = rows.map((r) => r.dev[2]);
    // Budgets at the median of each deviation: the first crossing is somewhere inside the run.
    const median = (xs: number[]): number => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;
    const bE = median(devE);
    const bC = median(devC);
    const again = trace(release(), VERLET, 3000, [bE, 0, bC, 0]);
    const last = again[again.length - 1]!.kernel;
    expect(last[slot("energy_step")]).toBe(firstOver(devE, bE));
    expect(last[slot("ecc_step")]).toBe(firstOver(devC, bC));
    expect(last[slot("energy_step")]).toBeGreaterThan(1);
    expect(last[slot("h_step")]).toBe(-1); // no h budget
  });
});

// ---- mutants: the same sources with one fault in the integrator, compiled here ----

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const ASC = join(ROOT, "node_modules", "assemblyscript", "bin", "asc.js");

function buildMutant(name: string, edit: (src: string) => string): Kernels {
  const dir = mkdtempSync(join(tmpdir(), `areal-mutant-${name}-`));
  for (const f of readdirSync(join(ROOT, "assembly"))) if (f.endsWith(".ts")) copyFileSync(join(ROOT, "assembly", f), join(dir, f));
  const src = readFileSync(join(dir, "integrators.ts"), "utf8");
  const changed = edit(src);
  expect(changed).not.toBe(src); // the fault went in
  writeFileSync(join(dir, "integrators.ts"), changed);
  const out = join(dir, "mutant.wasm");
  // Unoptimised (no -O): the faults do not depend on it and the build takes a few seconds instead of many.
  execFileSync(process.execPath, [ASC, join(dir, "index.ts"), "--outFile", out, "--runtime", "stub", "--noAssert",
    "--use", "abort=", "--use", "real=f64", "--use", "RMath=NativeMath", "--initialMemory", "1", "--maximumMemory", "1"], { cwd: dir, stdio: "pipe" });
  const bytes = readFileSync(out);
  rmSync(dir, { recursive: true, force: true });
  return instantiate(bytes, `mutant-${name}`);
}

describe("mutant integrators are caught at the right step", () => {
  const KICK_STEP = 777;
  let kick: Kernels;
  let drag: Kernels;
  beforeAll(() => {
    // One mutant module with two faults, so that it is compiled once:
    //  - yoshida4 only: a velocity jump of 1e-5 (relative) at step 777 (a fault that appears once, late);
    //  - verlet only: a non-conservative step, a small drag on every kick.
    const faulty = buildMutant("faults", (s) => s
      .replace("    k += 1;\n", `    k += 1;\n    if (method == METHOD_YOSHIDA4 && k == ${KICK_STEP}) VX *= <real>1.00001;\n`)
      .replace("  VX += hh * AX;\n  VY += hh * AY;\n  VZ += hh * AZ;\n}",
        "  VX += hh * AX;\n  VY += hh * AY;\n  VZ += hh * AZ;\n  if (method == METHOD_VERLET) {\n    VX -= <real>1e-7 * VX;\n    VY -= <real>1e-7 * VY;\n    VZ -= <real>1e-7 * VZ;\n  }\n}"));
    kick = faulty;
    drag = faulty;
  }, 120_000);

  it(`a velocity jump at step ${KICK_STEP}: energy, h and areal budgets all report step ${KICK_STEP}; the good build reports none`, () => {
    const budgets: [number, number, number, number] = [1e-8, 1e-10, 1e-6, 1e-10]; // the good run stays below all four
    const good = release();
    expect(good.call("integrate", [MU, ...R0, ...V0, STEP, 2000, YOSHIDA4, 0, 0, 1, ...budgets])).toBe(0);
    expect(read(good, ...FIRSTS)).toEqual([-1, -1, -1, -1]);
    expect(kick.call("integrate", [MU, ...R0, ...V0, STEP, 2000, YOSHIDA4, 0, 0, 1, ...budgets])).toBe(0);
    expect(read(kick, ...FIRSTS)).toEqual([KICK_STEP, KICK_STEP, KICK_STEP, KICK_STEP]);
    // Before the fault the mutant is the good build, bit for bit.
    expect(kick.call("integrate", [MU, ...R0, ...V0, STEP, KICK_STEP - 1, YOSHIDA4, 0, 0, 1, ...budgets])).toBe(0);
    expect(good.call("integrate", [MU, ...R0, ...V0, STEP, KICK_STEP - 1, YOSHIDA4, 0, 0, 1, ...budgets])).toBe(0);
    expect(read(kick, ...STATE)).toEqual(read(good, ...STATE));
  });

  it("a non-conservative (dragging) Verlet step: caught at the first step where the recomputed energy error exceeds the budget", () => {
    const rows = trace(drag, VERLET, 4000, [0, 0, 0, 0]);
    const devE = rows.map((r) => r.dev[0]);
    const devH = rows.map((r) => r.dev[1]);
    const budgetE = 5e-5; // the good build stays near 1.3e-5 (a bounded oscillation)
    const budgetH = 1e-6;
    const wantE = firstOver(devE, budgetE);
    const wantH = firstOver(devH, budgetH);
    expect(wantE).toBeGreaterThan(1);
    expect(wantH).toBeGreaterThan(1);
    expect(drag.call("integrate", [MU, ...R0, ...V0, STEP, 4000, VERLET, 0, 0, 1, budgetE, budgetH, 0, 0])).toBe(0);
    expect(drag.out[slot("energy_step")]).toBe(wantE);
    expect(drag.out[slot("h_step")]).toBe(wantH);
    console.log(`drag mutant: energy budget ${budgetE} broken at step ${wantE}, h budget ${budgetH} at step ${wantH}`);
    // The good build keeps h at round-off and the energy error bounded: no budget broken.
    const good = release();
    expect(good.call("integrate", [MU, ...R0, ...V0, STEP, 4000, VERLET, 0, 0, 1, budgetE, budgetH, 0, 0])).toBe(0);
    expect(good.out[slot("energy_step")]).toBe(-1);
    expect(good.out[slot("h_step")]).toBe(-1);
  });
});

describe("integrate statuses", () => {
  for (const [label, k] of [["f64", release], ["f32", single]] as const) {
    it(`${label}: non-finite, out of domain, degenerate, overflow; never ok with a non-finite output`, () => {
      const base = [MU, ...R0, ...V0, STEP, 10, YOSHIDA4, 0, 0, 1, 0, 0, 0, 0];
      const withArg = (i: number, v: number): number[] => base.map((x, j) => (j === i ? v : x));
      expect(run(k(), "integrate", base)[0]).toBe(0);
      for (const i of [0, 1, 4, 7, 10, 12, 13]) expect(run(k(), "integrate", withArg(i, NaN))[0]).toBe(16);
      expect(run(k(), "integrate", withArg(0, -1))[0]).toBe(17); // mu
      expect(run(k(), "integrate", withArg(7, 0))[0]).toBe(17); // step
      expect(run(k(), "integrate", withArg(8, -1))[0]).toBe(17); // steps
      expect(run(k(), "integrate", withArg(9, 4))[0]).toBe(17); // method
      expect(run(k(), "integrate", withArg(12, 0))[0]).toBe(17); // radius
      expect(run(k(), "integrate", withArg(13, -1e-9))[0]).toBe(17); // budget
      expect(run(k(), "integrate", [MU, 0, 0, 0, ...V0, STEP, 10, YOSHIDA4, 0, 0, 1, 0, 0, 0, 0])[0]).toBe(19); // r0 = 0
      expect(run(k(), "integrate", [MU, 7000, 0, 0, 1, 0, 0, STEP, 10, YOSHIDA4, 0, 0, 1, 0, 0, 0, 0])[0]).toBe(19); // h0 = 0
      // A run that overflows: ERR_OVERFLOW, slot k names the step; further steps return the same.
      const [v, h] = k().realBytes === 8 ? [1e100, 1e250] : [1e10, 1e30];
      const r = run(k(), "integrate", [MU, 1e3, 0, 0, v, v, 0, h, 10, VERLET, 0, 0, 1, 0, 0, 0, 0]);
      expect(r[0]).toBe(21);
      expect(r[1 + slot("k")]).toBe(1);
      expect(k().call("integrate_step", [1])).toBe(21);
    });
  }
});
