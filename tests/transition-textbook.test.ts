/**
 * `transition` against a published closed form: about a circular orbit the linearized relative motion in the
 * rotating radial / along-track / cross-track frame is the Clohessy-Wiltshire solution (W. H. Clohessy and
 * R. S. Wiltshire, "Terminal guidance system for satellite rendezvous", J. Aerospace Sci. 27 (1960) 653-658; also
 * Vallado 2013, ch. 6, and Curtis, "Orbital Mechanics for Engineering Students", ch. 7; the matrix below is
 * recalled from memory). The Clohessy-Wiltshire equations are the exact linearization of two-body motion about a
 * circular orbit, so the inertial Phi taken into that frame must equal their transition matrix:
 *   Phi_CW = T(t) Phi T(0)^-1,  T(t) = [[R(t), 0], [-R(t) W, R(t)]],
 * R(t) the rows (radial, along-track, cross-track) at time t, W x = omega x x, omega = n h / |h| (the relative
 * velocity in the rotating frame is R (dv - omega x dr)). Invented circular orbits; WGS 84 GM (NIMA TR8350.2).
 */
import { describe, it, expect } from "vitest";
import { release } from "./helpers.js";

const MU = 398600.4418;

type M = number[][];
const zeros = (n: number): M => Array.from({ length: n }, () => new Array<number>(n).fill(0));
const mul = (a: M, b: M): M => a.map((row) => b[0]!.map((_, j) => row.reduce((s, x, k) => s + x * b[k]![j]!, 0)));
const cross = (a: number[], b: number[]): number[] => [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
const unit = (a: number[]): number[] => {
  const n = Math.hypot(a[0]!, a[1]!, a[2]!);
  return a.map((x) => x / n);
};

/** Clohessy-Wiltshire transition matrix (x radial, y along-track, z cross-track), recalled from memory. */
function clohessyWiltshire(n: number, t: number): M {
  const c = Math.cos(n * t);
  const s = Math.sin(n * t);
  return [
    [4 - 3 * c, 0, 0, s / n, (2 / n) * (1 - c), 0],
    [6 * (s - n * t), 1, 0, (-2 / n) * (1 - c), (4 * s - 3 * n * t) / n, 0],
    [0, 0, c, 0, 0, s / n],
    [3 * n * s, 0, 0, c, 2 * s, 0],
    [-6 * n * (1 - c), 0, 0, -2 * s, 4 * c - 3, 0],
    [0, 0, -n * s, 0, 0, c],
  ];
}

/** T(t) for the frame of the circular orbit at angle n t from r0 (radial r0hat, along-track that0, normal hhat). */
function frameMap(n: number, t: number, rhat0: number[], that0: number[], hhat: number[], inverse: boolean): M {
  const c = Math.cos(n * t);
  const s = Math.sin(n * t);
  const rh = [0, 1, 2].map((i) => c * rhat0[i]! + s * that0[i]!);
  const th = [0, 1, 2].map((i) => -s * rhat0[i]! + c * that0[i]!);
  const R = [rh, th, hhat];
  // W x = omega x x, omega = n hhat.
  const W = [0, 1, 2].map((i) => [0, 1, 2].map((j) => cross(hhat.map((h) => n * h), [0, 1, 2].map((k) => (k === j ? 1 : 0)))[i]!));
  const T = zeros(6);
  if (!inverse) {
    const RW = mul(R, W);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      T[i]![j] = R[i]![j]!;
      T[i + 3]![j + 3] = R[i]![j]!;
      T[i + 3]![j] = -RW[i]![j]!;
    }
  } else {
    const Rt = [0, 1, 2].map((i) => [0, 1, 2].map((j) => R[j]![i]!));
    const WRt = mul(W, Rt);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      T[i]![j] = Rt[i]![j]!;
      T[i + 3]![j + 3] = Rt[i]![j]!;
      T[i + 3]![j] = WRt[i]![j]!;
    }
  }
  return T;
}

describe("transition about a circular orbit equals the Clohessy-Wiltshire matrix", () => {
  // Radius, orientation (invented), and arcs as fractions of the period, both directions, up to 25 revolutions.
  const orbits = [
    { R: 6878, i: 0.9, raan: 0.4, u: 1.3 },
    { R: 42164, i: 0.001, raan: 2.0, u: 4.0 },
  ];
  for (const o of orbits) {
    for (const frac of [0.01, 0.25, 0.5, 3.7, -2.3, 25]) {
      it(`R = ${o.R} km, ${frac} periods`, () => {
        const n = Math.sqrt(MU / o.R ** 3);
        const t = (frac * 2 * Math.PI) / n;
        const node = [Math.cos(o.raan), Math.sin(o.raan), 0];
        const hhat = [Math.sin(o.raan) * Math.sin(o.i), -Math.cos(o.raan) * Math.sin(o.i), Math.cos(o.i)];
        const inPlane = cross(hhat, node);
        const rhat0 = unit([0, 1, 2].map((k) => Math.cos(o.u) * node[k]! + Math.sin(o.u) * inPlane[k]!));
        const that0 = unit(cross(hhat, rhat0));
        const V = Math.sqrt(MU / o.R);
        const x = [MU, ...rhat0.map((c) => o.R * c), ...that0.map((c) => V * c), t];
        const k = release();
        expect(k.call("transition", x)).toBe(0);
        const phi = [0, 1, 2, 3, 4, 5].map((i) => Array.from(k.out.slice(6 + 6 * i, 12 + 6 * i)));
        const got = mul(mul(frameMap(n, t, rhat0, that0, hhat, false), phi), frameMap(n, 0, rhat0, that0, hhat, true));
        const want = clohessyWiltshire(n, t);
        // Scale-free comparison (lengths by R, velocities by n R), against the largest entry.
        const d = (i: number): number => (i < 3 ? o.R : n * o.R);
        let big = 0;
        let err = 0;
        for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) {
          const s = d(j) / d(i);
          big = Math.max(big, Math.abs(want[i]![j]! * s));
          err = Math.max(err, Math.abs((got[i]![j]! - want[i]![j]!) * s));
        }
        // The state is circular to the rounding of its doubles (e about 1e-16), and the frames are built in
        // doubles: agreement to a few 1e-15 of the largest entry per revolution.
        expect(err / big).toBeLessThan(1e-13 * (1 + Math.abs(frac)));
      });
    }
  }
});
