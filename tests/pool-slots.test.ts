/**
 * core/pool.ts OutputSlots: a worker's shared output slots hand bytes over unchanged, refuse what does not fit
 * or finds no free slot (the caller then sends a buffer of its own), and a released slot is taken again.
 */
import { describe, it, expect } from "vitest";
import { OutputSlots, sharedView, releaseShared } from "../harness/core/pool.js";

describe("OutputSlots", () => {
  it("hands bytes over unchanged, refuses them when too long or when every slot is taken, and reuses a released slot", () => {
    const slots = new OutputSlots(8, 3);
    const bytes = (n: number, v: number): Uint8Array => new Uint8Array(n).fill(v);
    expect(slots.put(bytes(9, 1))).toBeUndefined(); // longer than a slot
    const taken = [slots.put(bytes(8, 2))!, slots.put(bytes(3, 3))!, slots.put(bytes(0, 4))!];
    expect(taken.map((s) => s.slot)).toEqual([0, 1, 2]);
    expect(slots.put(bytes(1, 5))).toBeUndefined(); // all three taken
    expect([...sharedView(taken[0]!)]).toEqual([2, 2, 2, 2, 2, 2, 2, 2]);
    expect([...sharedView(taken[1]!)]).toEqual([3, 3, 3]);
    expect(sharedView(taken[2]!).length).toBe(0);
    releaseShared(taken[1]!);
    const again = slots.put(bytes(2, 6))!;
    expect(again.slot).toBe(1);
    expect([...sharedView(again)]).toEqual([6, 6]);
    expect([...sharedView(taken[0]!)]).toEqual([2, 2, 2, 2, 2, 2, 2, 2]); // the others untouched
  });
});
