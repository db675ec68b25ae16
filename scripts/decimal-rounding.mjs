// Exact conversions between doubles and decimal.js values, shared by the table generators
// (gen-sincos-table.mjs, gen-kepler-starter-table.mjs): the exact decimal value of a double, and a decimal
// rounded to the nearest binary64 and binary32. `D` is the generator's Decimal class (its working precision
// must hold the exact value of a double: 40 digits or more for the values the tables hold).

/** The conversions for one Decimal class. */
export function roundingFor(D) {
  /** Exact decimal value of a double (finite). */
  function exactOf(x) {
    if (x === 0) return new D(0);
    const buf = new DataView(new ArrayBuffer(8));
    buf.setFloat64(0, x);
    const bits = buf.getBigUint64(0);
    const biased = Number((bits >> 52n) & 0x7ffn);
    const field = bits & ((1n << 52n) - 1n);
    const sig = biased === 0 ? field : field | (1n << 52n);
    const v = new D(sig.toString()).times(new D(2).pow(biased === 0 ? -1074 : biased - 1075));
    return bits >> 63n ? v.neg() : v;
  }

  /** Nearest binary64 to a decimal (Number() of the full string is correctly rounded). */
  const toF64 = (v) => (v.isZero() ? 0 : Number(v.toExponential()));

  /** Nearest binary32 to a decimal: the f32 neighbours of fround(nearest double), compared exactly. */
  function toF32(v) {
    if (v.isZero()) return 0;
    const fb = new DataView(new ArrayBuffer(4));
    fb.setFloat32(0, Math.fround(toF64(v)));
    const u = fb.getUint32(0);
    let best = 0;
    let bestErr = null;
    for (const b of [u - 1, u, u + 1]) {
      fb.setUint32(0, b >>> 0);
      const c = fb.getFloat32(0);
      const err = exactOf(c).minus(v).abs();
      if (bestErr === null || err.lt(bestErr)) {
        best = c;
        bestErr = err;
      }
    }
    return best;
  }

  return { exactOf, toF64, toF32 };
}
