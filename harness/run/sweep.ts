/**
 * `areal sweep`: run a routine over a domain described by a small JSON grid and summarise what happened: case
 * count, status counts, iteration histogram and, for the Kepler solvers, an error estimate for every case with
 * the worst inputs, plus a few high-precision (decimal.js) checks.
 *
 * The grid (a JSON file):
 *
 *   {
 *     "inputs": {                                   one entry per numeric input of the routine
 *       "e": { "from": 0, "to": 0.999999, "count": 1000, "spacing": "log-near-1" },
 *       "M": { "from": 1e-9, "to": 3.14, "count": 1000, "spacing": "log" }
 *     },
 *     "random": { "count": 100000, "seed": 7 },   optional: seeded random points over the same ranges
 *     "checks": 16,                                  optional: evenly spaced cases checked with decimal.js
 *     "worst": 8                                     optional: how many worst cases to keep (each checked too)
 *   }
 *
 * Spacing: "linear" (default); "log" (from and to of one sign, neither zero: evenly spaced logarithms); or
 * "log-near-1" (from, to < 1: 1 - x evenly spaced in logarithm, so points crowd towards 1, as e does near the
 * parabolic limit). Random points are uniform in the same variable (log-uniform for "log").
 *
 * Cases are numbered: first the grid (row-major, the first input varying slowest), then the random points.
 * Case i depends on i alone (random point j takes its numbers from a counter-based hash of the seed, j and the
 * input), so shard k of n, a contiguous range of case numbers, is the same cases on any machine with the same
 * Node version, and any split of the range (shards, worker threads, chunks) gives the same summary: counts
 * add, maxima and the worst list are taken under a total order (error, then case number), and the error sum
 * is kept exactly (Shewchuk 1997 partials in a canonical form). `areal merge` (merge.ts) relies on that.
 *
 * Error estimate (Kepler): the residual f of the equation at the returned root, evaluated with error-free
 * transformations (Dekker 1971 products, Knuth's two-sum) in the cancellation-free forms of the numerics notes
 * ((1 - e) E + e (E - sin E) - M near periapsis, with E - sin E from its series), divided by f' at the root and
 * by the spacing of doubles at the root: |f / f'| / ulp(E) is the distance to the true root in ULPs, to first
 * order. The host's sin, cosh and sinh carry about one ULP, so the estimate has a floor of about one ULP; the
 * decimal.js checks give the exact error (ULP distance to the correctly rounded root) on the cases they cover.
 */
export * from "./sweep/grid.js";
export * from "./sweep/error-models.js";
export * from "./sweep/partials.js";
export * from "./sweep/doc.js";
