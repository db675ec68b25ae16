// Bench-only WebAssembly module (scripts/build-bench.mjs -> build/bench/baseline.wasm; asconfig target
// `bench-baseline`). Not part of the kernels' ABI. It holds, in ONE module so that the ratios compare like with
// like (same engine, no call from the host inside the timed loop):
//  - the classic baseline for Kepler's equation: Newton's method started at E = M, stopped when the step is
//    within NEWTON_TOL_REL of E (a few units in the last place: full double precision, the accuracy the
//    project's solver reaches), capped at NEWTON_MAX_ITER (textbook form, e.g. Danby 1988, "Fundamentals of
//    Celestial Mechanics", section 6.6; recalled from memory);
//  - one sine plus one cosine of the AssemblyScript math library (the floor no Kepler solver can go below);
//  - the project's elliptic solver (assembly/kepler_elliptic.ts, the same source as the release module);
//  - loops that run each of them over the inputs placed in linear memory, and loops that time single
//    operations (for the per-operation cost model of harness/opcount.ts).
// Inputs: pairs (e, M) as f64 at bench_inputs(), at most BENCH_CAPACITY pairs.

import { kepler_elliptic, correctionStep } from "../assembly/kepler_elliptic";
import { kepler_hyperbolic } from "../assembly/kepler_hyperbolic";
import { propagate } from "../assembly/universal";
import { got } from "../assembly/io";
import { reduceTurns, reducedLo } from "../assembly/reduce";

/** Largest number of (e, M) pairs the input region holds. */
export const BENCH_CAPACITY: i32 = 2048;
const INPUTS: usize = memory.data(BENCH_CAPACITY * 16, 16);
/** Pairs (e, M) of the hyperbolic comparison, set by the host. */
const HYP_INPUTS: usize = memory.data(BENCH_CAPACITY * 16, 16);
/** Most propagate cases (mu, r0, v0, dt: 8 f64 each). */
export const PROP_CAPACITY: i32 = 256;
const PROP_INPUTS: usize = memory.data(PROP_CAPACITY * 64, 16);
/** Per case, the solver's own reduced root |E_m| (the perfect starter of the floor loop), set by the host. */
const ROOTS: usize = memory.data(BENCH_CAPACITY * 8, 16);
/** Iteration cap of the Newton baseline (far above what it needs on the elliptic domain). */
const NEWTON_MAX_ITER: i32 = 100;
/** Stop when |step| <= NEWTON_TOL_REL * |E| (4 ulp of E). */
const NEWTON_TOL_REL: f64 = 8.881784197001252e-16;
const TWO_PI: f64 = 6.283185307179586;
const INV_TWO_PI: f64 = 0.15915494309189535;

let newtonIters: i32 = 0;

export function bench_inputs(): usize {
  return INPUTS;
}

export function bench_hyp_inputs(): usize {
  return HYP_INPUTS;
}

export function bench_prop_inputs(): usize {
  return PROP_INPUTS;
}

export function bench_roots(): usize {
  return ROOTS;
}

export function bench_capacity(): i32 {
  return BENCH_CAPACITY;
}

/** Classic Newton from E = M (after the usual reduction of M to [-pi, pi]). Returns E; iterations by newton_iterations(). */
export function newton_elliptic(e: f64, M: f64): f64 {
  const k = nearest(M * INV_TWO_PI);
  const m = M - k * TWO_PI;
  let E = m;
  newtonIters = -1;
  for (let it = 1; it <= NEWTON_MAX_ITER; it++) {
    const d = (E - e * Math.sin(E) - m) / (1.0 - e * Math.cos(E));
    E -= d;
    if (abs(d) <= NEWTON_TOL_REL * abs(E)) {
      newtonIters = it;
      break;
    }
  }
  return E + k * TWO_PI;
}

/** Iterations of the last newton_elliptic call (-1: the cap was reached). */
export function newton_iterations(): i32 {
  return newtonIters;
}

/** One sine plus one cosine. */
export function sincos(x: f64): f64 {
  return Math.sin(x) + Math.cos(x);
}

/** An export that does nothing with two arguments: the cost of a host-to-module call. */
export function nop2(a: f64, b: f64): f64 {
  return a;
}

// The loops below return a sum of their results so that no work can be removed as unused.

/** kepler_elliptic over the first n input pairs. */
export function loop_elliptic(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    kepler_elliptic(load<f64>(p), load<f64>(p, 8));
    s += got(0);
  }
  return s;
}

/** Newton baseline over the first n input pairs. */
export function loop_newton(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    s += newton_elliptic(load<f64>(p), load<f64>(p, 8));
  }
  return s;
}

/** One sin + one cos of each input's M. */
export function loop_sincos(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    s += sincos(load<f64>(p, 8));
  }
  return s;
}

/** The loop alone (reads both inputs, adds them). */
export function loop_empty(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    s += load<f64>(p) + load<f64>(p, 8);
  }
  return s;
}

/**
 * n dependent operations of one kind (a chain: each uses the previous result), for per-operation costs.
 * kind: 0 none (loop only), 1 add, 2 mul, 3 div, 4 sqrt, 5 sin, 6 cos, 7 cbrt, 8 log, 9 exp, 10 atan2,
 * 11 atan, 12 pow, 13 sinh, 14 tan, 15 hypot. Arguments stay in [0.5, 2] so no special path is timed.
 */
export function op_chain(kind: i32, n: i32, x0: f64): f64 {
  let x = x0;
  const c: f64 = 1.0000001;
  switch (kind) {
    case 0: for (let i = 0; i < n; i++) { x = x * 1.0; } break;
    case 1: for (let i = 0; i < n; i++) { x = x + c; } break;
    case 2: for (let i = 0; i < n; i++) { x = x * c; } break;
    case 3: for (let i = 0; i < n; i++) { x = c / x; } break;
    case 4: for (let i = 0; i < n; i++) { x = sqrt(x) + 0.5; } break;
    case 5: for (let i = 0; i < n; i++) { x = Math.sin(x) + 0.9; } break;
    case 6: for (let i = 0; i < n; i++) { x = Math.cos(x) + 0.9; } break;
    case 7: for (let i = 0; i < n; i++) { x = Math.cbrt(x) + 0.5; } break;
    case 8: for (let i = 0; i < n; i++) { x = Math.log(x) + 1.5; } break;
    case 9: for (let i = 0; i < n; i++) { x = Math.exp(x - 1.0) + 0.2; } break;
    case 10: for (let i = 0; i < n; i++) { x = Math.atan2(x, 1.1) + 0.7; } break;
    case 11: for (let i = 0; i < n; i++) { x = Math.atan(x) + 0.7; } break;
    case 12: for (let i = 0; i < n; i++) { x = Math.pow(x, 0.75) + 0.3; } break;
    case 13: for (let i = 0; i < n; i++) { x = Math.sinh(x - 1.0) + 1.0; } break;
    case 14: for (let i = 0; i < n; i++) { x = Math.tan(x - 1.0) + 1.2; } break;
    case 15: for (let i = 0; i < n; i++) { x = Math.hypot(x, 0.5) - 0.3; } break;
    default: return -1;
  }
  return x;
}

/**
 * The floor of the solver's design: the reduction of M plus ONE correction step from a perfect starter (the
 * solver's own root, placed at bench_roots() by the host), no starter. Same code as kepler_elliptic's.
 */
export function loop_floor(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    const e = load<f64>(p);
    const m = reduceTurns(load<f64>(p, 8));
    const ml = reducedLo();
    const E = load<f64>(ROOTS + (<usize>i << 3));
    const mh = abs(m);
    s += E + correctionStep(e, 1.0 - e, mh, m < 0 ? -ml : ml, E);
  }
  return s;
}

/** One sincos (the library's, one argument reduction for both) per case, each fed by the previous result: latency. */
export function loop_sincos_dep(n: i32): f64 {
  let x: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    NativeMath.sincos(load<f64>(p, 8) + x * 1e-300);
    x = NativeMath.sincos_sin + NativeMath.sincos_cos;
  }
  return x;
}

/** The solver with each case fed by the previous result (latency rather than throughput). */
export function loop_elliptic_dep(n: i32): f64 {
  let x: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = INPUTS + (<usize>i << 4);
    kepler_elliptic(load<f64>(p), load<f64>(p, 8) + x * 1e-300);
    x = got(0);
  }
  return x;
}

// ---- the hyperbolic solver against its naive baseline --------------------------------------------------------

/**
 * Classic Newton for e sinh H - H = M from H0 = sgn(M) ln(2 |M| / e + 1.8) (the logarithmic starter of
 * J. M. A. Danby, "Fundamentals of Celestial Mechanics", 1988; recalled from memory), to a step of 4 ulp of H,
 * at most NEWTON_MAX_ITER steps. Iterations by newton_iterations().
 */
export function newton_hyperbolic(e: f64, M: f64): f64 {
  let H = M < 0 ? -Math.log(-2.0 * M / e + 1.8) : Math.log(2.0 * M / e + 1.8);
  newtonIters = -1;
  for (let it = 1; it <= NEWTON_MAX_ITER; it++) {
    const d = (e * Math.sinh(H) - H - M) / (e * Math.cosh(H) - 1.0);
    H -= d;
    if (abs(d) <= NEWTON_TOL_REL * abs(H)) {
      newtonIters = it;
      break;
    }
  }
  return H;
}

/** kepler_hyperbolic over the first n pairs of bench_hyp_inputs(). */
export function loop_hyperbolic(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = HYP_INPUTS + (<usize>i << 4);
    kepler_hyperbolic(load<f64>(p), load<f64>(p, 8));
    s += got(0);
  }
  return s;
}

/** The hyperbolic Newton baseline over the same pairs. */
export function loop_newton_hyperbolic(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < BENCH_CAPACITY; i++) {
    const p = HYP_INPUTS + (<usize>i << 4);
    s += newton_hyperbolic(load<f64>(p), load<f64>(p, 8));
  }
  return s;
}

// ---- propagate against its naive baseline ----------------------------------------------------------------------

let naiveIters: i32 = 0;
const NAIVE_PROP_TOL: f64 = 8.881784197001252e-16; // |step| <= 4 ulp of chi, as the Newton baselines

/** Iterations of the last naive_propagate call (-1: the cap was reached). */
export function naive_iterations(): i32 {
  return naiveIters;
}

/**
 * Textbook universal-variable propagation (H. D. Curtis, "Orbital Mechanics for Engineering Students",
 * Algorithms 3.3 and 3.4; recalled from memory): Newton on chi from chi0 = sqrt(mu) |alpha| dt, Stumpff C(z),
 * S(z) by their closed forms with cos/cosh (series only at z = 0), no revolution removal, no bracket, Lagrange
 * f, g, f', g'. Writes r, v to slots 0-5 (like propagate) and returns |r|.
 */
export function naive_propagate(mu: f64, rx: f64, ry: f64, rz: f64, vx: f64, vy: f64, vz: f64, dt: f64): f64 {
  const r0 = Math.sqrt(rx * rx + ry * ry + rz * rz);
  const v2 = vx * vx + vy * vy + vz * vz;
  const vr0 = (rx * vx + ry * vy + rz * vz) / r0;
  const alpha = 2.0 / r0 - v2 / mu;
  const smu = Math.sqrt(mu);
  let x = smu * abs(alpha) * dt;
  let C: f64 = 0.5;
  let S: f64 = 1.0 / 6.0;
  let z: f64 = 0;
  naiveIters = -1;
  for (let it = 1; it <= NEWTON_MAX_ITER; it++) {
    z = alpha * x * x;
    if (z > 0) {
      const sz = Math.sqrt(z);
      C = (1.0 - Math.cos(sz)) / z;
      S = (sz - Math.sin(sz)) / (sz * sz * sz);
    } else if (z < 0) {
      const sz = Math.sqrt(-z);
      C = (Math.cosh(sz) - 1.0) / -z;
      S = (Math.sinh(sz) - sz) / (sz * sz * sz);
    } else {
      C = 0.5;
      S = 1.0 / 6.0;
    }
    const F = r0 * vr0 / smu * x * x * C + (1.0 - alpha * r0) * x * x * x * S + r0 * x - smu * dt;
    const dF = r0 * vr0 / smu * x * (1.0 - alpha * x * x * S) + (1.0 - alpha * r0) * x * x * C + r0;
    const d = F / dF;
    x -= d;
    if (abs(d) <= NAIVE_PROP_TOL * abs(x)) {
      naiveIters = it;
      break;
    }
  }
  z = alpha * x * x;
  const f = 1.0 - x * x / r0 * C;
  const g = dt - x * x * x / smu * S;
  const px = f * rx + g * vx;
  const py = f * ry + g * vy;
  const pz = f * rz + g * vz;
  const r = Math.sqrt(px * px + py * py + pz * pz);
  const fd = smu / (r * r0) * (alpha * x * x * x * S - x);
  const gd = 1.0 - x * x / r * C;
  store<f64>(bench_out(), px);
  store<f64>(bench_out(), py, 8);
  store<f64>(bench_out(), pz, 16);
  store<f64>(bench_out(), fd * rx + gd * vx, 24);
  store<f64>(bench_out(), fd * ry + gd * vy, 32);
  store<f64>(bench_out(), fd * rz + gd * vz, 40);
  return r;
}

const NAIVE_OUT: usize = memory.data(64, 16);
/** Where naive_propagate writes r, v (6 f64). */
export function bench_out(): usize {
  return NAIVE_OUT;
}

/** propagate over the first n cases of bench_prop_inputs(). */
export function loop_propagate(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < PROP_CAPACITY; i++) {
    const p = PROP_INPUTS + (<usize>i << 6);
    propagate(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), load<f64>(p, 24), load<f64>(p, 32), load<f64>(p, 40), load<f64>(p, 48), load<f64>(p, 56));
    s += got(0);
  }
  return s;
}

/** The naive propagation over the same cases. */
export function loop_naive_propagate(n: i32): f64 {
  let s: f64 = 0;
  for (let i = 0; i < n && i < PROP_CAPACITY; i++) {
    const p = PROP_INPUTS + (<usize>i << 6);
    s += naive_propagate(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), load<f64>(p, 24), load<f64>(p, 32), load<f64>(p, 40), load<f64>(p, 48), load<f64>(p, 56));
  }
  return s;
}
