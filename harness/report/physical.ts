/**
 * The single-precision build in physical units: invented scenarios (a 400 km circular orbit over one and ten
 * revolutions, a geostationary day, a Molniya-like revolution, a hyperbolic departure, a state from elements, a
 * transfer by Lambert, Kepler's equation mapped to along-track metres) run on the f32 build and on the release
 * build with the same inputs (the f32-rounded values, so only the arithmetic differs), the difference given in
 * metres, m/s and mm/s. ulps of a 7000 km coordinate say little; "0.2 m after a revolution" says what it costs.
 */
import type { Kernels } from "../module/load.js";
import { slotsOf } from "../module/routines.js";
import { isOk } from "../module/status.js";
import { GM_EARTH, R_EARTH } from "../core/constants.js";

const MU = GM_EARTH;
const RE = R_EARTH;

export interface PhysicalRow {
  readonly scenario: string;
  /** What is compared, with its unit: "position (m)". */
  readonly quantity: string;
  readonly unit: string;
  /** |f32 - f64| in that unit; NaN when one build refused the case (status in `note`). */
  readonly difference: number;
  readonly note?: string;
}

const P = slotsOf("propagate", "rx", "ry", "rz", "vx", "vy", "vz");
const S = slotsOf("state", "rx", "ry", "rz", "vx", "vy", "vz");
const L = slotsOf("lambert", "v1x", "v1y", "v1z");
const KE = slotsOf("kepler_elliptic", "E");

/** Call an export on both builds with the f32-rounded arguments; the named slots of each, or the failing status. */
function both(f64: Kernels, f32: Kernels, name: string, args: readonly number[], slots: readonly number[]): { a: number[]; b: number[] } | string {
  const x = args.map((v) => Math.fround(v));
  const sa = f64.call(name, x);
  if (!isOk(sa)) return `f64 status ${sa}`;
  const a = slots.map((i) => f64.out[i]!);
  const sb = f32.call(name, x);
  if (!isOk(sb)) return `f32 status ${sb}`;
  return { a, b: slots.map((i) => f32.out[i]!) };
}

const dist = (a: readonly number[], b: readonly number[], from: number, n: number): number => Math.hypot(...Array.from({ length: n }, (_, i) => a[from + i]! - b[from + i]!));

/** The rows of the physical comparison (the f32 build against the release build). */
export function physicalRows(f64: Kernels, f32: Kernels): PhysicalRow[] {
  const rows: PhysicalRow[] = [];
  const stateRows = (scenario: string, name: string, args: number[], slots: readonly number[]): void => {
    const r = both(f64, f32, name, args, slots);
    if (typeof r === "string") {
      rows.push({ scenario, quantity: "position", unit: "m", difference: NaN, note: r });
      return;
    }
    rows.push({ scenario, quantity: "position", unit: "m", difference: dist(r.a, r.b, 0, 3) * 1000 });
    rows.push({ scenario, quantity: "velocity", unit: "mm/s", difference: dist(r.a, r.b, 3, 3) * 1e6 });
  };
  const pslots = [P.rx, P.ry, P.rz, P.vx, P.vy, P.vz];
  const circ = (alt: number): number[] => {
    const r = RE + alt;
    return [r, 0, 0, 0, Math.sqrt(MU / r) * Math.cos(0.9), Math.sqrt(MU / r) * Math.sin(0.9)];
  };
  const period = (a: number): number => 2 * Math.PI * Math.sqrt(a ** 3 / MU);
  stateRows("400 km circular, i = 51.6 deg: 1 rev", "propagate", [MU, ...circ(400), period(RE + 400)], pslots);
  stateRows("400 km circular: 10 revs", "propagate", [MU, ...circ(400), 10 * period(RE + 400)], pslots);
  stateRows("geostationary: 1 day", "propagate", [MU, 42164.17, 0, 0, 0, Math.sqrt(MU / 42164.17), 0, 86164.1], pslots);
  // Molniya-like: a = 26600 km, e = 0.74, from perigee; one revolution.
  const a = 26600;
  const e = 0.74;
  stateRows("Molniya-like (a 26600 km, e 0.74): 1 rev", "propagate", [MU, a * (1 - e), 0, 0, 0, Math.sqrt((MU * (1 + e)) / (a * (1 - e))), 0, period(a)], pslots);
  // Hyperbolic departure: periapsis 6578 km, v_inf 3 km/s; 1 day.
  const rp = 6578;
  stateRows("hyperbolic departure, v_inf 3 km/s: 1 day", "propagate", [MU, rp, 0, 0, 0, Math.sqrt(9 + (2 * MU) / rp), 0, 86400], pslots);
  stateRows("state from elements, a 7000 km, e 0.01", "state", [MU, 7000, 0.01, 1.7104, 0.5, 1.2, 2.1], [S.rx, S.ry, S.rz, S.vx, S.vy, S.vz]);
  // Lambert: 7000 km to 42164 km, 120 degrees in 5 hours, zero revolutions.
  const th = (2 * Math.PI) / 3;
  const lam = both(f64, f32, "lambert", [MU, 7000, 0, 0, 42164 * Math.cos(th), 42164 * Math.sin(th), 0, 5 * 3600, 0, 0, 0], [L.v1x, L.v1y, L.v1z]);
  const lamName = "Lambert 7000 to 42164 km, 120 deg, 5 h: v1";
  rows.push(typeof lam === "string" ? { scenario: lamName, quantity: "velocity", unit: "m/s", difference: NaN, note: lam } : { scenario: lamName, quantity: "velocity", unit: "m/s", difference: dist(lam.a, lam.b, 0, 3) * 1000 });
  // Kepler's equation on a grid of (e, M): the largest E difference, as along-track metres on a 7000 km orbit.
  let worst = 0;
  for (let i = 0; i <= 20; i++) {
    for (let j = 0; j <= 40; j++) {
      const r = both(f64, f32, "kepler_elliptic", [i * 0.0495, (j * Math.PI) / 40], [KE.E]);
      if (typeof r !== "string") worst = Math.max(worst, Math.abs(r.a[0]! - r.b[0]!));
    }
  }
  rows.push({ scenario: "Kepler E (e 0-0.99), as arc on 7000 km", quantity: "along-track", unit: "m", difference: worst * 7000 * 1000 });
  return rows;
}
