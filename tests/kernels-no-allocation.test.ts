/**
 * Kernels allocate nothing: across a million calls the module's memory keeps its size and every byte outside
 * the output region keeps its value (so neither the heap pointer nor any static data moves).
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import type { Kernels } from "../harness/module/load.js";
import { ROUTINES, type Routine } from "../harness/module/routines.js";
import { Rng } from "../harness/core/rng.js";

function snapshotOutside(k: Kernels): { before: Uint8Array; outStart: number; outEnd: number } {
  const mem = new Uint8Array(k.memory.buffer);
  const outStart = k.out.byteOffset;
  return { before: mem.slice(), outStart, outEnd: outStart + k.out.byteLength };
}

function changedOutside(k: Kernels, s: ReturnType<typeof snapshotOutside>): number {
  const mem = new Uint8Array(k.memory.buffer);
  let n = 0;
  for (let i = 0; i < mem.length; i++) {
    if (i >= s.outStart && i < s.outEnd) continue;
    if (mem[i] !== s.before[i]) n++;
  }
  return n;
}

/** Plausible arguments for any routine, by input name (a mix of valid and invalid values), seeded. */
function argsFor(routine: Routine, rng: Rng): number[] {
  return routine.inputs.map((inp) => {
    if (inp.choices) {
      const v = Object.values(inp.choices);
      return v[rng.below(v.length)]!;
    }
    if (inp.name === "steps") return 1 + rng.below(8);
    if (inp.integer) return rng.below(3);
    if (inp.name === "mu") return rng.uniform() < 0.9 ? 398600.4418 : -1;
    if (inp.name === "e") return rng.uniform() * 2.2;
    if (inp.name.startsWith("r") && inp.name.length === 3) return rng.between(-9000, 9000);
    if (inp.name.startsWith("v") && inp.name.length === 3) return rng.between(-9, 9);
    if (inp.name === "step") return rng.between(1, 60);
    return rng.between(-10, 10) * (rng.uniform() < 0.1 ? 1e3 : 1);
  });
}

describe("no allocation", () => {
  for (const [label, get] of [["f64", release], ["f32", single]] as const) {
    it(`${label}: a million calls over every routine leave memory size and every byte outside the output region unchanged`, () => {
      const k = get();
      const pages = k.memory.buffer.byteLength;
      const snap = snapshotOutside(k);
      const routines = ROUTINES.filter((r) => k.has(r.exportName));
      expect(routines.length).toBeGreaterThanOrEqual(8);
      const rng = new Rng(7);
      let calls = 0;
      while (calls < 1_000_000) {
        for (const r of routines) {
          k.call(r.exportName, argsFor(r, rng));
          calls++;
        }
      }
      // Bad inputs too: the failure paths must not allocate either.
      for (const r of routines) k.call(r.exportName, r.inputs.map(() => NaN));
      expect(k.memory.buffer.byteLength).toBe(pages);
      expect(changedOutside(k, snap)).toBe(0);
    });
  }

  it("the check can fail: a write outside the output region is seen (mutant)", () => {
    const k = release();
    const snap = snapshotOutside(k);
    const mem = new Uint8Array(k.memory.buffer);
    const spot = snap.outEnd + 8 < mem.length ? snap.outEnd + 8 : 0;
    mem[spot] = mem[spot]! ^ 0xff;
    expect(changedOutside(k, snap)).toBe(1);
    mem[spot] = mem[spot]! ^ 0xff;
  });
});
