/*
 * c-kepler: an engineer's own Kepler solvers in C99, written against include/areal.h, built two ways from this
 * one source: a WebAssembly module (clang --target=wasm32, no libc, no imports) and a native shared library
 * (gcc -shared -fPIC). `areal check` runs both against the same vector suites and `areal eval` through both
 * must write byte-identical files. build.mjs builds both; README.md says how to check them.
 *
 * No libm: sin and cos are below (the same code in both builds, so both give the same bits); sqrt is the
 * compiler's builtin, which is the correctly rounded IEEE square root on both targets. Compile with
 * -ffp-contract=off: a fused multiply-add rounds once instead of twice and the two builds would drift apart.
 *
 * kepler_elliptic(e, M)   E - e sin E = M, 0 <= e < 1.
 *   1. Special cases: non-finite -> AREAL_ERR_NONFINITE; e outside [0, 1) -> AREAL_ERR_DOMAIN.
 *   2. |M| >= 2^54: E = M (|E - M| = |e sin E| <= 1 is below half an ulp of M).
 *   3. Remove whole turns: m = M - k 2pi with k = nearest(M / 2pi), 2pi as three doubles (Cody and Waite 1980),
 *      each product k * C_i exact by Dekker's (1971) splitting.
 *   4. Newton from E0 = m + 0.85 e sign(m) (Danby 1988, ch. 6), at most MAX_NEWTON steps, stopping once a step is
 *      below 2^-53 |E| or no smaller than the one before (rounding noise),
 *      the residual near E = 0 written as (1 - e) E + e (E - sin E) with E - sin E by its series (common practice).
 *   5. E = M + e sin E_m (E - M = e sin E exactly, and sin E = sin E_m): the answer in the same revolution as M.
 *   Slots: E, iterations.
 * kepler_parabolic(M)     Barker's equation D + D^3/3 = M by plain Newton from D0 = M up to |M| = 2^30 (no
 *   closed-form starter, so large |M| takes many steps: D grows like M^(1/3) and Newton on a cubic from far away
 *   gains only a factor 3/2 a step; about 40 steps at |M| = 2^30), beyond that from a power of two near
 *   (3|M|)^(1/3). Cap MAX_BARKER = 200. Slots: D, iterations, nu (not computed by this example: NaN).
 */
#define AREAL_IMPLEMENTATION
#include "../../include/areal.h"

#define MAX_NEWTON 100
#define MAX_BARKER 200

static areal_real out_region[AREAL_OUT_SLOTS];

AREAL_API(areal_out) areal_real *areal_out(void) { return out_region; }
AREAL_API(areal_real_bytes) int32_t areal_real_bytes(void) { return (int32_t)sizeof(areal_real); }
AREAL_API(areal_abi_version) int32_t areal_abi_version(void) { return AREAL_ABI_VERSION; }

static int finite(double x) { return x - x == 0.0; }
static double fabs_(double x) { return x < 0 ? -x : x; }

/* Nearest integer of |x| < 2^52 (ties away from zero), without libm. */
static double nearest(double x) {
  const double two52 = 4503599627370496.0;
  double a = fabs_(x), r = (a + two52) - two52;
  if (r - a > 0.5) r -= 1.0;
  else if (a - r >= 0.5) r += 1.0;
  return x < 0 ? -r : r;
}

/* Dekker (1971): a * b = hi + lo exactly, without a fused multiply-add. */
static void two_prod(double a, double b, double *hi, double *lo) {
  const double split = 134217729.0; /* 2^27 + 1 */
  double ta = split * a, ah = ta - (ta - a), al = a - ah;
  double tb = split * b, bh = tb - (tb - b), bl = b - bh;
  *hi = a * b;
  *lo = ((ah * bh - *hi) + ah * bl + al * bh) + al * bl;
}

/* sin and cos on |x| <= pi/4 by Taylor series to x^17 and x^18 (error below 1e-17 there). */
static double sin_kernel(double x) {
  double z = x * x;
  return x + x * z * (-1.0 / 6 + z * (1.0 / 120 + z * (-1.0 / 5040 + z * (1.0 / 362880 + z * (-1.0 / 39916800
         + z * (1.0 / 6227020800.0 + z * (-1.0 / 1307674368000.0 + z * (1.0 / 355687428096000.0))))))));
}
static double cos_kernel(double x) {
  double z = x * x;
  return 1.0 - z * 0.5 + z * z * (1.0 / 24 + z * (-1.0 / 720 + z * (1.0 / 40320 + z * (-1.0 / 3628800
         + z * (1.0 / 479001600.0 + z * (-1.0 / 87178291200.0 + z * (1.0 / 20922789888000.0 + z * (-1.0 / 6402373705728000.0))))))));
}

/* pi/2 as three doubles (hex floats, C99). */
static const double PIO2_1 = 0x1.921fb54400000p+0, PIO2_2 = 0x1.0b4611a600000p-34, PIO2_3 = 0x1.3198a2e037073p-69;

/* sin (want_sin) or cos of |x| <= 8: reduce by quadrants of pi/2 (Cody and Waite 1980). */
static double sincos_small(double x, int want_sin) {
  double q = nearest(x * 0x1.45f306dc9c883p-1); /* 2/pi */
  double r = ((x - q * PIO2_1) - q * PIO2_2) - q * PIO2_3;
  int n = ((int)q + (want_sin ? 0 : 1)) & 3;
  double s = sin_kernel(r), c = cos_kernel(r);
  return n == 0 ? s : n == 1 ? c : n == 2 ? -s : -c;
}

/* 2pi as three doubles. */
static const double TWOPI_1 = 0x1.921fb54442d18p+2, TWOPI_2 = 0x1.1a62633145c07p-52, TWOPI_3 = -0x1.f1976b7ed8fbcp-107;

/* m = M - k 2pi in [-pi, pi] (|M| < 2^54), each product exact. */
static double reduce_turns(double M) {
  double k = nearest(M * 0x1.45f306dc9c883p-3); /* 1/(2pi) */
  double h, l, m;
  two_prod(k, TWOPI_1, &h, &l);
  m = (M - h) - l; /* M - h is exact (Sterbenz) when k != 0 */
  return (m - k * TWOPI_2) - k * TWOPI_3;
}

/* E - e sin E - m, the small-E part by series so that the corner e -> 1, E -> 0 keeps its bits. */
static double residual(double e, double E, double m, double s) {
  if (fabs_(E) < 0.25) {
    double z = E * E;
    double emsin = E * z * (1.0 / 6 + z * (-1.0 / 120 + z * (1.0 / 5040 + z * (-1.0 / 362880 + z * (1.0 / 39916800
                   + z * (-1.0 / 6227020800.0))))));
    return ((1.0 - e) * E + e * emsin) - m;
  }
  return (E - e * s) - m;
}

AREAL_API(kepler_elliptic) int32_t kepler_elliptic(areal_real e, areal_real M) {
  double m, E, s, c, d, prev = 0;
  int it;
  if (!finite(e) || !finite(M)) return AREAL_ERR_NONFINITE;
  if (!(e >= 0 && e < 1)) return AREAL_ERR_DOMAIN;
  if (fabs_(M) >= 0x1p54) {
    out_region[AREAL_SLOT_KEPLER_ELLIPTIC_E] = M;
    out_region[AREAL_SLOT_KEPLER_ELLIPTIC_ITERATIONS] = 0;
    return AREAL_OK;
  }
  m = reduce_turns(M);
  E = m + (m < 0 ? -0.85 : 0.85) * e;
  for (it = 1; it <= MAX_NEWTON; it++) {
    s = sincos_small(E, 1);
    c = sincos_small(E, 0);
    d = residual(e, E, m, s) / (1.0 - e * c);
    if (it > 2 && fabs_(d) >= fabs_(prev)) break; /* no longer contracting: rounding noise */
    E -= d;
    if (fabs_(d) <= 0x1p-53 * fabs_(E) || d == 0) break;
    prev = d;
  }
  if (it > MAX_NEWTON) return AREAL_ERR_NOT_CONVERGED;
  out_region[AREAL_SLOT_KEPLER_ELLIPTIC_E] = M + (E - m);
  out_region[AREAL_SLOT_KEPLER_ELLIPTIC_ITERATIONS] = it;
  return AREAL_OK;
}

/* A power of two within a factor 2 of the cube root of |x| (x normal), from the exponent bits. */
static double cbrt_guess(double x) {
  union { double d; uint64_t u; } b;
  int ex;
  b.d = x;
  ex = (int)((b.u >> 52) & 0x7ff) - 1023;
  b.u = (uint64_t)(ex / 3 + 1023) << 52;
  return b.d;
}

AREAL_API(kepler_parabolic) int32_t kepler_parabolic(areal_real M) {
  double D, d, prev = 0;
  int it;
  if (!finite(M)) return AREAL_ERR_NONFINITE;
  /* Starter: D0 = M up to |M| = 2^30 (many steps for large |M|: the plain first attempt), then a power of two. */
  D = fabs_(M) <= 0x1p30 ? M : (M < 0 ? -cbrt_guess(-3.0 * M) : cbrt_guess(3.0 * M));
  for (it = 1; it <= MAX_BARKER; it++) {
    if (fabs_(D) <= 1.0) {
      double D2 = D * D;
      d = ((D + D * D2 / 3.0) - M) / (1.0 + D2);
    } else { /* divided through by D^2 so that D^3 never overflows */
      double w = 1.0 / D;
      d = ((D / 3.0 + w) - (M * w) * w) / (1.0 + w * w);
    }
    if (it > 2 && fabs_(d) >= fabs_(prev)) break; /* no longer contracting: rounding noise */
    D -= d;
    if (fabs_(d) <= 0x1p-53 * fabs_(D) || d == 0) break;
    prev = d;
  }
  if (it > MAX_BARKER) return AREAL_ERR_NOT_CONVERGED;
  out_region[AREAL_SLOT_KEPLER_PARABOLIC_D] = D;
  out_region[AREAL_SLOT_KEPLER_PARABOLIC_ITERATIONS] = it;
  out_region[AREAL_SLOT_KEPLER_PARABOLIC_NU] = 0.0 / 0.0; /* not computed by this example */
  return AREAL_OK;
}
