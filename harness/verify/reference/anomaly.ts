/**
 * High-precision references for the anomaly conversions and the time of flight: the textbook closed forms
 * evaluated in decimal arithmetic (decimal.js, 60 digits) from the exact input doubles. The time of flight is
 * checked a second way, by quadrature of dt = r^2 / h dnu, in tests/anomaly-time-of-flight.test.ts.
 */
import { Dec, decimalAt, exact, toDouble, piOf, conditionUlps } from "./decimal.js";

const D = decimalAt(70);
const ONE = new D(1);

function reduce(x: Dec): { k: Dec; r: Dec } {
  const twoPi = piOf(D).times(2);
  const k = x.div(twoPi).toDecimalPlaces(0, Dec.ROUND_HALF_EVEN);
  return { k, r: x.minus(k.times(twoPi)) };
}

function trueToAnomalyDec(e: Dec, nu: Dec): Dec | undefined {
  if (e.lt(1)) {
    const { k, r } = reduce(nu);
    const h = r.div(2);
    const Er = D.atan2(ONE.minus(e).sqrt().times(D.sin(h)), ONE.plus(e).sqrt().times(D.cos(h))).times(2);
    return Er.plus(k.times(piOf(D).times(2)));
  }
  const t = D.tan(nu.div(2));
  if (e.eq(1)) return nu.abs().lt(piOf(D)) ? t : undefined;
  const u = e.minus(1).div(e.plus(1)).sqrt().times(t);
  if (nu.abs().gte(piOf(D)) || u.abs().gte(1)) return undefined;
  return D.atanh(u).times(2);
}

function anomalyToTrueDec(e: Dec, x: Dec): Dec {
  if (e.lt(1)) {
    const { k, r } = reduce(x);
    const h = r.div(2);
    const nr = D.atan2(ONE.plus(e).sqrt().times(D.sin(h)), ONE.minus(e).sqrt().times(D.cos(h))).times(2);
    return nr.plus(k.times(piOf(D).times(2)));
  }
  if (e.eq(1)) return D.atan(x).times(2);
  return D.atan(e.plus(1).div(e.minus(1)).sqrt().times(D.tanh(x.div(2)))).times(2);
}

function anomalyToMeanDec(e: Dec, x: Dec): Dec {
  if (e.lt(1)) return x.minus(e.times(D.sin(x)));
  if (e.eq(1)) return x.plus(x.pow(3).div(3));
  return e.times(D.sinh(x)).minus(x);
}

/** A perturbed eccentricity must stay on the same kind of conic (e = 1 is a conic of its own). */
function sameConic(e: number): (i: number, x: number) => boolean {
  return (i, x) => i !== 0 || (e === 1 ? false : e < 1 ? x < 1 && x >= 0 : x > 1);
}

function withCondition(f: (xs: Dec[]) => Dec | undefined, e: number, x: number): [number, number] {
  const v = f([exact(D, e), exact(D, x)]);
  if (v === undefined) return [NaN, NaN];
  return [toDouble(v), conditionUlps(D, f, [e, x], sameConic(e))];
}

/**
 * Eccentric / parabolic / hyperbolic anomaly from the true anomaly (NaN where the conic does not reach nu),
 * and the conditioning in ulps.
 */
export function referenceTrueToAnomaly(e: number, nu: number): [number, number] {
  return withCondition(([eD, n]) => trueToAnomalyDec(eD!, n!), e, nu);
}

export function referenceAnomalyToTrue(e: number, x: number): [number, number] {
  return withCondition(([eD, a]) => anomalyToTrueDec(eD!, a!), e, x);
}

export function referenceTrueToMean(e: number, nu: number): [number, number] {
  return withCondition(([eD, n]) => {
    const a = trueToAnomalyDec(eD!, n!);
    return a === undefined ? undefined : anomalyToMeanDec(eD!, a);
  }, e, nu);
}

/** [time, area, areal velocity] from nu1 to nu2 on the conic (mu, p, e). */
export function referenceTimeOfFlight(mu: number, p: number, e: number, nu1: number, nu2: number): number[] {
  const eD = exact(D, e);
  const pD = exact(D, p);
  const a1 = trueToAnomalyDec(eD, exact(D, nu1));
  const a2 = trueToAnomalyDec(eD, exact(D, nu2));
  if (a1 === undefined || a2 === undefined) return [NaN, NaN, NaN];
  const dm = anomalyToMeanDec(eD, a2).minus(anomalyToMeanDec(eD, a1));
  let integral: Dec;
  if (eD.eq(1)) integral = dm.div(2);
  else {
    const k = ONE.minus(eD.times(eD)).abs();
    integral = dm.div(k.pow(1.5));
  }
  const area = pD.times(pD).times(integral).div(2);
  const rate = exact(D, mu).times(pD).sqrt().div(2);
  return [toDouble(area.div(rate)), toDouble(area), toDouble(rate)];
}
