// Variational equations of the fixed-step integrators (integrators.ts): the 6x6 matrix Phi = d(r, v)_k / d(r, v)_0
// carried beside the state, exactly the derivative of the discrete map of steps 0..k (not of the true flow), and
// its symplectic defect, checked by the monitor on every step.
//
// Method
//  1. The gradient G(r) = d a / d r of the field (gravity.ts `gradient`: point mass, J2, J3, analytic; the
//     potential and its source are in gravity.ts). Phi has position rows P (3x6) and velocity rows W (3x6); the
//     variational equations dPhi/dt = [[0, I], [G(r(t)), 0]] Phi are P' = W, W' = G(r(t)) P: each column of Phi is
//     the state of a linear second-order system P'' = G P, integrated column by column.
//  2. rk4, butcher6: the same Runge-Kutta tableau applied to dPhi/dt = A(r) Phi, with G taken at the stage
//     positions of the state's own step (recorded by phiStage) and written in the same Nystrom form as the state
//     (integrators.ts). A Runge-Kutta method applied to a system and to its variational equations together gives
//     the derivative of the numerical map ("internal numerical differentiation": H. G. Bock, 1981; the
//     differentiation of Runge-Kutta methods, E. Hairer, S. P. Norsett, G. Wanner, "Solving Ordinary Differential
//     Equations I", 2nd ed. 1993, II.6, recalled from memory), so Phi is the Jacobian of the discrete map.
//  3. verlet, yoshida4: the exact tangent map of each kick-drift-kick sub-step h (w1 h, w0 h for yoshida4):
//     W += h/2 G(r) P;  P += h W;  W += h/2 G(r') P, r' the drifted position. Each factor is the derivative of a
//     shear map with a symmetric G (the Hessian of the potential), so it is symplectic, and so is their product
//     (E. Hairer, C. Lubich, G. Wanner, "Geometric Numerical Integration", 2nd ed. 2006, VI.3, recalled from
//     memory): the defect below stays at round-off level for these two methods.
//  4. Symplectic defect (the monitor's new member, monitor.ts): on the scale-free Phi~ = D^-1 Phi D,
//     D = diag(L, L, L, V, V, V), L = |r0|, V = sqrt(mu / L) (as tests/transition-properties.test.ts), the largest
//     |(Phi~^T J Phi~ - J)_ab|, J = [[0, I], [-I, 0]]. With rho = L / V and Omega = Phi^T J Phi (raw), Omega~_ab is
//     rho Omega_ab for two position columns, Omega_ab for mixed ones and Omega_ab / rho for two velocity columns;
//     Omega is antisymmetric, so the 15 entries a < b are computed. Round-off floor: a few eps max|Phi~|^2.
// Domain: that of the run (integrators.ts checks it); Phi starts at the identity at step 0.
// Special cases (returned by integrators.ts): the time scale rho = L / V or the gradient at r0 not finite (rho
//  not positive) -> ERR_OVERFLOW at the start (phiBegin false); a non-finite Phi or defect during the run ->
//  ERR_OVERFLOW at that step.
// State: file-private module-level scalars (wasm globals, no linear memory): Phi (p11 .. p66, row i, column j), the
//  gradients at the stages of the current step (s1xx .. s7zz; verlet keeps G at the current position in s1 and
//  the drifted one in s2), the model and the scales. Nothing outside reads them but through phiPut.
// Iteration cap: none (fixed column and stage counts).
// Accuracy measured (release f64, tests/integrate-variational.test.ts, 2026-12): against the Jacobian of the discrete
//  map at 100 digits, every scale-free entry within 9.4e-16 of the largest (worst: yoshida4, two-body, 12 steps of
//  60 s on an e = 0.3 orbit); symplectic defect over 10 low-orbit revolutions (926 steps of 60 s, max |Phi~| about
//  180): verlet 3.4e-11, yoshida4 4.3e-11 (round-off), rk4 1.1e-4, butcher6 2.7e-7 (drift; J2 + J3 alike).

import { put } from "./io";
import { THIRD, TWO_THIRDS, SIXTH } from "./real";
import { gradient, gradXX, gradXY, gradXZ, gradYY, gradYZ, gradZZ } from "./gravity";

// The model (set by phiBegin).
let vMu: real = 1;
let vJ2: real = 0;
let vJ3: real = 0;
let vR: real = 1;
let rho: real = 1; // L / V, the time scale of D

// Phi, row-major names: p<row><column>.
let p11: real = 1, p12: real = 0, p13: real = 0, p14: real = 0, p15: real = 0, p16: real = 0;
let p21: real = 0, p22: real = 1, p23: real = 0, p24: real = 0, p25: real = 0, p26: real = 0;
let p31: real = 0, p32: real = 0, p33: real = 1, p34: real = 0, p35: real = 0, p36: real = 0;
let p41: real = 0, p42: real = 0, p43: real = 0, p44: real = 1, p45: real = 0, p46: real = 0;
let p51: real = 0, p52: real = 0, p53: real = 0, p54: real = 0, p55: real = 1, p56: real = 0;
let p61: real = 0, p62: real = 0, p63: real = 0, p64: real = 0, p65: real = 0, p66: real = 1;

// Gradients at the stages of one step (symmetric: xx, xy, xz, yy, yz, zz).
let s1xx: real = 0, s1xy: real = 0, s1xz: real = 0, s1yy: real = 0, s1yz: real = 0, s1zz: real = 0;
let s2xx: real = 0, s2xy: real = 0, s2xz: real = 0, s2yy: real = 0, s2yz: real = 0, s2zz: real = 0;
let s3xx: real = 0, s3xy: real = 0, s3xz: real = 0, s3yy: real = 0, s3yz: real = 0, s3zz: real = 0;
let s4xx: real = 0, s4xy: real = 0, s4xz: real = 0, s4yy: real = 0, s4yz: real = 0, s4zz: real = 0;
let s5xx: real = 0, s5xy: real = 0, s5xz: real = 0, s5yy: real = 0, s5yz: real = 0, s5zz: real = 0;
let s6xx: real = 0, s6xy: real = 0, s6xz: real = 0, s6yy: real = 0, s6yz: real = 0, s6zz: real = 0;
let s7xx: real = 0, s7xy: real = 0, s7xz: real = 0, s7yy: real = 0, s7yz: real = 0, s7zz: real = 0;

// Results of gmul (a product G P) and of a column step (the new column: P then W).
let mX: real = 0, mY: real = 0, mZ: real = 0;
let oPx: real = 0, oPy: real = 0, oPz: real = 0, oWx: real = 0, oWy: real = 0, oWz: real = 0;

// Column step kinds for stepColumns.
const KIND_RK4: i32 = 0;
const KIND_BUTCHER6: i32 = 1;
const KIND_VERLET: i32 = 2;

/** G P for a symmetric G, to mX, mY, mZ. */
function gmul(xx: real, xy: real, xz: real, yy: real, yz: real, zz: real, px: real, py: real, pz: real): void {
  mX = xx * px + xy * py + xz * pz;
  mY = xy * px + yy * py + yz * pz;
  mZ = xz * px + yz * py + zz * pz;
}

/**
 * Start Phi at the identity for a run with this model and initial position (x, y, z), scales L = |r0| and
 * V = sqrt(mu / L); the gradient at r0 goes to stage 1 (verlet's first kick). False when it is not finite.
 */
export function phiBegin(mu: real, j2: real, j3: real, R: real, x: real, y: real, z: real): bool {
  vMu = mu;
  vJ2 = j2;
  vJ3 = j3;
  vR = R;
  const L = RMath.sqrt(x * x + y * y + z * z);
  rho = L / RMath.sqrt(mu / L);
  p11 = 1; p12 = 0; p13 = 0; p14 = 0; p15 = 0; p16 = 0;
  p21 = 0; p22 = 1; p23 = 0; p24 = 0; p25 = 0; p26 = 0;
  p31 = 0; p32 = 0; p33 = 1; p34 = 0; p35 = 0; p36 = 0;
  p41 = 0; p42 = 0; p43 = 0; p44 = 1; p45 = 0; p46 = 0;
  p51 = 0; p52 = 0; p53 = 0; p54 = 0; p55 = 1; p56 = 0;
  p61 = 0; p62 = 0; p63 = 0; p64 = 0; p65 = 0; p66 = 1;
  phiStage(1, x, y, z);
  return isFinite(rho) && rho > 0 && isFinite(s1xx) && isFinite(s1xy) && isFinite(s1xz) && isFinite(s1yy) &&
    isFinite(s1yz) && isFinite(s1zz);
}

/** Record the gradient at the position of stage s (1..7) of the current step. */
export function phiStage(s: i32, x: real, y: real, z: real): void {
  gradient(vMu, vJ2, vJ3, vR, x, y, z);
  const xx = gradXX(), xy = gradXY(), xz = gradXZ(), yy = gradYY(), yz = gradYZ(), zz = gradZZ();
  if (s == 1) { s1xx = xx; s1xy = xy; s1xz = xz; s1yy = yy; s1yz = yz; s1zz = zz; }
  else if (s == 2) { s2xx = xx; s2xy = xy; s2xz = xz; s2yy = yy; s2yz = yz; s2zz = zz; }
  else if (s == 3) { s3xx = xx; s3xy = xy; s3xz = xz; s3yy = yy; s3yz = yz; s3zz = zz; }
  else if (s == 4) { s4xx = xx; s4xy = xy; s4xz = xz; s4yy = yy; s4yz = yz; s4zz = zz; }
  else if (s == 5) { s5xx = xx; s5xy = xy; s5xz = xz; s5yy = yy; s5yz = yz; s5zz = zz; }
  else if (s == 6) { s6xx = xx; s6xy = xy; s6xz = xz; s6yy = yy; s6yz = yz; s6zz = zz; }
  else { s7xx = xx; s7xy = xy; s7xz = xz; s7yy = yy; s7yz = yz; s7zz = zz; }
}

// One RK4 step of a column (P, W) in the Nystrom form of integrators.ts rk4Step, stage gradients s1..s4.
function rk4Column(h: real, px: real, py: real, pz: real, wx: real, wy: real, wz: real): void {
  const h2 = h * h;
  const c2 = <real>0.5 * h;
  gmul(s1xx, s1xy, s1xz, s1yy, s1yz, s1zz, px, py, pz);
  const q1x = mX, q1y = mY, q1z = mZ;
  gmul(s2xx, s2xy, s2xz, s2yy, s2yz, s2zz, px + c2 * wx, py + c2 * wy, pz + c2 * wz);
  const q2x = mX, q2y = mY, q2z = mZ;
  const q3 = <real>0.25 * h2;
  gmul(s3xx, s3xy, s3xz, s3yy, s3yz, s3zz, px + c2 * wx + q3 * q1x, py + c2 * wy + q3 * q1y, pz + c2 * wz + q3 * q1z);
  const q3x = mX, q3y = mY, q3z = mZ;
  const q4 = <real>0.5 * h2;
  gmul(s4xx, s4xy, s4xz, s4yy, s4yz, s4zz, px + h * wx + q4 * q2x, py + h * wy + q4 * q2y, pz + h * wz + q4 * q2z);
  const q4x = mX, q4y = mY, q4z = mZ;
  const p = h2 * SIXTH;
  const w = h * SIXTH;
  oPx = px + (h * wx + p * (q1x + q2x + q3x));
  oPy = py + (h * wy + p * (q1y + q2y + q3y));
  oPz = pz + (h * wz + p * (q1z + q2z + q3z));
  oWx = wx + w * (q1x + <real>2.0 * (q2x + q3x) + q4x);
  oWy = wy + w * (q1y + <real>2.0 * (q2y + q3y) + q4y);
  oWz = wz + w * (q1z + <real>2.0 * (q2z + q3z) + q4z);
}

// One step of Butcher's order-6 method on a column, the coefficients of integrators.ts butcher6Step (A^2, b A, b
// of the tableau there), stage gradients s1..s7.
function butcher6Column(h: real, px: real, py: real, pz: real, wx: real, wy: real, wz: real): void {
  const h2 = h * h;
  gmul(s1xx, s1xy, s1xz, s1yy, s1yz, s1zz, px, py, pz);
  const q1x = mX, q1y = mY, q1z = mZ;
  const t2 = h * THIRD;
  gmul(s2xx, s2xy, s2xz, s2yy, s2yz, s2zz, px + t2 * wx, py + t2 * wy, pz + t2 * wz);
  const q2x = mX, q2y = mY, q2z = mZ;
  const t3 = h * TWO_THIRDS;
  const a31 = h2 * (<real>2.0 / <real>9.0);
  gmul(s3xx, s3xy, s3xz, s3yy, s3yz, s3zz, px + t3 * wx + a31 * q1x, py + t3 * wy + a31 * q1y, pz + t3 * wz + a31 * q1z);
  const q3x = mX, q3y = mY, q3z = mZ;
  const a41 = h2 * (<real>1.0 / <real>9.0);
  const a42 = h2 * (<real>-1.0 / <real>18.0);
  gmul(s4xx, s4xy, s4xz, s4yy, s4yz, s4zz, px + t2 * wx + (a41 * q1x + a42 * q2x), py + t2 * wy + (a41 * q1y + a42 * q2y),
    pz + t2 * wz + (a41 * q1z + a42 * q2z));
  const q4x = mX, q4y = mY, q4z = mZ;
  const t5 = <real>0.5 * h;
  const a51 = h2 * (<real>11.0 / <real>32.0);
  const a52 = h2 * <real>-0.25;
  const a53 = h2 * <real>0.03125; // 1/32
  gmul(s5xx, s5xy, s5xz, s5yy, s5yz, s5zz, px + t5 * wx + (a51 * q1x + a52 * q2x + a53 * q3x),
    py + t5 * wy + (a51 * q1y + a52 * q2y + a53 * q3y), pz + t5 * wz + (a51 * q1z + a52 * q2z + a53 * q3z));
  const q5x = mX, q5y = mY, q5z = mZ;
  const a61 = h2 * <real>0.28125; // 9/32
  const a62 = h2 * <real>0.0625; // 1/16
  const a63 = h2 * <real>-0.03125; // -1/32
  const a64 = h2 * <real>-0.1875; // -3/16
  gmul(s6xx, s6xy, s6xz, s6yy, s6yz, s6zz, px + t5 * wx + (a61 * q1x + a62 * q2x + a63 * q3x + a64 * q4x),
    py + t5 * wy + (a61 * q1y + a62 * q2y + a63 * q3y + a64 * q4y), pz + t5 * wz + (a61 * q1z + a62 * q2z + a63 * q3z + a64 * q4z));
  const q6x = mX, q6y = mY, q6z = mZ;
  const a71 = h2 * (<real>-3.0 / <real>22.0); // also (7,2)
  const a73 = h2 * (<real>9.0 / <real>22.0);
  const a74 = h2 * (<real>12.0 / <real>11.0);
  const a75 = h2 * (<real>-8.0 / <real>11.0);
  gmul(s7xx, s7xy, s7xz, s7yy, s7yz, s7zz, px + h * wx + (a71 * (q1x + q2x) + a73 * q3x + a74 * q4x + a75 * q5x),
    py + h * wy + (a71 * (q1y + q2y) + a73 * q3y + a74 * q4y + a75 * q5y), pz + h * wz + (a71 * (q1z + q2z) + a73 * q3z + a74 * q4z + a75 * q5z));
  const q7x = mX, q7y = mY, q7z = mZ;
  const b1 = h2 * (<real>11.0 / <real>120.0);
  const b3 = h2 * (<real>9.0 / <real>40.0);
  const b4 = h2 * <real>0.45; // 9/20
  const b5 = h2 * (<real>-2.0 / <real>15.0);
  oPx = px + (h * wx + (b1 * q1x + b3 * q3x + b4 * q4x + b5 * (q5x + q6x)));
  oPy = py + (h * wy + (b1 * q1y + b3 * q3y + b4 * q4y + b5 * (q5y + q6y)));
  oPz = pz + (h * wz + (b1 * q1z + b3 * q3z + b4 * q4z + b5 * (q5z + q6z)));
  const w1 = h * (<real>11.0 / <real>120.0);
  const w3 = h * <real>0.675; // 27/40
  const w5 = h * (<real>-4.0 / <real>15.0);
  oWx = wx + (w1 * (q1x + q7x) + w3 * (q3x + q4x) + w5 * (q5x + q6x));
  oWy = wy + (w1 * (q1y + q7y) + w3 * (q3y + q4y) + w5 * (q5y + q6y));
  oWz = wz + (w1 * (q1z + q7z) + w3 * (q3z + q4z) + w5 * (q5z + q6z));
}

// The tangent of one kick-drift-kick sub-step of size h on a column: G(r) in s1, G(r') in s2 (Method, step 3).
function verletColumn(h: real, px: real, py: real, pz: real, wx: real, wy: real, wz: real): void {
  const hh = <real>0.5 * h;
  gmul(s1xx, s1xy, s1xz, s1yy, s1yz, s1zz, px, py, pz);
  const ux = wx + hh * mX, uy = wy + hh * mY, uz = wz + hh * mZ;
  oPx = px + h * ux;
  oPy = py + h * uy;
  oPz = pz + h * uz;
  gmul(s2xx, s2xy, s2xz, s2yy, s2yz, s2zz, oPx, oPy, oPz);
  oWx = ux + hh * mX;
  oWy = uy + hh * mY;
  oWz = uz + hh * mZ;
}

function column(kind: i32, h: real, px: real, py: real, pz: real, wx: real, wy: real, wz: real): void {
  if (kind == KIND_RK4) rk4Column(h, px, py, pz, wx, wy, wz);
  else if (kind == KIND_BUTCHER6) butcher6Column(h, px, py, pz, wx, wy, wz);
  else verletColumn(h, px, py, pz, wx, wy, wz);
}

// Apply one step of `kind` to the six columns of Phi.
function stepColumns(kind: i32, h: real): void {
  column(kind, h, p11, p21, p31, p41, p51, p61);
  p11 = oPx; p21 = oPy; p31 = oPz; p41 = oWx; p51 = oWy; p61 = oWz;
  column(kind, h, p12, p22, p32, p42, p52, p62);
  p12 = oPx; p22 = oPy; p32 = oPz; p42 = oWx; p52 = oWy; p62 = oWz;
  column(kind, h, p13, p23, p33, p43, p53, p63);
  p13 = oPx; p23 = oPy; p33 = oPz; p43 = oWx; p53 = oWy; p63 = oWz;
  column(kind, h, p14, p24, p34, p44, p54, p64);
  p14 = oPx; p24 = oPy; p34 = oPz; p44 = oWx; p54 = oWy; p64 = oWz;
  column(kind, h, p15, p25, p35, p45, p55, p65);
  p15 = oPx; p25 = oPy; p35 = oPz; p45 = oWx; p55 = oWy; p65 = oWz;
  column(kind, h, p16, p26, p36, p46, p56, p66);
  p16 = oPx; p26 = oPy; p36 = oPz; p46 = oWx; p56 = oWy; p66 = oWz;
}

/** Advance Phi by the RK4 step of size h whose stage gradients phiStage recorded (stages 1..4). */
export function phiRk4(h: real): void {
  stepColumns(KIND_RK4, h);
}

/** Advance Phi by the butcher6 step of size h whose stage gradients phiStage recorded (stages 1..7). */
export function phiButcher6(h: real): void {
  stepColumns(KIND_BUTCHER6, h);
}

/**
 * Advance Phi by the tangent of one kick-drift-kick sub-step of size h that ended at (x, y, z); G at its start is
 * in stage 1 (phiBegin or the previous sub-step) and G at (x, y, z) becomes stage 1 for the next.
 */
export function phiVerlet(h: real, x: real, y: real, z: real): void {
  phiStage(2, x, y, z);
  stepColumns(KIND_VERLET, h);
  s1xx = s2xx; s1xy = s2xy; s1xz = s2xz; s1yy = s2yy; s1yz = s2yz; s1zz = s2zz;
}

// Omega_ab = sum_k P_ka W_kb - W_ka P_kb for columns a (P = a0..a2, W = a3..a5) and b.
function om(a0: real, a1: real, a2: real, a3: real, a4: real, a5: real,
  b0: real, b1: real, b2: real, b3: real, b4: real, b5: real): real {
  return (a0 * b3 - a3 * b0) + (a1 * b4 - a4 * b1) + (a2 * b5 - a5 * b2);
}

/** The symplectic defect of the current Phi (Method, step 4). */
export function phiDefect(): real {
  // two position columns (Omega~ = rho Omega, J = 0)
  let pp = abs(om(p11, p21, p31, p41, p51, p61, p12, p22, p32, p42, p52, p62));
  pp = max(pp, abs(om(p11, p21, p31, p41, p51, p61, p13, p23, p33, p43, p53, p63)));
  pp = max(pp, abs(om(p12, p22, p32, p42, p52, p62, p13, p23, p33, p43, p53, p63)));
  // two velocity columns (Omega~ = Omega / rho, J = 0)
  let vv = abs(om(p14, p24, p34, p44, p54, p64, p15, p25, p35, p45, p55, p65));
  vv = max(vv, abs(om(p14, p24, p34, p44, p54, p64, p16, p26, p36, p46, p56, p66)));
  vv = max(vv, abs(om(p15, p25, p35, p45, p55, p65, p16, p26, p36, p46, p56, p66)));
  // mixed (Omega~ = Omega, J = I on the pairs (1, 4), (2, 5), (3, 6))
  let pv = abs(om(p11, p21, p31, p41, p51, p61, p14, p24, p34, p44, p54, p64) - <real>1.0);
  pv = max(pv, abs(om(p11, p21, p31, p41, p51, p61, p15, p25, p35, p45, p55, p65)));
  pv = max(pv, abs(om(p11, p21, p31, p41, p51, p61, p16, p26, p36, p46, p56, p66)));
  pv = max(pv, abs(om(p12, p22, p32, p42, p52, p62, p14, p24, p34, p44, p54, p64)));
  pv = max(pv, abs(om(p12, p22, p32, p42, p52, p62, p15, p25, p35, p45, p55, p65) - <real>1.0));
  pv = max(pv, abs(om(p12, p22, p32, p42, p52, p62, p16, p26, p36, p46, p56, p66)));
  pv = max(pv, abs(om(p13, p23, p33, p43, p53, p63, p14, p24, p34, p44, p54, p64)));
  pv = max(pv, abs(om(p13, p23, p33, p43, p53, p63, p15, p25, p35, p45, p55, p65)));
  pv = max(pv, abs(om(p13, p23, p33, p43, p53, p63, p16, p26, p36, p46, p56, p66) - <real>1.0));
  return max(max(rho * pp, vv / rho), pv);
}

/** Write Phi to 36 consecutive slots from `base`, row-major. */
export function phiPut(base: i32): void {
  put(base, p11); put(base + 1, p12); put(base + 2, p13); put(base + 3, p14); put(base + 4, p15); put(base + 5, p16);
  put(base + 6, p21); put(base + 7, p22); put(base + 8, p23); put(base + 9, p24); put(base + 10, p25); put(base + 11, p26);
  put(base + 12, p31); put(base + 13, p32); put(base + 14, p33); put(base + 15, p34); put(base + 16, p35); put(base + 17, p36);
  put(base + 18, p41); put(base + 19, p42); put(base + 20, p43); put(base + 21, p44); put(base + 22, p45); put(base + 23, p46);
  put(base + 24, p51); put(base + 25, p52); put(base + 26, p53); put(base + 27, p54); put(base + 28, p55); put(base + 29, p56);
  put(base + 30, p61); put(base + 31, p62); put(base + 32, p63); put(base + 33, p64); put(base + 34, p65); put(base + 35, p66);
}
