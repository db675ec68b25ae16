/**
 * The committed vector files are what the generator makes: their checksums hold, their cases are the spec's
 * cases in order, and a seeded random subset of every suite, recomputed now from the independent
 * high-precision reference, matches the file bit for bit.
 */
import { describe, it, expect } from "vitest";
import { SPECS } from "../harness/verify/specs/index.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { Rng } from "../harness/core/rng.js";
import { sameBits, toBitsHex } from "../harness/core/float.js";

/** Rows recomputed per suite: enough to catch a changed reference, small enough for a quick run. */
const SUBSET = 60;

describe("reference vectors", () => {
  for (const spec of SPECS) {
    it(`${spec.suite}: provenance, cases, and ${SUBSET} recomputed rows match bit for bit`, () => {
      const v = readVectors(vectorPath(spec.suite)); // verifies count and checksum
      expect(v.provenance.suite).toBe(spec.suite);
      expect(v.columns).toEqual([...spec.inputs, ...spec.refs, "tag"]);
      const cases = spec.cases();
      expect(v.values.length).toBe(cases.length);
      cases.forEach((c, r) => {
        c.inputs.forEach((x, j) => {
          if (!sameBits(v.values[r]![j]!, x)) throw new Error(`${spec.suite} row ${r}: input ${spec.inputs[j]} is ${v.values[r]![j]} in the file, the spec gives ${x}`);
        });
      });
      const rng = new Rng(0x5eed ^ spec.suite.length);
      for (let n = 0; n < SUBSET; n++) {
        const r = rng.below(cases.length);
        const ref = spec.reference(cases[r]!.inputs);
        ref.forEach((x, j) => {
          const stored = v.values[r]![spec.inputs.length + j]!;
          if (!sameBits(stored, x)) {
            throw new Error(`${spec.suite} row ${r} ${spec.refs[j]}: file ${stored} (${toBitsHex(stored)}), recomputed ${x} (${toBitsHex(x)})`);
          }
        });
      }
    });
  }
});
