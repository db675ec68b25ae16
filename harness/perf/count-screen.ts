/**
 * Finding each kernel's worst-case inputs for `areal count` (npm run count:screen; the result is committed in
 * vectors/count-inputs.json with its argument, so `areal count` itself never searches).
 *
 * 1. Candidates: every row of the vector files whose columns give the export's parameters (renamed where the
 *    relative-motion kernels share a file), and the hand-made cases of HAND (the integrator's methods, the
 *    zonal terms, monitors on and off).
 * 2. The f64 module runs them all in-process: rows it does not solve with an ok status are dropped (an error
 *    status is an early exit, never the longest path); the `iterations` output, where the export has one, ranks
 *    them.
 * 3. Counted exactly on x86-64 (count.ts, N = 10 and 20 calls): the rows with the most iterations (TOP_ITER), the
 *    first row of every vector tag (each tag is one part of the domain: an edge, a regime), and every hand case.
 *    The most instructions wins. The cap argument (CAPS) says why the path cannot be longer than the one found.
 */
import { readFileSync, writeFileSync, mkdirSync, existsSync } from "node:fs";
import { writeAtomic } from "../core/atomic.js";
import { join } from "node:path";
import { VECTORS_DIR } from "../core/paths.js";
import { loadNamedBuild } from "../module/builds.js";
import { abiExport } from "../module/routines.js";
import { readVectors } from "../verify/vectors.js";
import { COUNT_DIR, INPUTS_FILE, argValues, buildObjects, buildPlugin, countRun, driverSource, linkDriver, translate, type CountCase } from "./count.js";
import { BUILD_FILES } from "../core/paths.js";
import { GM_EARTH, R_EARTH } from "../core/constants.js";

const TOP_ITER = 12;
const MAX_TAGS = 24;

interface Source {
  readonly file: string;
  /** export parameter -> column (when the names differ), or a function of the row. */
  readonly map?: Readonly<Record<string, string | ((row: Record<string, number>) => number)>>;
}

/** Vector files per export. */
const SOURCES: Readonly<Record<string, readonly Source[]>> = {
  kepler_elliptic: [{ file: "kepler-elliptic.csv" }],
  kepler_hyperbolic: [{ file: "kepler-hyperbolic.csv" }],
  kepler_parabolic: [{ file: "kepler-parabolic.csv" }],
  true_to_anomaly: [{ file: "true-to-anomaly.csv" }],
  anomaly_to_true: [{ file: "anomaly-to-true.csv" }],
  true_to_mean: [{ file: "true-to-mean.csv" }],
  mean_to_true: [{ file: "kepler-elliptic.csv" }, { file: "kepler-hyperbolic.csv" }, { file: "true-to-mean.csv", map: { M: "M_ref" } }],
  time_of_flight: [{ file: "time-of-flight.csv" }],
  propagate: [{ file: "propagate.csv" }],
  transition: [{ file: "transition.csv" }, { file: "propagate.csv" }],
  elements: [{ file: "elements.csv" }],
  equinoctial: [{ file: "equinoctial.csv" }, { file: "elements.csv" }],
  invariants: [{ file: "elements.csv" }, { file: "propagate.csv", map: { rx: "r0x", ry: "r0y", rz: "r0z", vx: "v0x", vy: "v0y", vz: "v0z" } }],
  state: [{ file: "state.csv" }],
  state_p: [{ file: "state.csv", map: { p: (r) => r.a! * (1 - r.e! * r.e!) } }],
  from_equinoctial: [{ file: "from-equinoctial.csv" }],
  lambert: [{ file: "lambert.csv" }],
  lambert_partials: [{ file: "lambert.csv" }],
  relative_motion: [{ file: "relative-motion.csv" }],
  from_relative: [{ file: "relative-motion.csv", map: { x: "x0", y: "y0", z: "z0", vx: "vx0", vy: "vy0", vz: "vz0" } }],
  to_relative: [{ file: "relative-motion.csv", map: { rdx: (r) => r.rcx! + r.x0!, rdy: (r) => r.rcy! + r.y0!, rdz: (r) => r.rcz! + r.z0!, vdx: (r) => r.vcx! + r.vx0!, vdy: (r) => r.vcy! + r.vy0!, vdz: (r) => r.vcz! + r.vz0! } }],
  rendezvous_linear: [{ file: "relative-motion.csv", map: { xf: () => 0, yf: () => 0, zf: () => 0 } }],
};

const MU = GM_EARTH;
const LEO = { r0x: 7000, r0y: 100, r0z: 1300, v0x: -0.2, v0y: 7.3, v0z: 1.1 };
const ZONAL = { j2: 1.08263e-3, j3: -2.5327e-6, radius: R_EARTH }; // Earth's J2, J3 (recalled from memory), equatorial radius
const BUDGETS = { energy_budget: 1e-6, h_budget: 1e-6, ecc_budget: 1e-6, areal_budget: 1e-6 };
const METHODS = ["rk4", "verlet", "yoshida4", "butcher6"];

function integratorCases(withSteps: boolean, withPhi = false): Record<string, number | string>[] {
  const out: Record<string, number | string>[] = [];
  for (const method of METHODS) {
    for (const zonal of [false, true]) {
      for (const monitor of [false, true]) {
        out.push({ mu: MU, ...LEO, step: 10, method, ...(withSteps ? { steps: 10 } : {}),
          j2: zonal ? ZONAL.j2 : 0, j3: zonal ? ZONAL.j3 : 0, radius: zonal ? ZONAL.radius : 1,
          ...(monitor ? BUDGETS : { energy_budget: 0, h_budget: 0, ecc_budget: 0, areal_budget: 0 }),
          ...(withPhi ? { symp_budget: monitor ? BUDGETS.energy_budget : 0 } : {}) });
      }
    }
  }
  return out;
}

/** Hand-made candidates: the paths no vector file reaches. */
function handCases(exportName: string): CountCase[] {
  const c = (args: Record<string, number | string>, why: string): CountCase => ({ args, why });
  switch (exportName) {
    case "gravity_zonal":
      // Inside the plain window and outside it (the scaled path: r^2 or mu beyond 2^+-400, 2^+-200, f64).
      return [[MU, 7000, 100, 1300], [MU, 7000, 0, 0], [MU, 0, 0, 7000], [MU, 1e-3, 0, 7000], [MU, 5000, 3000, -4000],
        [MU, 1e-300, 2e-300, 3e-300], [MU, 1e150, -2e150, 3e150], [1e-300, 7000, 100, 1300], [1e300, 7e200, 1e200, 1.3e201]].flatMap(([mu, x, y, z]) => [
        c({ mu: mu!, j2: 0, j3: 0, radius: 1, x: x!, y: y!, z: z! }, `point mass at (${x}, ${y}, ${z}), mu ${mu}`),
        c({ mu: mu!, j2: ZONAL.j2, j3: 0, radius: ZONAL.radius * (x! / 7000), x: x!, y: y!, z: z! }, `J2 at (${x}, ${y}, ${z}), mu ${mu}`),
        c({ mu: mu!, ...ZONAL, radius: ZONAL.radius * (x! / 7000), x: x!, y: y!, z: z! }, `J2 and J3 at (${x}, ${y}, ${z}), mu ${mu}`)]);
    case "integrate":
      return integratorCases(true).map((a) => c(a, "integrator"));
    case "integrate_begin":
      return integratorCases(false).map((a) => c(a, "integrator"));
    case "integrate_step":
      return integratorCases(false).map((a) => ({ setup: { export: "integrate_begin", args: a }, args: { n: 1 }, why: "integrator" }));
    case "integrate_transition":
      return integratorCases(true, true).map((a) => c(a, "integrator with Phi"));
    case "integrate_transition_begin":
      return integratorCases(false, true).map((a) => c(a, "integrator with Phi"));
    case "integrate_phi":
      return integratorCases(false, true).map((a) => ({ setup: { export: "integrate_transition_begin", args: a }, args: {}, why: "integrator with Phi" }));
    case "mean_to_true":
      return [0, 0.5, 1, 3, 100].map((M) => c({ e: 1, M }, "parabola"));
    default:
      return [];
  }
}

/** Candidates of one export from its vector files: args per row and the row's tag. */
function vectorCases(exportName: string): CountCase[] {
  const params = abiExport(exportName).params;
  const out: CountCase[] = [];
  for (const src of SOURCES[exportName] ?? []) {
    const path = join(VECTORS_DIR, src.file);
    if (!existsSync(path)) continue;
    const v = readVectors(path);
    v.values.forEach((vals, i) => {
      const row: Record<string, number> = Object.fromEntries(v.columns.map((c, j) => [c, vals[j]!]));
      const args: Record<string, number> = {};
      for (const p of params) {
        const m = src.map?.[p.name];
        const val = typeof m === "function" ? m(row) : row[m ?? p.name];
        if (val !== undefined && Number.isFinite(val)) args[p.name] = val;
        else if (p.default === undefined) return;
      }
      out.push({ args, why: `${src.file} row ${i + 1}${v.tags[i] ? ` (${v.tags[i]})` : ""}` });
    });
  }
  return out;
}

export interface ScreenResult {
  readonly exportName: string;
  readonly screened: number;
  readonly okRows: number;
  readonly maxIterations?: number;
  readonly worst: CountCase;
  readonly worstInsns: number;
  readonly typicalInsns: number;
}

/** The candidates worth counting: ok status; the most iterations; one per tag; every hand case. */
function shortlist(exportName: string): { list: CountCase[]; okRows: number; maxIterations?: number } {
  const k = loadNamedBuild("f64");
  const iterSlot = abiExport(exportName).outputs.findIndex((o) => o.name === "iterations");
  const scored: { c: CountCase; it: number; tag: string }[] = [];
  for (const c of [...vectorCases(exportName), ...handCases(exportName)]) {
    if (c.setup && k.call(c.setup.export, argValues(c.setup.export, c.setup.args)) >= 16) continue;
    const s = k.call(exportName, argValues(exportName, c.args));
    if (s >= 16) continue;
    scored.push({ c, it: iterSlot >= 0 ? k.out[iterSlot]! : 0, tag: /\((.*)\)$/.exec(c.why)?.[1] ?? c.why });
  }
  const byIter = [...scored].sort((a, b) => b.it - a.it).slice(0, TOP_ITER);
  const seen = new Set<string>();
  const perTag = scored.filter((s) => !seen.has(s.tag) && seen.add(s.tag)).slice(0, MAX_TAGS);
  const hand = scored.filter((s) => !/ row \d+/.test(s.c.why));
  const list = [...new Set([...byIter, ...perTag, ...hand])].map((s) => s.c);
  return { list, okRows: scored.length, ...(iterSlot >= 0 && scored.length ? { maxIterations: Math.max(...scored.map((s) => s.it)) } : {}) };
}

/** Screen one export on x86-64: the exact count of every shortlisted candidate; the largest is the worst. */
export async function screenExport(exportName: string, typical: CountCase, log: (s: string) => void = () => {}): Promise<ScreenResult> {
  const dir = join(COUNT_DIR, "screen");
  mkdirSync(dir, { recursive: true });
  const sigs = await translate(BUILD_FILES.f64, dir, "module");
  const objs = existsSync(join(dir, "module.x86-64.o")) ? [join(dir, "module.x86-64.o"), join(dir, "rt.x86-64.o")] : await buildObjects("x86-64", dir, "module");
  const plugin = await buildPlugin();
  const { list, okRows, maxIterations } = shortlist(exportName);
  const cases = [typical, ...list];
  const c = join(dir, `drv_${exportName}.c`);
  writeFileSync(c, driverSource("module.h", sigs, exportName, cases));
  const img = join(dir, `${exportName}.elf`);
  await linkDriver("x86-64", dir, c, objs, img);
  const width = String(cases.length).length;
  const counts: number[] = [];
  for (let i = 0; i < cases.length; i++) {
    const arg = String(i).padStart(width, "0");
    const lo = await countRun("x86-64", img, Number(arg), 10, plugin);
    const hi = await countRun("x86-64", img, Number(arg), 20, plugin);
    counts.push((hi.insns - lo.insns) / 10);
  }
  let w = 1;
  for (let i = 1; i < cases.length; i++) if (counts[i]! > counts[w]!) w = i;
  log(`${exportName}: ${list.length} candidates of ${okRows} ok rows; worst ${counts[w]} (${cases[w]!.why}), typical ${counts[0]}`);
  return { exportName, screened: list.length, okRows, ...(maxIterations !== undefined ? { maxIterations } : {}), worst: cases[w]!, worstInsns: counts[w]!, typicalInsns: counts[0]! };
}

/** Screen every export of the inputs file (or the named ones) and write the worst cases back with their argument. */
export async function screenAll(names?: readonly string[], log: (s: string) => void = () => {}): Promise<void> {
  const file = JSON.parse(readFileSync(INPUTS_FILE, "utf8")) as { kernels: Record<string, { typical: CountCase; worst: CountCase }> };
  for (const name of names ?? Object.keys(file.kernels)) {
    const entry = file.kernels[name]!;
    const r = await screenExport(name, entry.typical, log);
    const from = SOURCES[name]?.map((s) => `vectors/${s.file}`).join(", ");
    const measured = `screened on x86-64 (f64): ${r.screened} candidates of the ${r.okRows} inputs with an ok status (${[from, handCases(name).length ? "the hand cases of harness/perf/count-screen.ts" : ""].filter(Boolean).join(" and ")}): ${r.maxIterations !== undefined ? `the ${TOP_ITER} with the most iterations (largest ${r.maxIterations}), the first row of each vector tag, every hand case` : "the first row of each vector tag and every hand case (no iteration count to rank by)"}; most instructions ${r.worstInsns} (typical ${r.typicalInsns}) at ${r.worst.why}`;
    // Read again before writing: screens of other exports may run at the same time (one process per core).
    const now = JSON.parse(readFileSync(INPUTS_FILE, "utf8")) as typeof file;
    // The entry's other fields (worst_f32) stay; the file is replaced whole, never half-written.
    now.kernels[name] = { ...now.kernels[name]!, typical: entry.typical, worst: { ...(r.worst.setup ? { setup: r.worst.setup } : {}), args: r.worst.args, why: now.kernels[name]!.worst.why, measured } };
    file.kernels = now.kernels;
    writeAtomic(INPUTS_FILE, JSON.stringify(file, null, 1) + "\n");
  }
}
