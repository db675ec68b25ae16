// Partial derivatives of Lambert's solution: (mu, r1, r2, tof, revs, retrograde, branch) -> v1, v2 and
// d(v1, v2) / d(r1, r2, tof), the 6x7 matrix of first-order sensitivities of the transfer (targeting, navigation
// updates of a planned transfer).
//
// Method (the implicit-function form through the state transition matrix: R. H. Battin, "An Introduction to the
// Mathematics and Methods of Astrodynamics", AIAA 1987, 9.7, where the transition matrix's blocks give the
// sensitivities of boundary-value problems):
//  1. lambert (lambert.ts) with the same inputs: same special cases and statuses; v1, v2 (slots 0..5) are its bits.
//  2. transition (transition.ts) of (r1, v1) over tof: Phi = [[A, B], [C, D]] (blocks d r2 / d r1, d r2 / d v1,
//     d v2 / d r1, d v2 / d v1 along the transfer).
//  3. The arc keeps r(tof) = r2: dr2 = A dr1 + B dv1 + v2 dtof, so with B^-1 (adjugate over the determinant):
//       d v1 / d r1 = -B^-1 A,   d v1 / d r2 = B^-1,   d v1 / d tof = -B^-1 v2;
//     and dv2 = C dr1 + D dv1 + a2 dtof (a2 = -mu r2 / |r2|^3):
//       d v2 / d r1 = C - D B^-1 A,   d v2 / d r2 = D B^-1,   d v2 / d tof = a2 - D B^-1 v2.
//  4. det B = 0 (B is singular at the 180-degree geometry, where lambert already refuses, and where the transfer
//     time is a whole number of periods of the transfer orbit) -> ERR_DEGENERATE; a non-finite result -> ERR_OVERFLOW.
// Domain, special cases and iteration caps: those of lambert and transition.
// Output slots: 0..2 = v1, 3..5 = v2 (lambert's bits); 6..47 = d(v1x, v1y, v1z, v2x, v2y, v2z) / d(r1x, r1y, r1z,
// r2x, r2y, r2z, tof), row-major (slot 6 + 7 i + j); 48 = lambert's iterations.
// Accuracy (release f64 build; tests/lambert-partials.test.ts: central differences of Lambert's problem re-solved
// at 50 digits by shooting, harness/verify/reference/lambert.ts, on one lambert-suite case of each of 7 tags away
// from 180 degrees), as the largest entry error of the scale-free matrix (L = |r1|, V = sqrt(mu / L)) over its
// largest entry: 7.7e-16 (single-revolution short way) to 1.4e-13 (two revolutions, long-period branch). No vector
// suite yet; near 180 degrees B is nearly singular and the partials grow like 1 / det B (cond not measured).

import { OK, FIRST_ERROR, ERR_DEGENERATE, ERR_OVERFLOW } from "./status";
import { put, got } from "./io";
import { lambert } from "./lambert";
import { transition } from "./transition";
import { LAMBERT_ITERATIONS, TRANSITION_PHI_11, LAMBERT_PARTIALS_D_V1X_D_R1X, LAMBERT_PARTIALS_ITERATIONS } from "./abi";

/** First partial's slot, the number of columns (r1, r2, tof) and the iteration count's slot (the ABI table's). */
const LP_PART_SLOT: i32 = LAMBERT_PARTIALS_D_V1X_D_R1X;
const LP_COLS: i32 = 7;
const LP_ITER_SLOT: i32 = LAMBERT_PARTIALS_ITERATIONS;

/** Lambert's solution with its partial derivatives. Slots 0..5 = v1, v2; 6..47 = the 6x7 partials; 48 = iterations. */
export function lambert_partials(mu: real, r1x: real, r1y: real, r1z: real, r2x: real, r2y: real, r2z: real, tof: real, revs: i32, retrograde: i32, branch: i32): i32 {
  const st = lambert(mu, r1x, r1y, r1z, r2x, r2y, r2z, tof, revs, retrograde, branch);
  const iterations = got(LAMBERT_ITERATIONS);
  put(LP_ITER_SLOT, iterations);
  if (st >= FIRST_ERROR) return st;
  const v1x = got(0), v1y = got(1), v1z = got(2), v2x = got(3), v2y = got(4), v2z = got(5);
  // Step 2.
  const ts = transition(mu, r1x, r1y, r1z, v1x, v1y, v1z, tof);
  if (ts >= FIRST_ERROR) return ts;
  const a00 = got(TRANSITION_PHI_11 + 0), a01 = got(TRANSITION_PHI_11 + 1), a02 = got(TRANSITION_PHI_11 + 2);
  const a10 = got(TRANSITION_PHI_11 + 6), a11 = got(TRANSITION_PHI_11 + 7), a12 = got(TRANSITION_PHI_11 + 8);
  const a20 = got(TRANSITION_PHI_11 + 12), a21 = got(TRANSITION_PHI_11 + 13), a22 = got(TRANSITION_PHI_11 + 14);
  const b00 = got(TRANSITION_PHI_11 + 3), b01 = got(TRANSITION_PHI_11 + 4), b02 = got(TRANSITION_PHI_11 + 5);
  const b10 = got(TRANSITION_PHI_11 + 9), b11 = got(TRANSITION_PHI_11 + 10), b12 = got(TRANSITION_PHI_11 + 11);
  const b20 = got(TRANSITION_PHI_11 + 15), b21 = got(TRANSITION_PHI_11 + 16), b22 = got(TRANSITION_PHI_11 + 17);
  const c00 = got(TRANSITION_PHI_11 + 18), c01 = got(TRANSITION_PHI_11 + 19), c02 = got(TRANSITION_PHI_11 + 20);
  const c10 = got(TRANSITION_PHI_11 + 24), c11 = got(TRANSITION_PHI_11 + 25), c12 = got(TRANSITION_PHI_11 + 26);
  const c20 = got(TRANSITION_PHI_11 + 30), c21 = got(TRANSITION_PHI_11 + 31), c22 = got(TRANSITION_PHI_11 + 32);
  const d00 = got(TRANSITION_PHI_11 + 21), d01 = got(TRANSITION_PHI_11 + 22), d02 = got(TRANSITION_PHI_11 + 23);
  const d10 = got(TRANSITION_PHI_11 + 27), d11 = got(TRANSITION_PHI_11 + 28), d12 = got(TRANSITION_PHI_11 + 29);
  const d20 = got(TRANSITION_PHI_11 + 33), d21 = got(TRANSITION_PHI_11 + 34), d22 = got(TRANSITION_PHI_11 + 35);
  // Step 3: B^-1 = adj(B) / det B.
  const n00 = b11 * b22 - b12 * b21, n01 = b02 * b21 - b01 * b22, n02 = b01 * b12 - b02 * b11;
  const n10 = b12 * b20 - b10 * b22, n11 = b00 * b22 - b02 * b20, n12 = b02 * b10 - b00 * b12;
  const n20 = b10 * b21 - b11 * b20, n21 = b01 * b20 - b00 * b21, n22 = b00 * b11 - b01 * b10;
  const det = b00 * n00 + b01 * n10 + b02 * n20;
  if (det == 0) return ERR_DEGENERATE;
  if (!isFinite(det)) return ERR_OVERFLOW;
  const k00 = n00 / det, k01 = n01 / det, k02 = n02 / det;
  const k10 = n10 / det, k11 = n11 / det, k12 = n12 / det;
  const k20 = n20 / det, k21 = n21 / det, k22 = n22 / det;
  // d v1 / d r1 = -B^-1 A (x), d v1 / d tof = -B^-1 v2 (z).
  const x00 = -(k00 * a00 + k01 * a10 + k02 * a20), x01 = -(k00 * a01 + k01 * a11 + k02 * a21), x02 = -(k00 * a02 + k01 * a12 + k02 * a22);
  const x10 = -(k10 * a00 + k11 * a10 + k12 * a20), x11 = -(k10 * a01 + k11 * a11 + k12 * a21), x12 = -(k10 * a02 + k11 * a12 + k12 * a22);
  const x20 = -(k20 * a00 + k21 * a10 + k22 * a20), x21 = -(k20 * a01 + k21 * a11 + k22 * a21), x22 = -(k20 * a02 + k21 * a12 + k22 * a22);
  const z0 = -(k00 * v2x + k01 * v2y + k02 * v2z), z1 = -(k10 * v2x + k11 * v2y + k12 * v2z), z2 = -(k20 * v2x + k21 * v2y + k22 * v2z);
  const r2n = RMath.sqrt(r2x * r2x + r2y * r2y + r2z * r2z);
  const m3 = -mu / (r2n * r2n * r2n);
  const g0 = m3 * r2x, g1 = m3 * r2y, g2 = m3 * r2z;
  // Rows v1 (0..2) and v2 (3..5); columns r1 (0..2), r2 (3..5), tof (6).
  put(LP_PART_SLOT + LP_COLS * 0 + 0, x00);
  put(LP_PART_SLOT + LP_COLS * 0 + 1, x01);
  put(LP_PART_SLOT + LP_COLS * 0 + 2, x02);
  put(LP_PART_SLOT + LP_COLS * 0 + 3, k00);
  put(LP_PART_SLOT + LP_COLS * 0 + 4, k01);
  put(LP_PART_SLOT + LP_COLS * 0 + 5, k02);
  put(LP_PART_SLOT + LP_COLS * 0 + 6, z0);
  put(LP_PART_SLOT + LP_COLS * 1 + 0, x10);
  put(LP_PART_SLOT + LP_COLS * 1 + 1, x11);
  put(LP_PART_SLOT + LP_COLS * 1 + 2, x12);
  put(LP_PART_SLOT + LP_COLS * 1 + 3, k10);
  put(LP_PART_SLOT + LP_COLS * 1 + 4, k11);
  put(LP_PART_SLOT + LP_COLS * 1 + 5, k12);
  put(LP_PART_SLOT + LP_COLS * 1 + 6, z1);
  put(LP_PART_SLOT + LP_COLS * 2 + 0, x20);
  put(LP_PART_SLOT + LP_COLS * 2 + 1, x21);
  put(LP_PART_SLOT + LP_COLS * 2 + 2, x22);
  put(LP_PART_SLOT + LP_COLS * 2 + 3, k20);
  put(LP_PART_SLOT + LP_COLS * 2 + 4, k21);
  put(LP_PART_SLOT + LP_COLS * 2 + 5, k22);
  put(LP_PART_SLOT + LP_COLS * 2 + 6, z2);
  put(LP_PART_SLOT + LP_COLS * 3 + 0, c00 + d00 * x00 + d01 * x10 + d02 * x20);
  put(LP_PART_SLOT + LP_COLS * 3 + 1, c01 + d00 * x01 + d01 * x11 + d02 * x21);
  put(LP_PART_SLOT + LP_COLS * 3 + 2, c02 + d00 * x02 + d01 * x12 + d02 * x22);
  put(LP_PART_SLOT + LP_COLS * 3 + 3, d00 * k00 + d01 * k10 + d02 * k20);
  put(LP_PART_SLOT + LP_COLS * 3 + 4, d00 * k01 + d01 * k11 + d02 * k21);
  put(LP_PART_SLOT + LP_COLS * 3 + 5, d00 * k02 + d01 * k12 + d02 * k22);
  put(LP_PART_SLOT + LP_COLS * 3 + 6, g0 + d00 * z0 + d01 * z1 + d02 * z2);
  put(LP_PART_SLOT + LP_COLS * 4 + 0, c10 + d10 * x00 + d11 * x10 + d12 * x20);
  put(LP_PART_SLOT + LP_COLS * 4 + 1, c11 + d10 * x01 + d11 * x11 + d12 * x21);
  put(LP_PART_SLOT + LP_COLS * 4 + 2, c12 + d10 * x02 + d11 * x12 + d12 * x22);
  put(LP_PART_SLOT + LP_COLS * 4 + 3, d10 * k00 + d11 * k10 + d12 * k20);
  put(LP_PART_SLOT + LP_COLS * 4 + 4, d10 * k01 + d11 * k11 + d12 * k21);
  put(LP_PART_SLOT + LP_COLS * 4 + 5, d10 * k02 + d11 * k12 + d12 * k22);
  put(LP_PART_SLOT + LP_COLS * 4 + 6, g1 + d10 * z0 + d11 * z1 + d12 * z2);
  put(LP_PART_SLOT + LP_COLS * 5 + 0, c20 + d20 * x00 + d21 * x10 + d22 * x20);
  put(LP_PART_SLOT + LP_COLS * 5 + 1, c21 + d20 * x01 + d21 * x11 + d22 * x21);
  put(LP_PART_SLOT + LP_COLS * 5 + 2, c22 + d20 * x02 + d21 * x12 + d22 * x22);
  put(LP_PART_SLOT + LP_COLS * 5 + 3, d20 * k00 + d21 * k10 + d22 * k20);
  put(LP_PART_SLOT + LP_COLS * 5 + 4, d20 * k01 + d21 * k11 + d22 * k21);
  put(LP_PART_SLOT + LP_COLS * 5 + 5, d20 * k02 + d21 * k12 + d22 * k22);
  put(LP_PART_SLOT + LP_COLS * 5 + 6, g2 + d20 * z0 + d21 * z1 + d22 * z2);
  // Slots 0..5 and the iteration count (transition wrote its own there).
  put(0, v1x);
  put(1, v1y);
  put(2, v1z);
  put(3, v2x);
  put(4, v2y);
  put(5, v2z);
  put(LP_ITER_SLOT, iterations);
  for (let s = LP_PART_SLOT; s < LP_ITER_SLOT; s++) if (!isFinite(got(s))) return ERR_OVERFLOW;
  return OK;
}
