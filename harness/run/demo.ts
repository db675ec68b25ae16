/**
 * The built-in demo shown by `npm start`: an invented spacecraft on an invented mission, used only to
 * show what the kernels do. Nothing here is reference data.
 *
 * Demo "Brackenfold Relay": the relay spacecraft OSSICLE-3 on a high, eccentric Earth orbit
 * (periapsis 7,000 km, apoapsis 46,000 km from Earth's centre), Earth's GM 398600.4418 km^3/s^2 (WGS 84).
 */
import type { Kernels } from "../module/load.js";
import { statusWord, isOk } from "../module/status.js";
import { slotsOf } from "../module/routines.js";
import { GM_EARTH } from "../core/constants.js";

export const SCENARIO = {
  mission: "Brackenfold Relay",
  spacecraft: "OSSICLE-3",
  mu: GM_EARTH,
  periapsis: 7000,
  apoapsis: 46000,
} as const;

/** Call an export and return its named outputs, in the order asked (slots by their ABI names). */
function call(k: Kernels, name: string, args: number[], ...outputs: string[]): number[] {
  const s = slotsOf(name, ...outputs);
  const st = k.call(name, args);
  if (!isOk(st)) throw new Error(`${name}(${args.join(", ")}) returned ${statusWord(st)}`);
  return outputs.map((o) => k.out[s[o]!]!);
}

/** Lines of the demo: the orbit, then equal time steps from periapsis with the area swept in each. */
export function demoLines(k: Kernels): string[] {
  const { mu, periapsis: rp, apoapsis: ra } = SCENARIO;
  const a = (rp + ra) / 2;
  const e = (ra - rp) / (ra + rp);
  const p = a * (1 - e * e);
  const n = Math.sqrt(mu / (a * a * a));
  const period = (2 * Math.PI) / n;
  const lines: string[] = [];
  lines.push(`Demo ${SCENARIO.mission}: ${SCENARIO.spacecraft}, periapsis ${rp} km, apoapsis ${ra} km (invented demo data)`);
  lines.push(`  a = ${a.toFixed(1)} km, e = ${e.toFixed(6)}, period = ${(period / 3600).toFixed(4)} h, build ${k.label}`);
  lines.push("  Twelve equal time steps from periapsis: Kepler's equation gives E, then nu and r;");
  lines.push("  the area swept in each step (from the areal velocity h/2) is the same, as the second law says.");
  lines.push("  step   t [h]      M [rad]     E [rad]     iters  nu [deg]     r [km]      area swept [km^2]");
  let prevNu = 0;
  const steps = 12;
  for (let i = 1; i <= steps; i++) {
    const t = (period * i) / steps;
    const M = n * t;
    const [E, iters] = call(k, "kepler_elliptic", [e, M], "E", "iterations");
    const [nu] = call(k, "anomaly_to_true", [e, E!], "nu");
    const r = a * (1 - e * Math.cos(E!));
    const [area] = call(k, "time_of_flight", [mu, p, e, prevNu, nu!], "area");
    prevNu = nu!;
    lines.push(
      `  ${String(i).padStart(4)} ${(t / 3600).toFixed(4).padStart(8)} ${M.toFixed(6).padStart(11)} ${E!.toFixed(6).padStart(11)} ${String(iters).padStart(6)} ${((nu! * 180) / Math.PI).toFixed(3).padStart(10)} ${r.toFixed(1).padStart(10)} ${area!.toExponential(9).padStart(18)}`,
    );
  }
  return lines;
}
