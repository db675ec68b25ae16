// The linearisation error of two-impulse rendezvous: rendezvous_linear (the first-order model) against the same
// transfer solved on the nonlinear two-body problem with the module's own `lambert` (Izzo 2015) export.
//
//   node scripts/relative-linearisation.mjs             # the table in docs/relative-motion.md
//   node scripts/relative-linearisation.mjs --mu 398600.4418 --chief rx,ry,rz,vx,vy,vz \
//        --rel x,y,z,vx,vy,vz --target x,y,z --dt 1500   # one geometry of your own
//
// For one case: the deputy's inertial state from the relative one (from_relative), the target point's inertial
// position and velocity at t0 + dt (the chief propagated, then from_relative with zero relative velocity), the
// Lambert arc between them (0 revolutions, prograde); the nonlinear impulses dv1 = v1 - v_deputy and
// dv2 = v_target - v2, in the rotating frame of their time (to_relative with a zero offset). Printed: both
// impulse pairs, their relative difference, and the miss distance when the linear dv1 is flown on the nonlinear
// two-body problem (propagate). Double precision throughout: the figures have a floor of about 1e-7 relative
// (Lambert's velocities are good to about 1e-14 of the orbital speed, which is 1e-7 of a 10 m transfer's dv).
// Runs from dist/ (npm run build first).
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const { loadBuild } = await import(pathToFileURL(join(root, "dist", "harness", "module", "load.js")).href);
const { stateOf } = await import(pathToFileURL(join(root, "dist", "harness", "verify", "specs", "twobody.js")).href);
const k = loadBuild("f64");

function call(name, args, n) {
  const st = k.call(name, args);
  if (st >= 16) throw new Error(`${name}: status ${st} for ${args.join(",")}`);
  return Array.from(k.out.slice(0, n));
}
const norm = (v) => Math.hypot(...v);
const sub = (a, b) => a.map((q, i) => q - b[i]);

/** Linear and nonlinear impulses for one geometry. */
export function compare(mu, chief, rel, target, dt) {
  const lin = call("rendezvous_linear", [mu, ...chief, ...rel, ...target, dt], 7);
  const dep = call("from_relative", [...chief, ...rel], 6);
  const chief1 = call("propagate", [mu, ...chief, dt], 6);
  const tgt = call("from_relative", [...chief1, ...target, 0, 0, 0], 6);
  const hz = chief[0] * chief[4] - chief[1] * chief[3];
  const lam = call("lambert", [mu, ...dep.slice(0, 3), ...tgt.slice(0, 3), dt, 0, hz < 0 ? 1 : 0, 0], 6);
  const inFrame = (c, dv) => call("to_relative", [...c, ...c.slice(0, 3), ...c.slice(3).map((q, i) => q + dv[i])], 6).slice(3);
  const dv1 = inFrame(chief, sub(lam.slice(0, 3), dep.slice(3)));
  const dv2 = inFrame(chief1, sub(tgt.slice(3), lam.slice(3)));
  // Fly the linear dv1 on the nonlinear problem: its inertial components, then propagate the deputy.
  const dvIn = sub(call("from_relative", [...chief, 0, 0, 0, ...lin.slice(0, 3)], 6).slice(3), chief.slice(3));
  const flown = call("propagate", [mu, ...dep.slice(0, 3), ...dep.slice(3).map((q, i) => q + dvIn[i]), dt], 6);
  return {
    lin: lin.slice(0, 6), nl: [...dv1, ...dv2], cond: lin[6],
    err1: norm(sub(lin.slice(0, 3), dv1)) / norm(dv1),
    err2: norm(sub(lin.slice(3, 6), dv2)) / norm(dv2),
    missKm: norm(sub(flown.slice(0, 3), tgt.slice(0, 3))),
  };
}

const arg = (name) => {
  const i = process.argv.indexOf(`--${name}`);
  return i < 0 ? undefined : process.argv[i + 1];
};
const nums = (s) => s.split(",").map(Number);

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (!isMain) {
  // imported (tests/relative-rendezvous.test.ts): compare() only
} else if (arg("chief")) {
  const r = compare(Number(arg("mu") ?? 398600.4418), nums(arg("chief")), nums(arg("rel")), nums(arg("target") ?? "0,0,0"), Number(arg("dt")));
  console.log(`linear    dv1 = ${r.lin.slice(0, 3).join(", ")}  dv2 = ${r.lin.slice(3).join(", ")}  (cond ${r.cond.toExponential(2)})`);
  console.log(`nonlinear dv1 = ${r.nl.slice(0, 3).join(", ")}  dv2 = ${r.nl.slice(3).join(", ")}`);
  console.log(`relative difference: dv1 ${r.err1.toExponential(2)}, dv2 ${r.err2.toExponential(2)}; linear dv1 flown on the two-body problem misses by ${(r.missKm * 1000).toPrecision(3)} m`);
} else {
  const MU = 398600.4418; // WGS 84 (NIMA TR8350.2)
  const SEPS = [0.01, 0.1, 1, 10, 30]; // km
  const FRACS = [0.1, 0.25, 0.4, 0.75, 0.9]; // of the chief's period
  // Deputy mostly behind and a little below and out of plane, at rest in the frame; target: the chief itself.
  const dir = [-0.2, -0.97, 0.14].map((q, _, a) => q / Math.hypot(...a));
  for (const [label, e] of [["circular chief, r = 6778 km", 0], ["e = 0.1 chief, periapsis 6778 km, starting at periapsis", 0.1]]) {
    const rp = 6778, p = rp * (1 + e), a = p / (1 - e * e), T = 2 * Math.PI * Math.sqrt(a ** 3 / MU);
    const chief = stateOf({ mu: MU, p, e, i: 0.9, raan: 0.5, argp: 0, nu: 0, cls: "leo", planar: false });
    console.log(`\n${label} (T = ${T.toFixed(0)} s): max relative difference of dv1, dv2 (linear vs Lambert) / miss of the linear dv1`);
    console.log(`| separation | ${FRACS.map((f) => `${f} T`).join(" | ")} |`);
    console.log(`| --- | ${FRACS.map(() => "---").join(" | ")} |`);
    for (const s of SEPS) {
      const cells = FRACS.map((f) => {
        const r = compare(MU, chief, [...dir.map((q) => q * s), 0, 0, 0], [0, 0, 0], f * T);
        const m = r.missKm * 1000;
        return `${Math.max(r.err1, r.err2).toExponential(1)} / ${m < 0.01 ? m.toExponential(0) : m < 10 ? m.toPrecision(2) : m.toFixed(0)} m`;
      });
      console.log(`| ${s < 1 ? `${s * 1000} m` : `${s} km`} | ${cells.join(" | ")} |`);
    }
  }
}
