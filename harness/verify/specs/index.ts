/** Every vector suite, in check-table order. A new suite file adds its specs here (DEVELOPERS.md). */
import { KEPLER_SPECS } from "./kepler.js";
import { TWOBODY_SPECS } from "./twobody.js";
import { LAMBERT_SPECS } from "./lambert.js";
import { RELATIVE_SPECS } from "./relative.js";
import { TRANSITION_SPECS } from "./transition.js";
import type { VectorSpec } from "./types.js";

export const SPECS: readonly VectorSpec[] = [...KEPLER_SPECS, ...TWOBODY_SPECS, ...LAMBERT_SPECS, ...RELATIVE_SPECS, ...TRANSITION_SPECS];

/** The spec of a suite, or undefined. */
export function findSpec(suite: string): VectorSpec | undefined {
  return SPECS.find((s) => s.suite === suite);
}
