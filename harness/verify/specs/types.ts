/** What a vector suite is: its cases, its independent reference, and how the check compares a build to it. */

export interface Case {
  readonly inputs: readonly number[];
  /** Which part of the grid the case comes from (`grid`, `corner`, `random`, ...): shown with worst cases. */
  readonly tag: string;
}

/** One compared output. */
export interface Comparison {
  /** Output column of the routine. */
  readonly output: string;
  /** Reference column of the vector file. */
  readonly ref: string;
  /**
   * `ulp`: distance in units in the last place of the build's precision (limit key `max_ulp`);
   * `rel`: |got - want| / |want| (limit key `max_rel`, widened per case by `cond` and `revs` below);
   * `abs`: |got - want| (limit key `max_abs`).
   */
  readonly metric: "ulp" | "rel" | "abs";
  /**
   * Vector column with the case's conditioning; the limit becomes max(max_rel, cond_factor * cond) for `rel`,
   * and max(max_ulp, cond_factor * cond) for `ulp` (cond then in ulps), max(max_abs, cond_factor * cond) for `abs`.
   */
  readonly cond?: string;
  /**
   * The `cond` column is relative (a change of the output over its size): on an `abs` comparison the limit then
   * widens by cond_factor * cond * |want|. For outputs that are relative by nature but reach zero (e of a nearly
   * circular orbit), where a relative limit would accept anything.
   */
  readonly condRelative?: boolean;
  /** Vector column with a revolution count; the relative limit scales by (1 + revs). */
  readonly revs?: string;
  /**
   * Vector column dividing the error before it is compared (`abs` only): the error becomes |got - want| / scale,
   * for errors measured against a per-case size (the transition suite's largest scale-free entry).
   */
  readonly scale?: string;
  /** For vector comparisons: several output/ref columns taken together as one vector (norm of the difference). */
  readonly group?: readonly string[];
  readonly refGroup?: readonly string[];
}

export interface VectorSpec {
  /** File name stem in vectors/ and the suite's name in the check table. */
  readonly suite: string;
  /** The routine (harness/routines.ts) the suite checks. */
  readonly routine: string;
  /** Input columns, in the order `reference` takes them; they are the routine's input names. */
  readonly inputs: readonly string[];
  /** Reference columns written by the generator (references, conditioning figures, ...). */
  readonly refs: readonly string[];
  readonly compare: readonly Comparison[];
  /** Output column holding iteration counts, if any. */
  readonly iterations?: string;
  /** Provenance text for the file header. */
  readonly generator: string;
  readonly precision: string;
  readonly notes: readonly string[];
  /** The cases, deterministic (seeded). */
  cases(): Case[];
  /** The reference values for one case, each rounded to the nearest double, in `refs` order. */
  reference(inputs: readonly number[]): number[];
}
