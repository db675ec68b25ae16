// Status codes returned by every kernel. One table, mirrored in harness/status.ts and docs/abi.md.
// Codes below 16 are successes (the outputs are finite and meaningful); 16 and above are failures
// (the outputs are unspecified and must not be used).

/** Success. */
export const OK: i32 = 0;
/** Success; the orbit is circular: argument of periapsis undefined, argument of latitude given in its place. */
export const OK_CIRCULAR: i32 = 1;
/** Success; the orbit is equatorial: RAAN undefined, longitude of periapsis given in place of the argument of periapsis. */
export const OK_EQUATORIAL: i32 = 2;
/** Success; circular and equatorial: true longitude given in place of the true anomaly. */
export const OK_CIRCULAR_EQUATORIAL: i32 = 3;

/** An input is NaN or infinite. */
export const ERR_NONFINITE: i32 = 16;
/** An input is outside the kernel's domain (e out of range, a length or mu not positive, ...). */
export const ERR_DOMAIN: i32 = 17;
/** The iteration cap was reached before the convergence test passed. */
export const ERR_NOT_CONVERGED: i32 = 18;
/** The problem is degenerate (rectilinear motion, zero angular momentum, undefined transfer plane). */
export const ERR_DEGENERATE: i32 = 19;
/** No solution exists for these inputs (for example a time of flight below the minimum). */
export const ERR_NO_SOLUTION: i32 = 20;
/** A result or an intermediate is outside the normal floating-point range (too large, or too small to keep its precision). */
export const ERR_OVERFLOW: i32 = 21;
/** The requested point cannot be reached on this conic (for example a true anomaly beyond the asymptote). */
export const ERR_UNREACHABLE: i32 = 22;

/** First failure code: `status < FIRST_ERROR` means success. */
export const FIRST_ERROR: i32 = 16;
