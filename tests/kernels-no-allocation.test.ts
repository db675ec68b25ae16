/**
 * Kernels allocate nothing: across a million calls the module's memory keeps its size and every byte outside
 * the output region keeps its value (so neither the heap pointer nor any static data moves).
 */
import { describe, it, expect } from "vitest";
import { release, single } from "./helpers.js";
import type { Kernels } from "../harness/load.js";

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

describe("no allocation", () => {
  for (const [label, get] of [["f64", release], ["f32", single]] as const) {
    it(`${label}: a million kernel calls leave memory size and every byte outside the output region unchanged`, () => {
      const k = get();
      const pages = k.memory.buffer.byteLength;
      const snap = snapshotOutside(k);
      const fns: [string, (i: number) => number[]][] = [
        ["kepler_elliptic", (i) => [(i % 997) / 997, (i - 500000) * 1e-3]],
        ["kepler_hyperbolic", (i) => [1 + (i % 991) / 97, (i - 500000) * 1e-2]],
        ["kepler_parabolic", (i) => [(i - 500000) * 1e-3]],
        ["true_to_anomaly", (i) => [(i % 13) / 6, (i % 628) / 100 - 3.14]],
        ["anomaly_to_true", (i) => [(i % 13) / 6, (i % 628) / 100 - 3.14]],
        ["true_to_mean", (i) => [(i % 13) / 6, (i % 628) / 100 - 3.14]],
        ["mean_to_true", (i) => [(i % 13) / 6, (i % 628) / 100 - 3.14]],
        ["time_of_flight", (i) => [398600.4418, 7000, (i % 13) / 6, 0, (i % 300) / 100]],
      ];
      let calls = 0;
      for (let i = 0; calls < 1_000_000; i++) {
        for (const [name, args] of fns) {
          k.call(name, args(i));
          calls++;
        }
      }
      // Bad inputs too: the failure paths must not allocate either.
      for (const [name] of fns) k.call(name, [NaN, NaN, NaN, NaN, NaN]);
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
