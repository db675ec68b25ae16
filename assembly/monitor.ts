// Invariant monitor: the conserved quantities of the orbit, evaluated on every step of a fixed-step run
// (never sampled), their running maximum deviation from step 0, and the first step that exceeds a budget.
//
// Invariants (per unit mass; r, v the state; V the potential energy of gravity.ts):
//  1. Energy             E = v.v/2 + V(r)           (V includes the J2/J3 terms when they are on).
//  2. Angular momentum   h = r x v                  point mass: the whole vector is conserved;
//                                                   zonal field: only h_z (the field is symmetric about z).
//  3. Eccentricity vector e = ((v.v - mu/r) r - (r.v) v)/mu   (Laplace-Runge-Lenz / mu; point mass only).
//  4. Areal velocity     dA/dt = |h|/2 (Kepler's second law); in a zonal field h_z/2, the areal velocity of
//                        the orbit's projection on the equator, which is what stays constant there.
// Deviations (dimensionless, from the value at step 0):
//  energy  |E - E0| / |E0|   (|E0| replaced by mu/|r0| when E0 = 0, a parabolic start)
//  h       |h - h0| / |h0|   point mass;   |h_z - h_z0| / |h0| zonal (|h0| > 0 so polar orbits work)
//  ecc     |e - e0|          (e is already dimensionless; an absolute measure keeps circular orbits usable)
//  areal   ||h| - |h0|| / |h0|  point mass;  |h_z - h_z0| / |h0| zonal
// With zonal terms on, e is not an invariant: its deviation is still reported, and its budget is ignored.
//  5. Symplectic defect (runs that carry the transition matrix, variational.ts): max |Phi~^T J Phi~ - J| of the
//     scale-free Phi~; computed by variational.ts (phiDefect), recorded here like the others (monitorSympUpdate).
//     Its deviation is the defect itself (0 at step 0, where Phi = I).
// Budgets: a budget > 0 is active; the first step k >= 1 whose deviation exceeds it is recorded (-1: none).
// The helpers assume finite states with r > 0 (the integrator checks before calling them).

// State: the file-private scalars below are this file's own scratch (the run being monitored); nothing outside
// reads them: the integrators get the report through monitorPut, which writes it to the output slots.

import { put } from "./io";

// Setup and reference values (step 0).
let mMu: real = 1;
let mInvMu: real = 1; // 1 / mMu, set with it
let mZonal: bool = false;
let e0: real = 0;
let eScale: real = 1;
let h0x: real = 0;
let h0y: real = 0;
let h0z: real = 0;
let h0: real = 1;
let invH0: real = 1; // 1 / h0, set with it
let c0x: real = 0;
let c0y: real = 0;
let c0z: real = 0;
let budE: real = 0;
let budH: real = 0;
let budEcc: real = 0;
let budA: real = 0;

// Current values (the last step monitored).
let curEnergy: real = 0;
let curHx: real = 0;
let curHy: real = 0;
let curHz: real = 0;
let curEx: real = 0;
let curEy: real = 0;
let curEz: real = 0;
let curAreal: real = 0;
let devE: real = 0;
let devH: real = 0;
let devEcc: real = 0;
let devA: real = 0;

// Running maxima and first steps over budget.
let maxE: real = 0;
let maxH: real = 0;
let maxEcc: real = 0;
let maxA: real = 0;
let firstE: i32 = -1;
let firstH: i32 = -1;
let firstEcc: i32 = -1;
let firstA: i32 = -1;

// The symplectic defect (runs with Phi): budget, value at the last step, running maximum, first step over.
let budS: real = 0;
let devS: real = 0;
let maxS: real = 0;
let firstS: i32 = -1;

/** Evaluate the invariants at one state (sets the cur* values). */
function evaluate(x: real, y: real, z: real, vx: real, vy: real, vz: real, V: real): void {
  const v2 = vx * vx + vy * vy + vz * vz;
  curEnergy = <real>0.5 * v2 + V;
  curHx = y * vz - z * vy;
  curHy = z * vx - x * vz;
  curHz = x * vy - y * vx;
  const r = RMath.sqrt(x * x + y * y + z * z);
  const rv = x * vx + y * vy + z * vz;
  const c = v2 - mMu / r;
  curEx = (c * x - rv * vx) * mInvMu;
  curEy = (c * y - rv * vy) * mInvMu;
  curEz = (c * z - rv * vz) * mInvMu;
  curAreal = mZonal ? <real>0.5 * curHz : <real>0.5 * RMath.sqrt(curHx * curHx + curHy * curHy + curHz * curHz);
}

/**
 * Start monitoring: store the model, the budgets and the step-0 values; clear maxima and first steps.
 * Returns false when |h0| = 0 (rectilinear motion: the relative h measures are undefined).
 */
export function monitorBegin(mu: real, zonal: bool, x: real, y: real, z: real, vx: real, vy: real, vz: real,
  V: real, bE: real, bH: real, bEcc: real, bA: real): bool {
  mMu = mu;
  mInvMu = <real>1.0 / mu;
  mZonal = zonal;
  budE = bE;
  budH = bH;
  budEcc = bEcc;
  budA = bA;
  evaluate(x, y, z, vx, vy, vz, V);
  e0 = curEnergy;
  eScale = e0 != 0 ? abs(e0) : mu / RMath.sqrt(x * x + y * y + z * z);
  h0x = curHx;
  h0y = curHy;
  h0z = curHz;
  h0 = RMath.sqrt(h0x * h0x + h0y * h0y + h0z * h0z);
  invH0 = <real>1.0 / h0;
  c0x = curEx;
  c0y = curEy;
  c0z = curEz;
  devE = 0;
  devH = 0;
  devEcc = 0;
  devA = 0;
  maxE = 0;
  maxH = 0;
  maxEcc = 0;
  maxA = 0;
  firstE = -1;
  firstH = -1;
  firstEcc = -1;
  firstA = -1;
  return h0 > 0;
}

/** Monitor step k (k >= 1) at the given state and potential energy V. */
export function monitorUpdate(k: i32, x: real, y: real, z: real, vx: real, vy: real, vz: real, V: real): void {
  evaluate(x, y, z, vx, vy, vz, V);
  const ih0 = invH0;
  devE = abs(curEnergy - e0) / eScale;
  const dx = curEx - c0x;
  const dy = curEy - c0y;
  const dz = curEz - c0z;
  devEcc = RMath.sqrt(dx * dx + dy * dy + dz * dz);
  if (mZonal) {
    devH = abs(curHz - h0z) * ih0;
    devA = devH;
  } else {
    const hx = curHx - h0x;
    const hy = curHy - h0y;
    const hz = curHz - h0z;
    devH = RMath.sqrt(hx * hx + hy * hy + hz * hz) * ih0;
    devA = abs(<real>2.0 * curAreal - h0) * ih0;
  }
  if (devE > maxE) maxE = devE;
  if (devH > maxH) maxH = devH;
  if (devEcc > maxEcc) maxEcc = devEcc;
  if (devA > maxA) maxA = devA;
  if (firstE < 0 && budE > 0 && devE > budE) firstE = k;
  if (firstH < 0 && budH > 0 && devH > budH) firstH = k;
  if (firstEcc < 0 && !mZonal && budEcc > 0 && devEcc > budEcc) firstEcc = k;
  if (firstA < 0 && budA > 0 && devA > budA) firstA = k;
}

/** True when every value of the last evaluation (invariants and deviations) is finite. */
export function monitorFinite(): bool {
  return isFinite(curEnergy) && isFinite(curHx) && isFinite(curHy) && isFinite(curHz) && isFinite(curEx) &&
    isFinite(curEy) && isFinite(curEz) && isFinite(curAreal) && isFinite(devE) && isFinite(devH) &&
    isFinite(devEcc) && isFinite(devA) && isFinite(eScale) && isFinite(h0);
}

/**
 * Write the monitor's report to the output region (slot numbers of integrators.ts): 6..9 maximum deviations
 * (energy, h, ecc, areal), 10..13 first step over each budget (-1: none), 16 energy, 17..19 h vector,
 * 20..22 eccentricity vector, 23 areal velocity, 24..27 deviations at the last step.
 */
export function monitorPut(): void {
  put(6, maxE);
  put(7, maxH);
  put(8, maxEcc);
  put(9, maxA);
  put(10, <real>firstE);
  put(11, <real>firstH);
  put(12, <real>firstEcc);
  put(13, <real>firstA);
  put(16, curEnergy);
  put(17, curHx);
  put(18, curHy);
  put(19, curHz);
  put(20, curEx);
  put(21, curEy);
  put(22, curEz);
  put(23, curAreal);
  put(24, devE);
  put(25, devH);
  put(26, devEcc);
  put(27, devA);
}

/** Start monitoring the symplectic defect (a run that carries Phi): budget, and 0 at step 0. */
export function monitorSympBegin(bS: real): void {
  budS = bS;
  devS = 0;
  maxS = 0;
  firstS = -1;
}

/** Record the symplectic defect d of step k (k >= 1). */
export function monitorSympUpdate(k: i32, d: real): void {
  devS = d;
  if (d > maxS) maxS = d;
  if (firstS < 0 && budS > 0 && d > budS) firstS = k;
}

/**
 * Write the running maxima (energy, h, ecc, areal) to the four slots from `devSlot`, their first steps over budget
 * to the four from `stepSlot`, and the symplectic defect's maximum, first step and last value to the given slots
 * (the integration_transition layout).
 */
export function monitorPutSummary(devSlot: i32, stepSlot: i32, sympDev: i32, sympStep: i32, sympNow: i32): void {
  put(devSlot, maxE);
  put(devSlot + 1, maxH);
  put(devSlot + 2, maxEcc);
  put(devSlot + 3, maxA);
  put(stepSlot, <real>firstE);
  put(stepSlot + 1, <real>firstH);
  put(stepSlot + 2, <real>firstEcc);
  put(stepSlot + 3, <real>firstA);
  put(sympDev, maxS);
  put(sympStep, <real>firstS);
  put(sympNow, devS);
}
