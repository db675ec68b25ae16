// Generate assembly/kepler_starter_table.ts: the elliptic solver's starter table (kepler_elliptic.ts).
// The (e, M) domain e in [0, 1), M in [0, STARTER_M_CELLS / STARTER_M_PER_RAD) (just above pi) is cut into
// STARTER_E_CELLS x STARTER_M_CELLS cells; cell (i, j) covers e in [i / 8, (i + 1) / 8), M in [j / K, (j + 1) / K),
// K = STARTER_M_PER_RAD. In each cell Q = E / M (E the root of E - e sin E = M) is interpolated by the tensor
// cubic in the cell's centred coordinates x = 8 e - i - 1/2, y = K M - j - 1/2 (both in [-1/2, 1/2]):
//   Q(x, y) = sum over a, b = 0 .. 3 of c[a][b] x^a y^b,
// through the 4 x 4 Chebyshev points t_k = cos(pi (k + 1/2) / 4) / 2 (tensor interpolation at Chebyshev points,
// near the best polynomial of its degree; e.g. L. N. Trefethen, "Approximation Theory and Approximation Practice",
// 2013). Interpolating E / M rather than E keeps the starter's relative accuracy as M -> 0 (E = M Q).
// E at each point is solved at 40 digits (Newton in decimal.js from a double start), the 16 coefficients follow from
// the inverse of the 4 x 4 Chebyshev-Vandermonde matrix in decimal arithmetic, and each coefficient is rounded once
// to binary64 and once to binary32 (two copies, as in gen-sincos-table.mjs).
// Cells with i >= 4 and j < (i >> 1) - 1 (e >= 1/2 and M below 1/K, or e >= 3/4 and M below 2/K) are the
// corner near e -> 1, M -> 0 where a cubic in M cannot follow the root; the solver takes Markley's starter there
// and never reads those cells (they are filled all the same, so the layout stays a plain array).
// Usage: node scripts/gen-kepler-starter-table.mjs [--check]   (--check: exit 1 when the committed file differs)
import { readFileSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { Decimal } from "decimal.js";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const target = join(root, "assembly", "kepler_starter_table.ts");
const E_CELLS = 8;
const M_CELLS = 16;
const M_PER_RAD = 5.0859375; // 651 / 128, exact in binary32: 16 cells reach 3.1459 > pi (rounding margin)
const D = Decimal.clone({ precision: 40, rounding: Decimal.ROUND_HALF_EVEN });

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
  const f = Math.fround(toF64(v));
  const fb = new DataView(new ArrayBuffer(4));
  fb.setFloat32(0, f);
  const u = fb.getUint32(0);
  let best = f;
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

/** Root of E - e sin E = M (0 <= e < 1, M > 0) at the working precision: double Newton, then decimal Newton. */
export function rootOf(e, M) {
  const ed = e.toNumber();
  const Md = M.toNumber();
  let x = Md + 0.85 * ed;
  for (let k = 0; k < 60; k++) x -= (x - ed * Math.sin(x) - Md) / (1 - ed * Math.cos(x));
  let E = new D(x);
  for (let k = 0; k < 4; k++) E = E.minus(E.minus(e.times(D.sin(E))).minus(M).div(new D(1).minus(e.times(D.cos(E)))));
  return E;
}

/** The Chebyshev points t_k = cos(pi (k + 1/2) / 4) / 2 and the inverse of V[k][p] = t_k^p (Gauss-Jordan). */
function chebyshev() {
  const pi = D.acos(-1);
  const t = [0, 1, 2, 3].map((k) => D.cos(pi.times(k + 0.5).div(4)).div(2));
  const a = t.map((tk) => [0, 1, 2, 3].map((p) => tk.pow(p)).concat([0, 1, 2, 3].map((q) => new D(q === t.indexOf(tk) ? 1 : 0))));
  for (let c = 0; c < 4; c++) {
    let piv = c;
    for (let r = c + 1; r < 4; r++) if (a[r][c].abs().gt(a[piv][c].abs())) piv = r;
    [a[c], a[piv]] = [a[piv], a[c]];
    const inv = new D(1).div(a[c][c]);
    a[c] = a[c].map((v) => v.times(inv));
    for (let r = 0; r < 4; r++) {
      if (r === c) continue;
      const f = a[r][c];
      a[r] = a[r].map((v, k) => v.minus(f.times(a[c][k])));
    }
  }
  return { t, vinv: a.map((row) => row.slice(4)) };
}

/** Coefficients c[a][b] (16 decimals, a = power of x, b = power of y) of cell (i, j). */
export function cellCoefficients(i, j, cheb = chebyshev()) {
  const { t, vinv } = cheb;
  const K = new D(M_PER_RAD);
  const q = t.map((tx) => t.map((ty) => {
    const e = new D(i).plus(0.5).plus(tx).div(E_CELLS);
    const M = new D(j).plus(0.5).plus(ty).div(K);
    return rootOf(e, M).div(M);
  }));
  // Q = V C V^T  ->  C = Vinv Q Vinv^T
  const tmp = [0, 1, 2, 3].map((a) => [0, 1, 2, 3].map((l) => [0, 1, 2, 3].reduce((s, k) => s.plus(vinv[a][k].times(q[k][l])), new D(0))));
  return [0, 1, 2, 3].flatMap((a) => [0, 1, 2, 3].map((b) => [0, 1, 2, 3].reduce((s, l) => s.plus(tmp[a][l].times(vinv[b][l])), new D(0))));
}

function generate() {
  const cheb = chebyshev();
  const rows64 = [];
  const rows32 = [];
  for (let i = 0; i < E_CELLS; i++) {
    for (let j = 0; j < M_CELLS; j++) {
      const c = cellCoefficients(i, j, cheb);
      rows64.push(`  // cell (${i}, ${j})\n  ` + c.map((v) => String(toF64(v))).join(", ") + ",");
      rows32.push(`  // cell (${i}, ${j})\n  ` + c.map((v) => String(toF32(v))).join(", ") + ",");
    }
  }
  const cells = E_CELLS * M_CELLS;
  return `// GENERATED by scripts/gen-kepler-starter-table.mjs: do not edit. The elliptic solver's starter table (kepler_elliptic.ts).
// Cell (i, j), i = 0 .. ${E_CELLS - 1}, j = 0 .. ${M_CELLS - 1}, covers e in [i / ${E_CELLS}, (i + 1) / ${E_CELLS}), M in [j / K, (j + 1) / K), K = STARTER_M_PER_RAD; it holds
// the 16 coefficients c[a][b] (index 4 a + b) of the tensor cubic Q(x, y) = sum c[a][b] x^a y^b that interpolates
// E / M at the 4 x 4 Chebyshev points of the cell, in the centred coordinates x = ${E_CELLS} e - i - 1/2, y = K M - j - 1/2.
// E at each point solved at 40 digits (decimal.js); each coefficient rounded once to the format.
// Cells with j < (i >> 1) - 1 (the e -> 1, M -> 0 corner) are never read: the solver takes Markley's starter there.
// Size: ${cells} cells x 16 reals = ${cells * 128} bytes (f64 build), ${cells * 64} bytes (f32 build); read-only static data.

import { IS_F32 } from "./real";

/** Cells along e: cell i covers e in [i / ${E_CELLS}, (i + 1) / ${E_CELLS}). */
export const STARTER_E_CELLS: i32 = ${E_CELLS};
/** Cells along M (the reduced |M|): cell j covers [j / K, (j + 1) / K). */
export const STARTER_M_CELLS: i32 = ${M_CELLS};
/** Cells per unit of e, ${E_CELLS} (f64 0x4020000000000000, f32 0x41000000). */
export const STARTER_E_PER_UNIT: real = <real>${E_CELLS}.0;
/** K = 651/128 cells per radian of M (exact in both formats; 16 cells reach 3.1459 > pi). f64 0x4014580000000000, f32 0x40A2C000. */
export const STARTER_M_PER_RAD: real = <real>${M_PER_RAD};
/** Reals per cell (16), as a shift: cell (i, j) starts at real index (i * STARTER_M_CELLS + j) << STARTER_SHIFT. */
export const STARTER_SHIFT: i32 = 4;

// prettier-ignore
const STARTER_F64: usize = IS_F32 ? 0 : memory.data<f64>([
${rows64.join("\n")}
], 64);
// prettier-ignore
const STARTER_F32: usize = IS_F32 ? memory.data<f32>([
${rows32.join("\n")}
], 64) : 0;

/** Address of cell (0, 0) of the table in the build's format. */
export const STARTER_TABLE: usize = IS_F32 ? STARTER_F32 : STARTER_F64;
`;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const text = generate();
  if (process.argv.includes("--check")) {
    const now = readFileSync(target, "utf8");
    if (now !== text) {
      process.stderr.write("assembly/kepler_starter_table.ts is stale: run node scripts/gen-kepler-starter-table.mjs\n");
      process.exit(1);
    }
  } else {
    writeFileSync(target, text);
    process.stderr.write(`wrote assembly/kepler_starter_table.ts (${E_CELLS * M_CELLS} cells)\n`);
  }
}
