// Anomaly conversions for any conic (e >= 0), and the time of flight between two true anomalies.
// The conic is chosen by e: e < 1 ellipse (eccentric anomaly E), e = 1 parabola (D = tan(nu/2)),
// e > 1 hyperbola (hyperbolic anomaly H). "Anomaly" below means E, D or H accordingly.
//
// Formulas (half-angle forms, no cancellation anywhere on the conic):
//   ellipse    tan(E/2) = sqrt((1-e)/(1+e)) tan(nu/2), written E = 2 atan2(sqrt(1-e) sin(nu/2), sqrt(1+e) cos(nu/2))
//   hyperbola  tanh(H/2) = sqrt((e-1)/(e+1)) tan(nu/2)
//   parabola   D = tan(nu/2)
//   mean       M = E - e sin E, M = e sinh H - H, M = D + D^3/3 (series forms near periapsis, series.ts)
// For the ellipse the anomaly keeps the revolution of its input: nu = 2 pi k + nu_r with |nu_r| <= pi
// (exact reduction, reduce.ts) gives E = nu + (E_r - nu_r). The hyperbola and parabola have no revolutions:
// |nu| must be below the asymptote angle acos(-1/e) (pi for the parabola), else ERR_UNREACHABLE.
//
// Time of flight, from the areal velocity (Kepler's second law): the radius sweeps area at the constant
// rate h/2, h = sqrt(mu p), so t2 - t1 = A / (h/2) with A = (p^2 / 2) I and
// I = integral of dnu / (1 + e cos nu)^2 from nu1 to nu2, which is
//   (M2 - M1) / (1 - e^2)^(3/2) (ellipse), (M2 - M1) / (e^2 - 1)^(3/2) (hyperbola), (M2 - M1) / 2 (parabola).
//
// Sources: the half-angle relations and Kepler's second law are textbook material (e.g. R. R. Bate, D. D.
// Mueller, J. E. White, "Fundamentals of Astrodynamics", Dover 1971, ch. 4; recalled from memory); the exact
// reduction is reduce.ts's, the series are series.ts's.
//
// Special cases, in order: NaN or infinite input -> ERR_NONFINITE; e < 0 (time_of_flight: also mu <= 0 or
// p <= 0) -> ERR_DOMAIN; on a hyperbola or parabola |nu| at or beyond the asymptote -> ERR_UNREACHABLE.
// time_of_flight returns ERR_DOMAIN on the ellipse when |nu1| or |nu2| >= 2^53 (the turn count is not
// determined there) and ERR_OVERFLOW when the time, the area or h/2 is beyond the floating-point range;
// true_to_mean returns ERR_OVERFLOW when e sinh H overflows.
// Iteration cap: none here (closed forms); mean_to_true inherits the Kepler solvers' caps (ELLIPTIC_MAX_ITER 6,
// HYPERBOLIC_MAX_ITER 8, Barker's one polish) and their statuses.
// Output slot 0 holds the result; mean_to_true also writes slot 1 = iterations; time_of_flight writes slot 1 =
// swept area, slot 2 = h/2.
// Accuracy (release f64 build, vectors/*.csv, 1,000-1,500 cases each over every conic, 70-digit references;
// `areal check -v`, 2026-12): true_to_anomaly 9 ulp, within twice the problem's conditioning (worst seen:
// e = 9.03680388991795, nu = -1.6487896477726522, got -4.1032408612312405, want ...2326); anomaly_to_true 2 ulp;
// true_to_mean 111 ulp next to a hyperbola's asymptote, within twice the conditioning (e = 24.508161904222696,
// nu = -1.4741854072017657, got -174.88953838346464, want ...427); time_of_flight 1.37e-14 relative
// (e = 1.0000000080959615). Limits in vectors/limits.json.

import { OK, ERR_NONFINITE, ERR_DOMAIN, ERR_UNREACHABLE, ERR_OVERFLOW, FIRST_ERROR } from "./status";
import { put, got } from "./io";
import { INTEGER_LIMIT, PI, TWO_PI } from "./real";
import { reduceTurns, reducedLo, reducedTurns } from "./reduce";
import { ODD_SERIES_MAX, xMinusSinSeries, sinhMinusXSeries } from "./series";
import { kepler_elliptic } from "./kepler_elliptic";
import { kepler_hyperbolic } from "./kepler_hyperbolic";
import { kepler_parabolic } from "./kepler_parabolic";

// File-private scratch: the results of the helpers below, read only by this file's kernels (which chain the
// helpers): `res` is the value; for the ellipse `resReduced` is the same quantity within one revolution and
// `resTurns` the whole turns removed, so that a difference of two anomalies on different revolutions keeps its
// small part; redHi + redLo is the remainder of the last `split`.
let res: real = 0;
let resReduced: real = 0;
let resTurns: real = 0;
let redHi: real = 0;
let redLo: real = 0;

function checkConic(e: real, x: real): i32 {
  if (!isFinite(e) || !isFinite(x)) return ERR_NONFINITE;
  if (!(e >= 0)) return ERR_DOMAIN;
  return OK;
}

// Ellipse, one revolution: E_r from nu_r (|nu_r| <= pi).
function eccFromTrue(e: real, nu: real): real {
  const h = <real>0.5 * nu;
  return <real>2.0 * RMath.atan2(RMath.sqrt(<real>1.0 - e) * RMath.sin(h), RMath.sqrt(<real>1.0 + e) * RMath.cos(h));
}

function trueFromEcc(e: real, E: real): real {
  const h = <real>0.5 * E;
  return <real>2.0 * RMath.atan2(RMath.sqrt(<real>1.0 + e) * RMath.sin(h), RMath.sqrt(<real>1.0 - e) * RMath.cos(h));
}

// Mean anomaly from an eccentric anomaly within one revolution (|E| <= pi), without cancellation.
function meanFromEccReduced(e: real, E: real): real {
  if (abs(E) <= ODD_SERIES_MAX) return (<real>1.0 - e) * E + e * xMinusSinSeries(E);
  return E - e * RMath.sin(E);
}

// Split x into whole turns and a remainder (redHi + redLo, |redHi| <= pi); sets resTurns.
function split(x: real): void {
  if (abs(x) >= INTEGER_LIMIT) {
    // No fractional part is representable: treat x as whole turns of nothing (callers keep x itself).
    redHi = 0;
    redLo = 0;
    resTurns = 0;
    return;
  }
  redHi = reduceTurns(x);
  redLo = reducedLo();
  resTurns = reducedTurns();
}

// y_r (the image of the remainder) carried back to x's revolution: x + (y_r - x_r).
function carry(x: real, yr: real): real {
  if (abs(x) >= INTEGER_LIMIT) return x; // the map moves x by less than half an ulp
  if (resTurns == 0) return yr;
  return x + ((yr - redHi) - redLo);
}

// Shared by the conversions: sets `res` (and for the ellipse `resReduced`, `resTurns`), returns a status.
function trueToAnomaly(e: real, nu: real): i32 {
  if (e < 1) {
    split(nu);
    resReduced = eccFromTrue(e, redHi);
    res = carry(nu, resReduced);
    return OK;
  }
  resTurns = 0;
  if (!(abs(nu) < RMath.acos(<real>-1.0 / e)) || abs(nu) >= PI) return ERR_UNREACHABLE;
  const t = RMath.tan(<real>0.5 * nu);
  if (e == 1) {
    res = t;
    return OK;
  }
  const u = RMath.sqrt((e - <real>1.0) / (e + <real>1.0)) * t;
  if (!(abs(u) < 1)) return ERR_UNREACHABLE;
  res = RMath.log1p(<real>2.0 * u / (<real>1.0 - u)); // 2 atanh(u)
  resReduced = res;
  return OK;
}

function anomalyToTrue(e: real, x: real): i32 {
  if (e < 1) {
    split(x);
    res = carry(x, trueFromEcc(e, redHi));
    return OK;
  }
  if (e == 1) {
    res = <real>2.0 * RMath.atan(x);
    return OK;
  }
  res = <real>2.0 * RMath.atan(RMath.sqrt((e + <real>1.0) / (e - <real>1.0)) * RMath.tanh(<real>0.5 * x));
  return OK;
}

// Mean anomaly from the state left by trueToAnomaly (same conic). For the ellipse `resReduced` becomes the
// reduced mean anomaly and `res` the full one (same revolution as the true anomaly `nu`).
function meanAfterTrue(e: real, nu: real): i32 {
  if (e < 1) {
    resReduced = meanFromEccReduced(e, resReduced);
    res = carry(nu, resReduced);
    return OK;
  }
  const x = res;
  if (e == 1) {
    res = x + x * x * x / <real>3.0;
  } else if (abs(x) <= ODD_SERIES_MAX) {
    res = (e - <real>1.0) * x + e * sinhMinusXSeries(x);
  } else {
    res = e * RMath.sinh(x) - x;
  }
  resReduced = res;
  return isFinite(res) ? OK : ERR_OVERFLOW;
}

/** True anomaly -> eccentric (e < 1), parabolic (e = 1) or hyperbolic (e > 1) anomaly. Slot 0. */
export function true_to_anomaly(e: real, nu: real): i32 {
  let s = checkConic(e, nu);
  if (s != OK) return s;
  s = trueToAnomaly(e, nu);
  if (s == OK) put(0, res);
  return s;
}

/** Eccentric, parabolic or hyperbolic anomaly -> true anomaly. Slot 0. */
export function anomaly_to_true(e: real, x: real): i32 {
  const s = checkConic(e, x);
  if (s != OK) return s;
  anomalyToTrue(e, x);
  put(0, res);
  return OK;
}

/** True anomaly -> mean anomaly (M, M_h or the Barker M of kepler_parabolic.ts). Slot 0. */
export function true_to_mean(e: real, nu: real): i32 {
  let s = checkConic(e, nu);
  if (s != OK) return s;
  s = trueToAnomaly(e, nu);
  if (s != OK) return s;
  s = meanAfterTrue(e, nu);
  if (s == OK) put(0, res);
  return s;
}

/** Mean anomaly -> true anomaly through the Kepler solvers. Slot 0 = nu, slot 1 = iterations. */
export function mean_to_true(e: real, M: real): i32 {
  const s0 = checkConic(e, M);
  if (s0 != OK) return s0;
  const s = e < 1 ? kepler_elliptic(e, M) : e == 1 ? kepler_parabolic(M) : kepler_hyperbolic(e, M);
  if (s >= FIRST_ERROR) return s;
  anomalyToTrue(e, got(0));
  put(0, res);
  return OK;
}

/**
 * Time of flight from nu1 to nu2 on the conic (mu, p, e), from the areal velocity h/2. Negative when
 * nu2 < nu1. Slot 0 = time, slot 1 = area swept, slot 2 = areal velocity h/2.
 */
export function time_of_flight(mu: real, p: real, e: real, nu1: real, nu2: real): i32 {
  if (!isFinite(mu) || !isFinite(p) || !isFinite(e) || !isFinite(nu1) || !isFinite(nu2)) return ERR_NONFINITE;
  if (!(mu > 0) || !(p > 0) || !(e >= 0)) return ERR_DOMAIN;
  // On the ellipse the whole turns between nu1 and nu2 count; beyond 2^53 rad a true anomaly no longer
  // determines its turn count to one turn, so the time is not defined there.
  if (e < 1 && (abs(nu1) >= INTEGER_LIMIT || abs(nu2) >= INTEGER_LIMIT)) return ERR_DOMAIN;
  let s = trueToAnomaly(e, nu1);
  if (s == OK) s = meanAfterTrue(e, nu1);
  if (s != OK) return s;
  const m1 = resReduced;
  const k1 = resTurns;
  s = trueToAnomaly(e, nu2);
  if (s == OK) s = meanAfterTrue(e, nu2);
  if (s != OK) return s;
  // Reduced parts first, whole turns after: a near-parabolic ellipse has mean anomalies within 1e-16 of a
  // multiple of 2 pi, which a difference of full values would lose.
  let dm = resReduced - m1;
  if (resTurns != k1) dm += (resTurns - k1) * TWO_PI;
  let integral: real;
  if (e == 1) {
    integral = <real>0.5 * dm;
  } else {
    const k = e < 1 ? (<real>1.0 - e) * (<real>1.0 + e) : (e - <real>1.0) * (e + <real>1.0);
    integral = dm / (k * RMath.sqrt(k));
  }
  const area = <real>0.5 * p * p * integral;
  const arealRate = <real>0.5 * RMath.sqrt(mu * p);
  const t = area / arealRate;
  if (!isFinite(t) || !isFinite(area) || !isFinite(arealRate)) return ERR_OVERFLOW;
  put(0, t);
  put(1, area);
  put(2, arealRate);
  return OK;
}
