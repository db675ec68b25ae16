/**
 * The vector generator (`areal vectors`, `npm run vectors`): for each suite, its cases and independent
 * high-precision references, written to vectors/<suite>.csv with provenance. It imports no kernel code.
 */
import { SPECS, findSpec } from "./specs/index.js";
import type { VectorSpec } from "./specs/types.js";
import { writeVectors, vectorPath } from "./vectors.js";

/** The rows of a suite: inputs, references, tag. */
export function generateRows(spec: VectorSpec, progress?: (done: number, total: number) => void): (number | string)[][] {
  const cases = spec.cases();
  const rows: (number | string)[][] = [];
  cases.forEach((c, i) => {
    let ref: number[];
    try {
      ref = spec.reference(c.inputs);
    } catch (err) {
      throw new Error(`${spec.suite}: reference failed for ${spec.inputs.map((n, j) => `${n}=${c.inputs[j]}`).join(" ")}: ${(err as Error).message}`);
    }
    if (ref.length !== spec.refs.length) throw new Error(`${spec.suite}: reference gave ${ref.length} values, expected ${spec.refs.length}`);
    rows.push([...c.inputs, ...ref, c.tag]);
    if (progress && (i % 250 === 0 || i === cases.length - 1)) progress(i + 1, cases.length);
  });
  return rows;
}

/** Generate and write one suite's vector file. Returns the row count. */
export function writeSuite(spec: VectorSpec, date: string, progress?: (done: number, total: number) => void, path = vectorPath(spec.suite)): number {
  const rows = generateRows(spec, progress);
  writeVectors(
    path,
    { suite: spec.suite, generator: spec.generator, precision: spec.precision, date, notes: spec.notes },
    [...spec.inputs, ...spec.refs, "tag"],
    rows,
  );
  return rows.length;
}

/** Suites selected by name (all when the list is empty). Throws naming an unknown suite. */
export function selectSpecs(names: readonly string[]): VectorSpec[] {
  if (names.length === 0) return [...SPECS];
  return names.map((n) => {
    const s = findSpec(n);
    if (!s) throw new Error(`unknown suite '${n}' (known: ${SPECS.map((x) => x.suite).join(", ")})`);
    return s;
  });
}
