/**
 * The trajectory plan's schema (docs/trajectory-plan.schema.json, validated with Ajv) and the two forms of the
 * initial state: hostile plans each give one clear error naming the file, the JSON path and what was expected;
 * a plan in orbital elements gives the trajectory of the equivalent state plan; the elements path is checked
 * against the decimal.js reference (harness/verify/reference/twobody.ts) and a published worked example
 * (H. D. Curtis, "Orbital Mechanics for Engineering Students", 3rd ed., 2014, Example 4.7, recalled from memory;
 * the same example as tests/twobody-textbook.test.ts, where the recalled answer is checked against the reference).
 * The CSV header documents every column (also in the README), and under J2 the two columns that carry the same
 * quantity are said to and do.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { areal, release } from "./helpers.js";
import { parsePlan, runTrajectory, CSV_COLUMNS, COLUMN_DOCS, PlanError } from "../harness/run/trajectory.js";
import { planSchema } from "../harness/run/plan-schema.js";
import { choicesOf } from "../harness/module/routines.js";
import { referenceState, referenceStateP } from "../harness/verify/reference/twobody.js";
import { referenceElliptic } from "../harness/verify/reference/kepler.js";
import { referenceAnomalyToTrue } from "../harness/verify/reference/anomaly.js";

const DEMO = fileURLToPath(new URL("../examples/plans/marrowfield-survey.json", import.meta.url));
const ROOT = fileURLToPath(new URL("..", import.meta.url));
const DEG = Math.PI / 180;
/** Earth GM, WGS 84 (NIMA TR8350.2), km^3/s^2. */
const MU = 398600.4418;

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-plan-schema-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo plan with changes; `drop` removes fields. */
function planText(changes: Record<string, unknown>, drop: readonly string[] = []): string {
  const p: Record<string, unknown> = { ...JSON.parse(readFileSync(DEMO, "utf8")), ...changes };
  for (const d of drop) delete p[d];
  return JSON.stringify(p);
}

/** Elements of an invented low orbit (degrees, km). */
const LEO = { a_km: 7000, e: 0.01, i_deg: 98, raan_deg: 30, argp_deg: 40, true_anomaly_deg: 50 };

/** The rows of a trajectory CSV (comments dropped) and its header lines. */
function csvOf(bytes: Uint8Array): { head: string[]; cols: string[]; rows: number[][] } {
  const lines = Buffer.from(bytes).toString("utf8").trim().split("\n");
  const head = lines.filter((l) => l.startsWith("#"));
  const body = lines.filter((l) => !l.startsWith("#"));
  return { head, cols: body[0]!.split(","), rows: body.slice(1).map((l) => l.split(",").map(Number)) };
}

/** Run a plan text in process on the release build. */
function run(text: string): ReturnType<typeof csvOf> {
  const k = release();
  const res = runTrajectory(k, parsePlan(text, "plan.json"), { creationDate: "2026-12-05T00:00:00", source: "f64" });
  expect(res.status).toBe(0);
  return csvOf(res.csv);
}

const relDiff = (a: readonly number[], b: readonly number[]): number => Math.hypot(...a.map((x, i) => x - b[i]!)) / Math.hypot(...b);

describe("the schema", () => {
  it("lists the ABI table's integrators and accepts the demo plan", () => {
    const props = planSchema().properties as Record<string, { enum?: string[] }>;
    expect(props.method!.enum).toEqual(Object.keys(choicesOf("method")));
    expect(() => parsePlan(readFileSync(DEMO, "utf8"), "demo.json")).not.toThrow();
  });

  it("the elements example plan runs, and starts at periapsis (mean anomaly 0 on an ellipse is the periapsis)", () => {
    const file = fileURLToPath(new URL("../examples/plans/marrowfield-survey-elements.json", import.meta.url));
    const got = run(readFileSync(file, "utf8"));
    expect(got.rows.length).toBe(298);
    const row = got.rows[0]!;
    const r = Math.hypot(...["rx", "ry", "rz"].map((n) => row[got.cols.indexOf(n)]!));
    expect(Math.abs(r - 7078.137 * (1 - 0.001))).toBeLessThan(1e-9); // a (1 - e), the periapsis radius
  });

  it("docs/trajectory-plan.md points to it", () => {
    expect(readFileSync(join(ROOT, "docs", "trajectory-plan.md"), "utf8")).toContain("trajectory-plan.schema.json");
  });
});

describe("hostile plans: one clear error each", () => {
  const cases: [string, string, RegExp][] = [
    ["missing field", planText({}, ["mu"]), /^plan\.json: \$\.mu: missing field 'mu'$/],
    ["neither state nor elements", planText({}, ["r", "v"]), /^plan\.json: \$\.r: missing field 'r' \(the initial state is 'r' and 'v' \(a state vector\) or 'elements' \(orbital elements\): one of the two\)$/m],
    ["both forms given", planText({ elements: LEO }), /^plan\.json: \$\.r: not allowed with the other: the initial state is 'r' and 'v' \(a state vector\) or 'elements'/m],
    ["wrong type", planText({ mu: "398600.4418" }), /^plan\.json: \$\.mu: expected a number$/],
    ["a number beyond the double range", planText({}).replace('"mu":398600.4418', '"mu":1e400'), /^plan\.json: \$\.mu: expected a finite number/],
    ["angle without its unit", planText({ elements: { ...LEO, i: 1.71, i_deg: undefined } }, ["r", "v"]), /^plan\.json: \$\.elements\.i: unknown field 'i'; expected one of a_km, p_km, e, i_deg, raan_deg, argp_deg, true_anomaly_deg, mean_anomaly_deg$/m],
    ["radians where degrees are asked", planText({ elements: { ...LEO, i_deg: 250 } }, ["r", "v"]), /^plan\.json: \$\.elements\.i_deg: expected a value <= 180$/],
    ["negative e", planText({ elements: { ...LEO, e: -0.1 } }, ["r", "v"]), /^plan\.json: \$\.elements\.e: expected a value >= 0$/],
    ["a and p both", planText({ elements: { ...LEO, p_km: 6999 } }, ["r", "v"]), /^plan\.json: \$\.elements\.p_km: not allowed with the other: the elements take 'a_km' or 'p_km'/],
    ["two anomalies", planText({ elements: { ...LEO, mean_anomaly_deg: 10 } }, ["r", "v"]), /^plan\.json: \$\.elements\.mean_anomaly_deg: not allowed with the other/],
    ["steps and duration", planText({ steps: 10 }), /^plan\.json: \$\.duration: not allowed with the other: the length of the run is 'steps' or 'duration'/],
    ["a vector of two", planText({ v: [1, 2] }), /^plan\.json: \$\.v: expected an array of three numbers$/],
  ];
  for (const [name, text, msg] of cases) {
    it(name, () => {
      let err: unknown;
      try {
        parsePlan(text, "plan.json");
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(PlanError);
      expect((err as Error).message).toMatch(msg);
    });
  }

  // Out of the kernels' domain: the schema lets these through, the elements-to-state kernel refuses them.
  const domain: [string, Record<string, unknown>, RegExp][] = [
    ["e > 1 with a > 0", { ...LEO, e: 1.5 }, /^plan\.json: \$\.elements: a_km 7000 with e 1\.5: expected a_km > 0 for e < 1 \(ellipse\), a_km < 0 for e > 1 \(hyperbola\)$/],
    ["e = 1 with a", { ...LEO, e: 1 }, /^plan\.json: \$\.elements: e = 1 \(a parabola\) has no semi-major axis; give p_km$/],
    ["beyond the asymptote", { a_km: -20000, e: 2, i_deg: 10, raan_deg: 0, argp_deg: 0, true_anomaly_deg: 150 }, /^plan\.json: \$\.elements: rejected by the state kernel: unreachable \(the true anomaly is beyond the hyperbola's asymptote\)$/],
  ];
  for (const [name, el, msg] of domain) {
    it(`out of domain: ${name}`, () => {
      const plan = parsePlan(planText({ elements: el }, ["r", "v"]), "plan.json");
      expect(() => runTrajectory(release(), plan, { creationDate: "2026-12-05T00:00:00", source: "f64" })).toThrow(msg);
    });
  }

  it("through the command line: exit 2, the file named, no output file", () => {
    const p = join(dir, "both.json");
    writeFileSync(p, planText({ elements: LEO }));
    const r = areal("trajectory", "--plan", p, "--csv", join(dir, "both.csv"), "--oem", join(dir, "both.oem"));
    expect(r.code).toBe(2);
    expect(r.err).toContain(`${p}: $.r: not allowed with the other`);
  });
});

describe("orbital elements", () => {
  const base = { j2: 0, j3: 0, step: 20, duration: 6000, budgets: {} };

  it("an elements plan starts at the reference state and follows the equivalent state plan", () => {
    const el = run(planText({ ...base, elements: LEO }, ["r", "v"]));
    const want = referenceState([MU, LEO.a_km, LEO.e, LEO.i_deg * DEG, LEO.raan_deg * DEG, LEO.argp_deg * DEG, LEO.true_anomaly_deg * DEG]);
    const at = (row: number[], names: string[]): number[] => names.map((n) => row[el.cols.indexOf(n)]!);
    // Step 0 within 1e-14 relative of the 50-digit reference (the state suite's limit is 1e-14 or 10 x cond).
    expect(relDiff(at(el.rows[0]!, ["rx", "ry", "rz"]), want.slice(0, 3))).toBeLessThan(1e-14);
    expect(relDiff(at(el.rows[0]!, ["vx", "vy", "vz"]), want.slice(3, 6))).toBeLessThan(1e-14);
    const st = run(planText({ ...base, r: want.slice(0, 3), v: want.slice(3, 6) }));
    expect(st.rows.length).toBe(el.rows.length);
    // The same trajectory: the starts differ by the conversion's rounding (about 1e-16 relative), which a bit
    // over one revolution of a fixed-step integration grows by a small factor: 1e-12 relative is the tolerance.
    const last = el.rows.length - 1;
    expect(relDiff(at(el.rows[last]!, ["rx", "ry", "rz"]), at(st.rows[last]!, ["rx", "ry", "rz"]))).toBeLessThan(1e-12);
    expect(relDiff(at(el.rows[last]!, ["vx", "vy", "vz"]), at(st.rows[last]!, ["vx", "vy", "vz"]))).toBeLessThan(1e-12);
    expect(el.head.some((l) => l.startsWith("# initial state") && l.includes("from the plan's elements (a_km 7000, e 0.01"))).toBe(true);
  });

  it("a mean anomaly is turned into the true anomaly of Kepler's equation (reference solution)", () => {
    const M = 200; // deg
    const got = run(planText({ ...base, steps: 0, duration: undefined, elements: { ...LEO, true_anomaly_deg: undefined, mean_anomaly_deg: M } }, ["r", "v", "duration"]));
    const E = referenceElliptic(LEO.e, M * DEG);
    const nu = referenceAnomalyToTrue(LEO.e, E)[0];
    const want = referenceState([MU, LEO.a_km, LEO.e, LEO.i_deg * DEG, LEO.raan_deg * DEG, LEO.argp_deg * DEG, nu]);
    const row = got.rows[0]!;
    expect(relDiff(["rx", "ry", "rz"].map((n) => row[got.cols.indexOf(n)]!), want.slice(0, 3))).toBeLessThan(1e-14);
  });

  it("a published worked example: Curtis (2014) Example 4.7, a hyperbola given by p", () => {
    // h = 80000 km^2/s, e = 1.4, i = 30 deg, RAAN = 40 deg, argp = 60 deg, theta = 30 deg, mu = 398600 (the
    // book's GM) -> r = (-4040, 4815, 3629) km, v = (-10.39, -4.772, 1.744) km/s.
    const p = (80000 * 80000) / 398600;
    const el = { p_km: p, e: 1.4, i_deg: 30, raan_deg: 40, argp_deg: 60, true_anomaly_deg: 30 };
    const got = run(planText({ ...base, mu: 398600, steps: 0, elements: el }, ["r", "v", "duration"]));
    const row = got.rows[0]!;
    const r = ["rx", "ry", "rz"].map((n) => row[got.cols.indexOf(n)]!);
    const v = ["vx", "vy", "vz"].map((n) => row[got.cols.indexOf(n)]!);
    [-4040, 4815, 3629].forEach((x, j) => expect(Math.abs(r[j]! - x), `r${j}`).toBeLessThan(0.5));
    [[-10.39, 0.005], [-4.772, 0.0005], [1.744, 0.0005]].forEach(([x, tol], j) => expect(Math.abs(v[j]! - x!), `v${j}`).toBeLessThan(tol!));
    const want = referenceStateP([398600, p, 1.4, 30 * DEG, 40 * DEG, 60 * DEG, 30 * DEG]);
    expect(relDiff(r, want.slice(0, 3))).toBeLessThan(1e-14);
    expect(relDiff(v, want.slice(3, 6))).toBeLessThan(1e-14);
  });
});

describe("output columns", () => {
  it("every column is documented with its unit in the file header and in the README", () => {
    const readme = readFileSync(join(ROOT, "README.md"), "utf8");
    const section = readme.slice(readme.indexOf("### Trajectory files"));
    const got = run(planText({ steps: 3, duration: undefined, budgets: {} }, ["duration"]));
    for (const c of CSV_COLUMNS) {
      expect(got.head.some((l) => l.startsWith(`# column ${c} [${COLUMN_DOCS[c].unit}]: `)), c).toBe(true);
      const line = section.split("\n").find((l) => l.startsWith("| ") && l.includes(`\`${c}\``));
      expect(line, c).toContain(` | ${COLUMN_DOCS[c].unit} | `);
    }
    expect(readme).not.toContain("as defined in assembly/monitor.ts");
  });

  it("under J2 the header says h_dev and areal_dev carry one quantity, and they do on every row", () => {
    const got = run(planText({ duration: 6000, budgets: {} }));
    expect(got.head.join("\n")).toContain("h_dev and areal_dev carry one quantity");
    const h = got.cols.indexOf("h_dev");
    const a = got.cols.indexOf("areal_dev");
    const hz = got.cols.indexOf("hz");
    const av = got.cols.indexOf("areal_velocity");
    for (const row of got.rows) {
      expect(row[h]).toBe(row[a]);
      expect(row[av]).toBe(row[hz]! / 2);
    }
    // Without a zonal field they differ (the whole vector against its size), and the header says nothing of it.
    const pm = run(planText({ j2: 0, j3: 0, duration: 6000, budgets: {} }));
    expect(pm.head.join("\n")).not.toContain("carry one quantity");
  });
});
