// A deliberately naive external module for `areal check --module`: it follows the ABI in docs/abi.md
// (exports, output region, status codes) but solves Kepler's equation the way a first attempt would:
// plain Newton from E = M (H = M, D = M), the textbook residual E - e sin E - M, a loose absolute
// tolerance of 1e-8 and no reduction of whole turns. `areal check` should reject it on every Kepler suite.
// It is self-contained AssemblyScript (it imports nothing from the project's kernels).

const SLOTS: i32 = 64;
const OUT: usize = memory.data(SLOTS * 8, 16);
const MAX_ITER: i32 = 50;
const TOL: f64 = 1e-8;

function put(i: i32, v: f64): void {
  store<f64>(OUT + (<usize>i << 3), v);
}

export function areal_out(): usize {
  return OUT;
}
export function areal_real_bytes(): i32 {
  return 8;
}
export function areal_abi_version(): i32 {
  return 1;
}

/** E - e sin E = M by Newton from E = M. */
export function kepler_elliptic(e: f64, M: f64): i32 {
  if (!isFinite(e) || !isFinite(M)) return 16;
  if (!(e >= 0 && e < 1)) return 17;
  let E = M;
  for (let it = 1; it <= MAX_ITER; it++) {
    const d = (E - e * Math.sin(E) - M) / (1 - e * Math.cos(E));
    E -= d;
    if (!isFinite(E)) return 18;
    if (Math.abs(d) < TOL) {
      put(0, E);
      put(1, <f64>it);
      return 0;
    }
  }
  return 18;
}

/** e sinh H - H = M by Newton from H = M. */
export function kepler_hyperbolic(e: f64, M: f64): i32 {
  if (!isFinite(e) || !isFinite(M)) return 16;
  if (!(e > 1)) return 17;
  let H = M;
  for (let it = 1; it <= MAX_ITER; it++) {
    const d = (e * Math.sinh(H) - H - M) / (e * Math.cosh(H) - 1);
    H -= d;
    if (!isFinite(H)) return 18;
    if (Math.abs(d) < TOL) {
      put(0, H);
      put(1, <f64>it);
      return 0;
    }
  }
  return 18;
}

/** Barker's equation D + D^3 / 3 = M by Newton from D = M; nu = 2 atan D. */
export function kepler_parabolic(M: f64): i32 {
  if (!isFinite(M)) return 16;
  let D = M;
  for (let it = 1; it <= MAX_ITER; it++) {
    const d = (D + D * D * D / 3 - M) / (1 + D * D);
    D -= d;
    if (!isFinite(D)) return 18;
    if (Math.abs(d) < TOL) {
      put(0, D);
      put(1, <f64>it);
      put(2, 2 * Math.atan(D));
      return 0;
    }
  }
  return 18;
}
