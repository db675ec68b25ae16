// Fixed-step integrators for r'' = a(r) (gravity.ts: point mass plus zonal J2, J3), with the invariant monitor
// (monitor.ts) run on every step. The step size and count are fixed in advance, so the work is known: onboard
// propagation style. A run is deterministic: the same inputs give the same bits (no host math, no data-dependent
// step control).
//
// Methods (the `method` argument):
//  0 rk4       classical Runge-Kutta, 4th order (W. Kutta, Z. Math. Phys. 46, 1901), 4 force evaluations a step.
//  1 verlet    velocity Verlet / leapfrog, kick-drift-kick, 2nd order, symplectic and time-reversible
//              (L. Verlet, Phys. Rev. 159, 1967, 98-103). One evaluation a step: the acceleration at the new
//              position is kept for the next step's first kick.
//  2 yoshida4  H. Yoshida, "Construction of higher order symplectic integrators", Phys. Lett. A 150 (1990)
//              262-268: three Verlet sub-steps of w1 h, w0 h, w1 h with w1 = 1/(2 - 2^(1/3)), w0 = 1 - 2 w1;
//              4th order, symplectic. Three evaluations a step.
//  3 butcher6  J. C. Butcher's 7-stage explicit Runge-Kutta method of order 6 (Butcher, "On Runge-Kutta
//              processes of high order", J. Austral. Math. Soc. 4 (1964) 179-194); the tableau, with
//              c = (0, 1/3, 2/3, 1/3, 1/2, 1/2, 1), is in butcher6Step() below (recalled from memory;
//              its order is measured by tests/integrate-twobody.test.ts). Seven evaluations a step.
// The Runge-Kutta methods are written in Nystrom form for r'' = a(r) (the stage velocities eliminated, see
//  butcher6Step): identical to the tableau applied to y = (r, v) up to rounding, and nothing stored but locals.
// State: module-level scalars (no linear memory is written except the output slots).
// Special cases (integrate_begin, integrate), in order: a non-finite input -> ERR_NONFINITE; mu <= 0, radius <= 0,
//  step = 0, steps outside [0, INTEGRATE_MAX_STEPS], an unknown method or a negative budget -> ERR_DOMAIN;
//  r0 = 0 or h0 = r0 x v0 = 0 -> ERR_DEGENERATE; invariants that overflow at step 0 -> ERR_OVERFLOW.
//  A negative step integrates backwards.
//  During the run, a non-finite state or invariant (a collision with the centre, an overflow) stops it with ERR_OVERFLOW;
//  slot 14 then holds the step that failed.
// Transition matrix (integrate_transition, integrate_transition_begin, integrate_phi): the run may carry the 6x6
//  Phi = d(r, v)_k / d(r, v)_0 of the discrete map beside the state (variational.ts: the same tableau on the
//  variational equations for rk4 and butcher6, the exact tangent of kick-drift-kick for verlet and yoshida4, with
//  the analytic gravity gradient of gravity.ts), and the monitor then checks its symplectic defect on every step
//  with a budget (monitor.ts). The state's own arithmetic is unchanged: the same bits with or without Phi.
//  Special cases as above, plus a non-finite or negative symplectic budget (ERR_NONFINITE, ERR_DOMAIN, in the same
//  order) and a non-finite Phi or defect during the run (ERR_OVERFLOW, the failing step in slot k).
// Loop cap: INTEGRATE_MAX_STEPS steps a call.
// Output slots (integrate, integrate_begin, integrate_step):
//  0..5 r, v at the last step; 6..9 maximum deviation so far of energy, h, ecc, areal (monitor.ts);
//  10..13 first step over the budget of each (-1: none); 14 step index k; 15 t = k * step;
//  16 energy; 17..19 h vector; 20..22 eccentricity vector; 23 areal velocity; 24..27 deviations at this step.
//  Step numbers are stored as reals: exact to 2^53 (f64), 2^24 (f32 build).
// Output slots (integrate_transition, integrate_phi; the integration_transition layout of the ABI table): r, v;
//  phi_11 .. phi_66 row-major; the four maximum deviations and first steps over budget; symp_dev, symp_step
//  (maximum defect, first step over its budget); k; t; symp_dev_now.
// Accuracy measured (release build; tests/integrate-*.test.ts): observed order by step halving against a 40-digit
//  Kepler reference 4.06 (rk4), 2.00 (verlet), 4.00 (yoshida4), 6.03 (butcher6); angular momentum |h - h0|/|h0|
//  at most 4e-14 over 100,000 Verlet or yoshida4 steps; over 10,000 orbits at 64 steps an orbit (e = 0.1) the
//  largest energy error of the last tenth equals the first tenth's for verlet (1.05e-3) and yoshida4 (2.17e-5),
//  and grows about tenfold for rk4 (2.2e-3 -> 2.4e-2) and butcher6 (3.9e-6 -> 3.9e-5).

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_DEGENERATE, ERR_OVERFLOW } from "./status";
import { put } from "./io";
import { METHOD_RK4, METHOD_VERLET, METHOD_YOSHIDA4, METHOD_BUTCHER6, INTEGRATION_K, INTEGRATION_TRANSITION_RX,
  INTEGRATION_TRANSITION_RY, INTEGRATION_TRANSITION_RZ, INTEGRATION_TRANSITION_VX, INTEGRATION_TRANSITION_VY,
  INTEGRATION_TRANSITION_VZ, INTEGRATION_TRANSITION_PHI_11, INTEGRATION_TRANSITION_ENERGY_DEV,
  INTEGRATION_TRANSITION_ENERGY_STEP, INTEGRATION_TRANSITION_SYMP_DEV, INTEGRATION_TRANSITION_SYMP_STEP,
  INTEGRATION_TRANSITION_SYMP_DEV_NOW, INTEGRATION_TRANSITION_K, INTEGRATION_TRANSITION_T } from "./abi";
import { SIXTH, THIRD, TWO_THIRDS } from "./real";
import { accel, accelX, accelY, accelZ, potential } from "./gravity";
import { monitorBegin, monitorUpdate, monitorFinite, monitorPut, monitorSympBegin, monitorSympUpdate,
  monitorPutSummary } from "./monitor";
import { phiBegin, phiStage, phiRk4, phiButcher6, phiVerlet, phiDefect, phiPut } from "./variational";

const METHOD_LAST: i32 = METHOD_BUTCHER6;

/** Most steps one call may take. */
export const INTEGRATE_MAX_STEPS: i32 = 1000000000;

// Yoshida (1990), 4th order: w1 = 1/(2 - 2^(1/3)) = 1.35120719195965763... (decimal.js, 60 digits). The
// constant below, recalled from memory, is one ulp above the correctly rounded 1.3512071919596575 (1.4e-16
// relative; tests/kernels-constants.test.ts): the fourth-order conditions then hold to that level, far below the
// truncation error at any usable step, and it is kept so that the bits stay those of the golden files.
// w0 = 1 - 2 w1 computed exactly, so the three sub-steps add up to exactly one step.
const YOSHIDA_W1: real = <real>1.3512071919596578; // f64 0x3FF59E8B6EB96339, f32 0x3FACF45B
const YOSHIDA_W0: real = <real>1.0 - <real>2.0 * YOSHIDA_W1;

// The run: model, method, state and the acceleration at the current position (kept by Verlet/Yoshida).
let gMu: real = 1;
let gJ2: real = 0;
let gJ3: real = 0;
let gR: real = 1;
let hStep: real = 0;
let method: i32 = -1;
let k: i32 = 0;
let failed: i32 = ERR_DOMAIN; // nothing begun yet
let carry: bool = false; // the run carries the transition matrix (variational.ts)
let X: real = 0;
let Y: real = 0;
let Z: real = 0;
let VX: real = 0;
let VY: real = 0;
let VZ: real = 0;
let AX: real = 0;
let AY: real = 0;
let AZ: real = 0;

// The acceleration at (x, y, z) under the run's model (read with accelX, accelY, accelZ right after).
function accelRun(x: real, y: real, z: real): void {
  accel(gMu, gJ2, gJ3, gR, x, y, z);
}

// The acceleration at stage s (1..7) of a Runge-Kutta step; in a run that carries Phi, also the gradient there.
function stageAccel(s: i32, x: real, y: real, z: real): void {
  accelRun(x, y, z);
  if (carry) phiStage(s, x, y, z);
}

function accelAt(x: real, y: real, z: real): void {
  accelRun(x, y, z);
  AX = accelX();
  AY = accelY();
  AZ = accelZ();
}

// Classical RK4 on (r, v), written in its Nystrom form (below): four evaluations.
//   r2 = r + h/2 v,  r3 = r + h/2 v + h^2/4 a1,  r4 = r + h v + h^2/2 a2,
//   r' = r + h v + h^2/6 (a1 + a2 + a3),  v' = v + h/6 (a1 + 2 a2 + 2 a3 + a4).
function rk4Step(h: real): void {
  const h2 = h * h;
  const c2 = <real>0.5 * h;
  stageAccel(1, X, Y, Z);
  const a1x = accelX(), a1y = accelY(), a1z = accelZ();
  stageAccel(2, X + c2 * VX, Y + c2 * VY, Z + c2 * VZ);
  const a2x = accelX(), a2y = accelY(), a2z = accelZ();
  const q3 = <real>0.25 * h2;
  stageAccel(3, X + c2 * VX + q3 * a1x, Y + c2 * VY + q3 * a1y, Z + c2 * VZ + q3 * a1z);
  const a3x = accelX(), a3y = accelY(), a3z = accelZ();
  const q4 = <real>0.5 * h2;
  stageAccel(4, X + h * VX + q4 * a2x, Y + h * VY + q4 * a2y, Z + h * VZ + q4 * a2z);
  const a4x = accelX(), a4y = accelY(), a4z = accelZ();
  const p = h2 * SIXTH;
  const w = h * SIXTH;
  X += h * VX + p * (a1x + a2x + a3x);
  Y += h * VY + p * (a1y + a2y + a3y);
  Z += h * VZ + p * (a1z + a2z + a3z);
  VX += w * (a1x + <real>2.0 * (a2x + a3x) + a4x);
  VY += w * (a1y + <real>2.0 * (a2y + a3y) + a4y);
  VZ += w * (a1z + <real>2.0 * (a2z + a3z) + a4z);
}

// Butcher's order-6 method on (r, v) in Nystrom form: with A the tableau, the stage positions are
// r_i = r + c_i h v + h^2 sum_m (A^2)_im a_m and r' = r + h v + h^2 sum_m (b A)_m a_m, v' = v + h sum_m b_m a_m:
// the same method as A applied to y = (r, v) (the stage velocities are eliminated), with no stage storage.
// The tableau (Butcher 1964, recalled from memory), strictly lower rows of A:
//   row 2: 1/3; row 3: 0, 2/3; row 4: 1/12, 1/3, -1/12; row 5: -1/16, 9/8, -3/16, -3/8;
//   row 6: 0, 9/8, -3/8, -3/4, 1/2; row 7: 9/44, -9/11, 63/44, 18/11, 0, -16/11.
// A^2 and b A computed exactly in rationals from it (c = row sums of A):
//   c  = 0, 1/3, 2/3, 1/3, 1/2, 1/2, 1
//   A^2: row 3: 2/9; row 4: 1/9, -1/18; row 5: 11/32, -1/4, 1/32; row 6: 9/32, 1/16, -1/32, -3/16;
//        row 7: -3/22, -3/22, 9/22, 12/11, -8/11
//   b   = 11/120, 0, 27/40, 27/40, -4/15, -4/15, 11/120;   b A = 11/120, 0, 9/40, 9/20, -2/15, -2/15, 0
function butcher6Step(h: real): void {
  const h2 = h * h;
  stageAccel(1, X, Y, Z);
  const a1x = accelX(), a1y = accelY(), a1z = accelZ();
  const t2 = h * THIRD;
  stageAccel(2, X + t2 * VX, Y + t2 * VY, Z + t2 * VZ);
  const a2x = accelX(), a2y = accelY(), a2z = accelZ();
  const t3 = h * TWO_THIRDS;
  const q31 = h2 * (<real>2.0 / <real>9.0);
  stageAccel(3, X + t3 * VX + q31 * a1x, Y + t3 * VY + q31 * a1y, Z + t3 * VZ + q31 * a1z);
  const a3x = accelX(), a3y = accelY(), a3z = accelZ();
  const q41 = h2 * (<real>1.0 / <real>9.0);
  const q42 = h2 * (<real>-1.0 / <real>18.0);
  stageAccel(4, X + t2 * VX + (q41 * a1x + q42 * a2x), Y + t2 * VY + (q41 * a1y + q42 * a2y),
    Z + t2 * VZ + (q41 * a1z + q42 * a2z));
  const a4x = accelX(), a4y = accelY(), a4z = accelZ();
  const t5 = <real>0.5 * h;
  const q51 = h2 * (<real>11.0 / <real>32.0);
  const q52 = h2 * <real>-0.25;
  const q53 = h2 * <real>0.03125; // 1/32
  stageAccel(5, X + t5 * VX + (q51 * a1x + q52 * a2x + q53 * a3x), Y + t5 * VY + (q51 * a1y + q52 * a2y + q53 * a3y),
    Z + t5 * VZ + (q51 * a1z + q52 * a2z + q53 * a3z));
  const a5x = accelX(), a5y = accelY(), a5z = accelZ();
  const q61 = h2 * <real>0.28125; // 9/32
  const q62 = h2 * <real>0.0625; // 1/16
  const q63 = h2 * <real>-0.03125; // -1/32
  const q64 = h2 * <real>-0.1875; // -3/16
  stageAccel(6, X + t5 * VX + (q61 * a1x + q62 * a2x + q63 * a3x + q64 * a4x),
    Y + t5 * VY + (q61 * a1y + q62 * a2y + q63 * a3y + q64 * a4y), Z + t5 * VZ + (q61 * a1z + q62 * a2z + q63 * a3z + q64 * a4z));
  const a6x = accelX(), a6y = accelY(), a6z = accelZ();
  const q71 = h2 * (<real>-3.0 / <real>22.0); // also (7,2)
  const q73 = h2 * (<real>9.0 / <real>22.0);
  const q74 = h2 * (<real>12.0 / <real>11.0);
  const q75 = h2 * (<real>-8.0 / <real>11.0);
  stageAccel(7, X + h * VX + (q71 * (a1x + a2x) + q73 * a3x + q74 * a4x + q75 * a5x),
    Y + h * VY + (q71 * (a1y + a2y) + q73 * a3y + q74 * a4y + q75 * a5y), Z + h * VZ + (q71 * (a1z + a2z) + q73 * a3z + q74 * a4z + q75 * a5z));
  const a7x = accelX(), a7y = accelY(), a7z = accelZ();
  // b A and b (b_2 = 0; b_3 = b_4, b_5 = b_6 grouped).
  const p1 = h2 * (<real>11.0 / <real>120.0);
  const p3 = h2 * (<real>9.0 / <real>40.0);
  const p4 = h2 * <real>0.45; // 9/20
  const p5 = h2 * (<real>-2.0 / <real>15.0);
  X += h * VX + (p1 * a1x + p3 * a3x + p4 * a4x + p5 * (a5x + a6x));
  Y += h * VY + (p1 * a1y + p3 * a3y + p4 * a4y + p5 * (a5y + a6y));
  Z += h * VZ + (p1 * a1z + p3 * a3z + p4 * a4z + p5 * (a5z + a6z));
  const w1 = h * (<real>11.0 / <real>120.0);
  const w3 = h * <real>0.675; // 27/40
  const w5 = h * (<real>-4.0 / <real>15.0);
  VX += w1 * (a1x + a7x) + w3 * (a3x + a4x) + w5 * (a5x + a6x);
  VY += w1 * (a1y + a7y) + w3 * (a3y + a4y) + w5 * (a5y + a6y);
  VZ += w1 * (a1z + a7z) + w3 * (a3z + a4z) + w5 * (a5z + a6z);
}

// Kick-drift-kick with the stored acceleration; leaves the acceleration at the new position stored.
function verletStep(h: real): void {
  const hh = <real>0.5 * h;
  VX += hh * AX;
  VY += hh * AY;
  VZ += hh * AZ;
  X += h * VX;
  Y += h * VY;
  Z += h * VZ;
  accelAt(X, Y, Z);
  VX += hh * AX;
  VY += hh * AY;
  VZ += hh * AZ;
}

// One kick-drift-kick sub-step, and its tangent map when the run carries Phi.
function verletSub(h: real): void {
  verletStep(h);
  if (carry) phiVerlet(h, X, Y, Z);
}

function oneStep(): void {
  if (method == METHOD_VERLET) {
    verletSub(hStep);
  } else if (method == METHOD_YOSHIDA4) {
    verletSub(YOSHIDA_W1 * hStep);
    verletSub(YOSHIDA_W0 * hStep);
    verletSub(YOSHIDA_W1 * hStep);
  } else if (method == METHOD_RK4) {
    rk4Step(hStep);
    if (carry) phiRk4(hStep);
  } else {
    butcher6Step(hStep);
    if (carry) phiButcher6(hStep);
  }
}

function stateFinite(): bool {
  return isFinite(X) && isFinite(Y) && isFinite(Z) && isFinite(VX) && isFinite(VY) && isFinite(VZ) &&
    (X != 0 || Y != 0 || Z != 0);
}

function writeSlots(): void {
  put(0, X);
  put(1, Y);
  put(2, Z);
  put(3, VX);
  put(4, VY);
  put(5, VZ);
  monitorPut(); // 6..13, 16..27
  put(14, <real>k);
  put(15, <real>k * hStep);
}

/**
 * Start a run at step 0: check the inputs, store the model and the state, evaluate the invariants at step 0.
 * Budgets (energy, h, ecc, areal) are relative deviations; 0 means none. Writes slots 0..27 (see the header).
 */
export function integrate_begin(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, step: real,
  meth: i32, j2: real, j3: real, radius: real, energyBudget: real, hBudget: real, eccBudget: real, arealBudget: real): i32 {
  return begin(mu, r0x, r0y, r0z, v0x, v0y, v0z, step, 0, meth, j2, j3, radius, energyBudget, hBudget, eccBudget, arealBudget,
    false, 0);
}

/**
 * integrate_begin for a run that carries the transition matrix Phi (variational.ts) beside the state, with a
 * budget for its symplectic defect (0: none). Writes the integration layout (slots 0..27), as integrate_begin;
 * integrate_phi writes Phi and the defect.
 */
export function integrate_transition_begin(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real,
  step: real, meth: i32, j2: real, j3: real, radius: real, energyBudget: real, hBudget: real, eccBudget: real,
  arealBudget: real, sympBudget: real): i32 {
  return begin(mu, r0x, r0y, r0z, v0x, v0y, v0z, step, 0, meth, j2, j3, radius, energyBudget, hBudget, eccBudget, arealBudget,
    true, sympBudget);
}

// integrate_begin, with the step count of `integrate` checked among the domain conditions, and Phi carried when
// `withPhi` (its budget checked with the others).
function begin(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, step: real, steps: i32,
  meth: i32, j2: real, j3: real, radius: real, energyBudget: real, hBudget: real, eccBudget: real, arealBudget: real,
  withPhi: bool, sympBudget: real): i32 {
  failed = ERR_DOMAIN;
  carry = false;
  if (!isFinite(mu) || !isFinite(r0x) || !isFinite(r0y) || !isFinite(r0z) || !isFinite(v0x) || !isFinite(v0y) ||
    !isFinite(v0z) || !isFinite(step) || !isFinite(j2) || !isFinite(j3) || !isFinite(radius) ||
    !isFinite(energyBudget) || !isFinite(hBudget) || !isFinite(eccBudget) || !isFinite(arealBudget) || !isFinite(sympBudget)) {
    failed = ERR_NONFINITE;
    return ERR_NONFINITE;
  }
  if (!(mu > 0) || !(radius > 0) || step == 0 || steps < 0 || steps > INTEGRATE_MAX_STEPS || meth < 0 || meth > METHOD_LAST ||
    energyBudget < 0 || hBudget < 0 || eccBudget < 0 || arealBudget < 0 || sympBudget < 0) {
    return ERR_DOMAIN;
  }
  if (r0x == 0 && r0y == 0 && r0z == 0) {
    failed = ERR_DEGENERATE;
    return ERR_DEGENERATE;
  }
  gMu = mu;
  gJ2 = j2;
  gJ3 = j3;
  gR = radius;
  hStep = step;
  method = meth;
  k = 0;
  X = r0x;
  Y = r0y;
  Z = r0z;
  VX = v0x;
  VY = v0y;
  VZ = v0z;
  accelAt(X, Y, Z);
  const V = potential(gMu, gJ2, gJ3, gR, X, Y, Z);
  if (!isFinite(AX) || !isFinite(AY) || !isFinite(AZ) || !isFinite(V)) {
    failed = ERR_OVERFLOW;
    return ERR_OVERFLOW;
  }
  const zonal = j2 != 0 || j3 != 0;
  if (!monitorBegin(mu, zonal, X, Y, Z, VX, VY, VZ, V, energyBudget, hBudget, eccBudget, arealBudget)) {
    failed = ERR_DEGENERATE;
    return ERR_DEGENERATE;
  }
  if (!monitorFinite()) {
    failed = ERR_OVERFLOW;
    return ERR_OVERFLOW;
  }
  if (withPhi) {
    if (!phiBegin(mu, j2, j3, radius, X, Y, Z)) {
      failed = ERR_OVERFLOW;
      return ERR_OVERFLOW;
    }
    monitorSympBegin(sympBudget);
    carry = true;
  }
  failed = OK;
  writeSlots();
  return OK;
}

// Advance the run by n steps (0 <= n <= INTEGRATE_MAX_STEPS), monitoring every one. On a failure it sets
// `failed`, leaves k at the failing step and returns the status; no slot is written.
function advance(n: i32): i32 {
  for (let i = 0; i < n && i < INTEGRATE_MAX_STEPS; i++) {
    oneStep();
    k += 1;
    if (!stateFinite()) {
      failed = ERR_OVERFLOW;
      return ERR_OVERFLOW;
    }
    const V = potential(gMu, gJ2, gJ3, gR, X, Y, Z);
    if (!isFinite(V)) {
      failed = ERR_OVERFLOW;
      return ERR_OVERFLOW;
    }
    monitorUpdate(k, X, Y, Z, VX, VY, VZ, V);
    if (!monitorFinite()) {
      failed = ERR_OVERFLOW;
      return ERR_OVERFLOW;
    }
    if (carry) {
      const d = phiDefect(); // non-finite when any entry of Phi is
      if (!isFinite(d)) {
        failed = ERR_OVERFLOW;
        return ERR_OVERFLOW;
      }
      monitorSympUpdate(k, d);
    }
  }
  // The elapsed time k * step (slot 15) can leave the range even when the state does not (a huge step).
  if (!isFinite(<real>k * hStep)) {
    failed = ERR_OVERFLOW;
    return ERR_OVERFLOW;
  }
  return OK;
}

/**
 * Advance the run begun by integrate_begin (or integrate_transition_begin) by n steps (0 <= n <=
 * INTEGRATE_MAX_STEPS), monitoring every one. Writes slots 0..27 for the last step; after a failure only slot 14,
 * the failing step. After a failure every further call returns the same failure.
 */
export function integrate_step(n: i32): i32 {
  if (failed != OK) return failed;
  if (n < 0 || n > INTEGRATE_MAX_STEPS) return ERR_DOMAIN;
  const st = advance(n);
  if (st != OK) {
    put(INTEGRATION_K, <real>k);
    return st;
  }
  writeSlots();
  return OK;
}

/**
 * Write the current run's state, Phi and monitor summary in the integration_transition layout: r, v; Phi
 * row-major; maximum deviations and first steps over budget; the symplectic defect's maximum, first step over its
 * budget and value at this step; k and t. ERR_DOMAIN when the run does not carry Phi; the run's failure status
 * after a failure (nothing written).
 */
export function integrate_phi(): i32 {
  if (failed != OK) return failed;
  if (!carry) return ERR_DOMAIN;
  put(INTEGRATION_TRANSITION_RX, X);
  put(INTEGRATION_TRANSITION_RY, Y);
  put(INTEGRATION_TRANSITION_RZ, Z);
  put(INTEGRATION_TRANSITION_VX, VX);
  put(INTEGRATION_TRANSITION_VY, VY);
  put(INTEGRATION_TRANSITION_VZ, VZ);
  phiPut(INTEGRATION_TRANSITION_PHI_11);
  monitorPutSummary(INTEGRATION_TRANSITION_ENERGY_DEV, INTEGRATION_TRANSITION_ENERGY_STEP, INTEGRATION_TRANSITION_SYMP_DEV,
    INTEGRATION_TRANSITION_SYMP_STEP, INTEGRATION_TRANSITION_SYMP_DEV_NOW);
  put(INTEGRATION_TRANSITION_K, <real>k);
  put(INTEGRATION_TRANSITION_T, <real>k * hStep);
  return OK;
}

/**
 * Integrate `steps` fixed steps of size `step` from (r0, v0) with the given method and zonal model, monitoring
 * the invariants on every step. Slots as integrate_begin/integrate_step, for the final step.
 */
export function integrate(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real, step: real,
  steps: i32, meth: i32, j2: real, j3: real, radius: real, energyBudget: real, hBudget: real, eccBudget: real,
  arealBudget: real): i32 {
  const st = begin(mu, r0x, r0y, r0z, v0x, v0y, v0z, step, steps, meth, j2, j3, radius,
    energyBudget, hBudget, eccBudget, arealBudget, false, 0);
  if (st != OK) return st;
  return integrate_step(steps);
}

/**
 * integrate with the transition matrix of the discrete map carried beside the state (variational.ts) and its
 * symplectic defect monitored on every step (budget sympBudget, 0: none). Writes the integration_transition
 * layout for the final step (integrate_phi); after a failure during the run, only its slot k (the failing step).
 */
export function integrate_transition(mu: real, r0x: real, r0y: real, r0z: real, v0x: real, v0y: real, v0z: real,
  step: real, steps: i32, meth: i32, j2: real, j3: real, radius: real, energyBudget: real, hBudget: real,
  eccBudget: real, arealBudget: real, sympBudget: real): i32 {
  const st = begin(mu, r0x, r0y, r0z, v0x, v0y, v0z, step, steps, meth, j2, j3, radius,
    energyBudget, hBudget, eccBudget, arealBudget, true, sympBudget);
  if (st != OK) return st;
  const run = advance(steps);
  if (run != OK) {
    put(INTEGRATION_TRANSITION_K, <real>k);
    return run;
  }
  return integrate_phi();
}
