/**
 * Exact sums of doubles: J. R. Shewchuk, "Adaptive precision floating-point arithmetic and fast robust geometric
 * predicates", Discrete Comput. Geom. 18 (1997) 305-363. A sum is kept as non-overlapping partials; its
 * canonical form (the rounded value, then the rounded remainder, ...) is unique, so sums split any way agree.
 */

/**
 * Add x to the n non-overlapping partials p[0..n) (J. R. Shewchuk, "Adaptive precision floating-point
 * arithmetic and fast robust geometric predicates", Discrete Comput. Geom. 18 (1997) 305-363): the partials
 * hold the sum exactly. Writes p[0..m) and returns m (at most n + 1).
 */
function addPartial(p: { [i: number]: number }, n: number, x: number): number {
  let i = 0;
  for (let j = 0; j < n; j++) {
    let y = p[j]!;
    if (Math.abs(x) < Math.abs(y)) {
      const t = x;
      x = y;
      y = t;
    }
    const hi = x + y;
    const lo = y - (hi - x);
    if (lo !== 0) p[i++] = lo;
    x = hi;
  }
  p[i] = x;
  return i + 1;
}

/** addPartial on a list. */
export function addExact(p: number[], x: number): void {
  p.length = addPartial(p, p.length, x);
}

/**
 * addExact on a fixed buffer, for the per-case loop of sweepRange: an array whose length goes down and up on
 * every case reallocates its store (that and boxed doubles made a 9,000,000-case sweep churn through 2 GB).
 * Non-overlapping doubles span at most 2098 bits, so there are at most 40 partials (53 bits each, at least).
 */
export class ExactSum {
  private readonly p = new Float64Array(48);
  private n = 0;

  add(x: number): void {
    this.n = addPartial(this.p, this.n, x);
  }

  /** The partials, as addExact leaves them. */
  partials(): number[] {
    return Array.from(this.p.subarray(0, this.n));
  }
}

/** The exact sum of the partials rounded to nearest (ties to even), as Python's math.fsum rounds it. */
export function roundedSum(p: readonly number[]): number {
  let n = p.length;
  if (n === 0) return 0;
  let hi = p[--n]!;
  let lo = 0;
  while (n > 0) {
    const x = hi;
    const y = p[--n]!;
    hi = x + y;
    lo = y - (hi - x);
    if (lo !== 0) break;
  }
  if (n > 0 && ((lo < 0 && p[n - 1]! < 0) || (lo > 0 && p[n - 1]! > 0))) {
    const y = lo * 2;
    const x = hi + y;
    if (y === x - hi) hi = x;
  }
  return hi;
}

/** A canonical form of an exact sum: its rounded value, then the rounded remainder, and so on (unique). */
export function canonicalSum(p: readonly number[]): number[] {
  const work = [...p];
  const out: number[] = [];
  for (let i = 0; i < 40; i++) {
    const v = roundedSum(work);
    if (v === 0) break;
    out.push(v);
    addExact(work, -v);
  }
  return out;
}

