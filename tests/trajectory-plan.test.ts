/**
 * `areal trajectory --plan FILE` and `areal eval integrate` through the real entry point (bin/areal.mjs as a
 * child process): the trajectory CSV, the CCSDS OEM (KVN form; layout per CCSDS 502.0-B-2, "Orbit Data Messages",
 * section on the OEM, recalled from memory), the exit code and message when a budget is broken, and bad plans.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { release, areal } from "./helpers.js";
import { parsePlan } from "../harness/run/trajectory.js";
import { read, STATE } from "./integrate-helpers.js";

const DEMO = fileURLToPath(new URL("../examples/plans/marrowfield-survey.json", import.meta.url));
let dir: string;

function csvRows(path: string): { cols: string[]; rows: number[][] } {
  const lines = readFileSync(path, "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#"));
  return { cols: lines[0]!.split(","), rows: lines.slice(1).map((l) => l.split(",").map(Number)) };
}

function planFile(changes: Record<string, unknown>): string {
  const sc = { ...JSON.parse(readFileSync(DEMO, "utf8")), ...changes };
  const p = join(dir, `sc-${Object.keys(changes).join("-") || "demo"}.json`);
  writeFileSync(p, JSON.stringify(sc));
  return p;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-trajectory-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("areal trajectory on the demo plan", () => {
  let res: ReturnType<typeof areal>;
  const csv = () => join(dir, "demo.csv");
  const oem = () => join(dir, "demo.oem");
  beforeAll(() => {
    res = areal("trajectory", "--plan", DEMO, "--csv", csv(), "--oem", oem(), "--date", "2026-12-02");
  });

  it("exits 0, writes both files, and draws no progress bar when stderr is not a terminal", () => {
    expect(res.err).not.toContain("\r");
    expect(res.code, res.err).toBe(0);
    expect(res.err).toMatch(/trajectory: 4320 steps/);
    expect(existsSync(csv()) && existsSync(oem())).toBe(true);
  });

  it("the CSV has every step with its invariants, and its last state is the kernel's, bit for bit", () => {
    const { cols, rows } = csvRows(csv());
    const col = (name: string) => cols.indexOf(name);
    expect(cols).toEqual(["step", "t", "rx", "ry", "rz", "vx", "vy", "vz", "energy", "hx", "hy", "hz", "ex", "ey", "ez",
      "areal_velocity", "energy_dev", "h_dev", "ecc_dev", "areal_dev"]);
    expect(rows.length).toBe(4321);
    rows.forEach((r, i) => expect(r[0]).toBe(i));
    const sc = JSON.parse(readFileSync(DEMO, "utf8"));
    const k = release();
    expect(k.call("integrate", [sc.mu, ...sc.r, ...sc.v, sc.step, 4320, 2, sc.j2, sc.j3, sc.radius, 0, 0, 0, 0])).toBe(0);
    expect(STATE.map((n) => rows[4320]![col(n)])).toEqual(read(k, ...STATE));
    // The CSV's per-step deviations have the kernel's running maximum as their maximum.
    for (const dev of ["energy_dev", "h_dev"]) expect(Math.max(...rows.map((r) => r[col(dev)]!)), dev).toBe(read(k, dev)[0]);
  });

  it("the OEM has the KVN header, one metadata block and increasing epochs matching the CSV states", () => {
    const text = readFileSync(oem(), "utf8");
    const lines = text.split("\n").filter((l) => l.trim() !== "");
    const kv = (key: string): string | undefined => lines.find((l) => l.startsWith(`${key} `))?.split("=")[1]?.trim();
    expect(lines[0]).toBe("CCSDS_OEM_VERS = 2.0");
    expect(kv("CREATION_DATE")).toBe("2026-12-02T00:00:00");
    expect(kv("ORIGINATOR")).toMatch(/^\S+$/); // present and not empty (toBeDefined passed "ORIGINATOR =")
    const order = ["META_START", "OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "TIME_SYSTEM", "START_TIME", "STOP_TIME", "META_STOP"];
    const at = order.map((key) => lines.findIndex((l) => l === key || l.startsWith(`${key} `)));
    expect(at.every((i) => i > 0)).toBe(true);
    expect([...at].sort((a, b) => a - b)).toEqual(at);
    expect(kv("OBJECT_NAME")).toBe("QUILLWORT-2");
    expect(kv("TIME_SYSTEM")).toBe("UTC");
    const data = lines.slice(at[at.length - 1]! + 1).filter((l) => !l.startsWith("COMMENT"));
    expect(data.length).toBe(4320 / 3 + 1);
    const rows = csvRows(csv()).rows;
    data.forEach((l, i) => {
      const f = l.split(/\s+/);
      expect(f.length).toBe(7);
      expect(f[0]).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d+$/);
      expect(f.slice(1).map(Number)).toEqual(rows[3 * i]!.slice(2, 8));
    });
    expect(data[0]!.split(" ")[0]).toBe(kv("START_TIME"));
    expect(data[data.length - 1]!.split(" ")[0]).toBe(kv("STOP_TIME"));
    expect(kv("START_TIME")).toBe("2027-03-14T06:00:00.000000");
    expect(kv("STOP_TIME")).toBe("2027-03-15T06:00:00.000000");
    expect(data[1]!.split(" ")[0]).toBe("2027-03-14T06:01:00.000000");
  });
});

describe("budgets and bad plans", () => {
  it("a broken budget exits 1 and names the invariant and the first step over it (from the CSV)", () => {
    const p = planFile({ budgets: { energy: 1e-10 }, duration: 3600 });
    const c = join(dir, "tight.csv");
    const r = areal("trajectory", "--plan", p, "--csv", c, "--oem", join(dir, "tight.oem"));
    expect(r.code, r.err).toBe(1);
    const { cols, rows } = csvRows(c);
    const energyDev = cols.indexOf("energy_dev");
    const first = rows.find((row) => row[energyDev]! > 1e-10)![0]!;
    expect(first).toBeGreaterThan(0);
    expect(r.err).toContain(`budget broken: energy deviation above 1e-10 first at step ${first} (t = ${first * 20} s)`);
  });

  it("bad fields are named; exit 2", () => {
    const cases: [Record<string, unknown>, RegExp][] = [
      [{ metod: "rk4" }, /sc\.json: \$\.metod: unknown field 'metod'; expected one of comment, mission, /],
      [{ method: "rk5" }, /sc\.json: \$\.method: expected one of rk4, verlet, yoshida4, butcher6/],
      [{ duration: 30 }, /sc\.json: \$\.duration: expected a whole number of steps of 20 s in the step's direction; got 30 s/],
      [{ r: [1, 2] }, /sc\.json: \$\.r: expected an array of three numbers/],
      [{ epoch: "2027-02-30T00:00:00" }, /sc\.json: \$\.epoch: expected a valid date and time; got '2027-02-30T00:00:00'/],
      [{ budgets: { energy: -1 } }, /sc\.json: \$\.budgets\.energy: expected a value >= 0/],
    ];
    // In process for each case (fast), then once through the command line for the exit code.
    for (const [change, msg] of cases) expect(() => parsePlan(readFileSync(planFile(change), "utf8"), "sc.json")).toThrow(msg);
    const r = areal("trajectory", "--plan", planFile(cases[1]![0]), "--csv", join(dir, "x.csv"), "--oem", join(dir, "x.oem"));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/sc-method\.json: \$\.method: expected one of rk4, verlet, yoshida4, butcher6/);
    expect(areal("trajectory").err).toMatch(/trajectory needs --plan FILE/);
  });
});

describe("areal eval integrate", () => {
  it("takes method names, defaults j2, j3, radius and budgets, and matches a direct call", () => {
    const input = join(dir, "int.csv");
    writeFileSync(input, "mu,r0x,r0y,r0z,v0x,v0y,v0z,step,steps,method\n398600.4418,7000,0,0,0,7.5,1,10,600,yoshida4\n398600.4418,7000,0,0,0,7.5,1,10,600,butcher6\n");
    const r = areal("eval", "integrate", "--input", input);
    expect(r.code).toBe(0);
    const lines = r.out.trim().split("\n");
    expect(lines[0]).toBe("mu,r0x,r0y,r0z,v0x,v0y,v0z,step,steps,method,rx,ry,rz,vx,vy,vz,energy_dev,h_dev,ecc_dev,areal_dev,energy_step,h_step,ecc_step,areal_step,status");
    const k = release();
    expect(k.call("integrate", [398600.4418, 7000, 0, 0, 0, 7.5, 1, 10, 600, 3, 0, 0, 1, 0, 0, 0, 0])).toBe(0);
    const head = lines[0]!.split(",");
    const got = lines[2]!.split(",");
    const names = [...STATE, "energy_dev", "h_dev", "ecc_dev", "areal_dev"];
    expect(names.map((n) => Number(got[head.indexOf(n)]))).toEqual(read(k, ...names));
    expect(got[got.length - 1]).toBe("ok");
  });
});
