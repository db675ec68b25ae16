/**
 * The user's own limits for `areal check` (--limits FILE) and the accuracy-only default for code that is not
 * areal's: areal's iteration caps describe areal's kernels, so a correct solver that takes more steps passes on
 * accuracy unless the user's own file sets a cap. The errors of a bad file name the file and the field.
 */
import { describe, it, expect } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal } from "./helpers.js";
import { readUserLimits, userPolicy, externalPolicy, arealPolicy, LimitsFileError } from "../harness/verify/limits.js";
import { runSuite } from "../harness/verify/check.js";
import { SPECS } from "../harness/verify/specs/index.js";
import { mutant, release } from "./helpers.js";

const dir = mkdtempSync(join(tmpdir(), "areal-limits-"));
const shapes = new Map(SPECS.map((s) => [s.suite, { metrics: s.compare.map((c) => c.metric), iterations: s.iterations !== undefined }]));
const file = (name: string, body: unknown): string => {
  const p = join(dir, name);
  writeFileSync(p, typeof body === "string" ? body : JSON.stringify(body));
  return p;
};
const parabolic = SPECS.find((s) => s.suite === "kepler-parabolic")!;

/** The release build, except that every kepler_parabolic call reports 42 iterations (the outputs are areal's). */
function slowSolver() {
  return mutant(release(), (name, _args, out, status) => {
    if (name === "kepler_parabolic") out[1] = 42;
    return status;
  });
}

describe("limits for external code", () => {
  it("the default for external code is accuracy only: 42 iterations at areal's accuracy pass; areal's own cap fails them", () => {
    const k = slowSolver();
    expect(runSuite(parabolic, k, { limits: externalPolicy().limitsOf("kepler-parabolic") }).pass).toBe(true);
    const capped = runSuite(parabolic, k, { limits: arealPolicy("f64").limitsOf("kepler-parabolic") });
    expect(capped.pass).toBe(false);
    expect(capped.reasons.join()).toMatch(/iterations 42 > 1/);
  });

  it("a user's file sets its own caps and accuracy, with null for no cap and \"*\" for the rest", () => {
    const p = file("own.json", { "kepler-parabolic": { max_ulp: 0, max_iterations: 40 }, "*": { max_iterations: null } });
    const pol = userPolicy(p, readUserLimits(p, shapes), externalPolicy());
    const r = runSuite(parabolic, slowSolver(), { limits: pol.limitsOf("kepler-parabolic") });
    // areal's kepler_parabolic is within 1 ulp but not exact on every case (decimal.js reference): 0 ulp fails it.
    expect(r.reasons.some((x) => /D: error \d+ ulp exceeds the limit/.test(x))).toBe(true);
    expect(r.reasons).toContain("iterations 42 > 40");
    expect(pol.limitsOf("kepler-elliptic").max_iterations).toBeUndefined();
    expect(pol.limitsOf("kepler-elliptic").max_ulp).toBe(4); // areal's accuracy limit under "*"
    expect(pol.description).toContain(p);
  });

  it("a bad file is refused, naming the file and the field", () => {
    const bad: [unknown, RegExp][] = [
      ["{", /not JSON/],
      [[1], /must be an object of suites/],
      [{ "kepler-elipttic": { max_ulp: 1 } }, /kepler-elipttic: no such suite/],
      [{ "kepler-elliptic": { max_ulp: -1 } }, /kepler-elliptic\.max_ulp: must be a number >= 0/],
      [{ "kepler-elliptic": { max_ulps: 1 } }, /kepler-elliptic\.max_ulps: unknown field/],
      [{ "kepler-elliptic": { max_rel: 1e-15 } }, /kepler-elliptic\.max_rel: suite kepler-elliptic compares in ulp, not rel/],
      [{ "kepler-elliptic": { max_iterations: 2.5 } }, /kepler-elliptic\.max_iterations: must be a whole number >= 0, or null/],
      [{ "kepler-elliptic": { why: 3 } }, /kepler-elliptic\.why: must be a string/],
    ];
    bad.forEach(([body, re], i) => {
      const p = file(`bad${i}.json`, body);
      expect(() => readUserLimits(p, shapes)).toThrow(LimitsFileError);
      expect(() => readUserLimits(p, shapes)).toThrow(re);
      expect(() => readUserLimits(p, shapes)).toThrow(p);
    });
    expect(() => readUserLimits(join(dir, "missing.json"), shapes)).toThrow(/cannot read the limits file \(ENOENT\)/);
  });

  it("the CLI says which limits it applied, and a bad file is a usage error (exit 2) before any suite runs", () => {
    const p = file("cli.json", { "kepler-elliptic": { max_ulp: 8, why: "ours" } });
    const r = areal("check", "--suite", "kepler-elliptic", "--limits", p, "-v");
    expect(r.code).toBe(0);
    expect(r.out).toContain(`limits: ${p} where it names a suite`);
    expect(r.out).toContain("kepler-elliptic limit: <=8 ulp, <=4 it (ours)");
    const b = areal("check", "--suite", "kepler-elliptic", "--limits", file("cli-bad.json", { "kepler-elliptic": { max_ulp: "4" } }));
    expect(b.code).toBe(2);
    expect(b.err).toMatch(/--limits: .*cli-bad\.json: kepler-elliptic\.max_ulp: must be a number >= 0 \(got "4"\)/);
    expect(b.out).toBe("");
  });
});
