/**
 * The engineer's own C, checked in both of its builds: examples/c-kepler built as WebAssembly (clang) and as a
 * shared library (gcc) from one source must get the same verdicts and the same worst errors from `areal check`
 * (--module and --library), and `areal eval` through both must write byte-identical files. A library that
 * crashes is reported with the signal, the export and the inputs of the call, and the harness goes on to exit
 * with an error rather than dying with the library.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { areal } from "./helpers.js";
import { buildCKepler, buildSo, cToolchainMissing, recordSkip } from "./usercode-helpers.js";
import { loadLibrary, closeLibraries } from "../harness/module/library.js";
import { ModuleError } from "../harness/module/load.js";
import { onPath } from "./builds-helpers.js";
import { ROOT } from "../harness/core/paths.js";
import { slotsOf } from "../harness/module/routines.js";

const missing = cToolchainMissing();
const why = missing ? recordSkip("usercode-library (C example built as .wasm and .so)", missing, "apt-get install clang lld gcc") : undefined;
let dir = "";
let built: { wasm: string; so: string } | undefined;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-usercode-"));
  if (!why) built = buildCKepler(dir);
});
afterAll(() => {
  closeLibraries();
  rmSync(dir, { recursive: true, force: true });
});

/** The per-suite rows of `check --json`: verdict, worst error, worst case. */
function verdicts(file: string): unknown {
  const j = JSON.parse(readFileSync(file, "utf8")) as { suites: { suite: string; pass: boolean; metrics: { max: number; worst?: unknown }[]; maxIterations?: number; statusFailures: number }[] };
  return j.suites.map((s) => ({ suite: s.suite, pass: s.pass, max: s.metrics.map((m) => m.max), worst: s.metrics.map((m) => m.worst), it: s.maxIterations, sf: s.statusFailures }));
}

describe.skipIf(why !== undefined)(`examples/c-kepler as .wasm and as .so${why ? ` (skipped: ${why})` : ""}`, () => {
  it("check gives the same verdicts and the same worst errors through --module and --library", () => {
    const own = ["--limits", join(ROOT, "examples", "c-kepler", "limits.json")];
    const a = areal("check", "--module", built!.wasm, "--suite", "kepler-elliptic", "--suite", "kepler-parabolic", ...own, "--json", join(dir, "w.json"));
    const b = areal("check", "--library", built!.so, "--suite", "kepler-elliptic", "--suite", "kepler-parabolic", ...own, "--json", join(dir, "s.json"));
    expect(b.err).toBe(a.err);
    expect([a.code, b.code]).toEqual([0, 0]); // both pass under the example's own limits
    const va = verdicts(join(dir, "w.json")) as { max: number[] }[];
    expect(verdicts(join(dir, "s.json"))).toEqual(va);
    expect(va.length).toBe(2);
    // The checks can fail: the worst elliptic error is a finite, non-zero ULP count (against decimal.js).
    expect(va[0]!.max[0]).toBeGreaterThan(0);
    expect(b.out.replace(built!.so, "X")).toBe(a.out.replace(built!.wasm, "X"));
  });

  it("compare --builds takes both files and finds them bit-identical on every vector case they can run", () => {
    const r = areal("compare", "--builds", `${built!.wasm},${built!.so}`);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/kepler-elliptic +\S+libc-kepler\.so +(\d+) +\1 /); // every case bit-identical
    expect(r.out).toContain("every compared build is bit-identical to the baseline on every case.");
  });

  it("eval through both builds writes byte-identical files", () => {
    const rows = ["e,M"];
    for (let i = 0; i < 400; i++) rows.push(`${(i % 20) / 20.5},${(i - 200) * 0.37}`);
    rows.push("1.5,1", "nan,1", "0.99999,1e-9");
    const input = join(dir, "in.csv");
    writeFileSync(input, rows.join("\n") + "\n");
    const a = areal("eval", "kepler-elliptic", "--input", input, "--module", built!.wasm, "--out", join(dir, "a.csv"));
    const b = areal("eval", "kepler-elliptic", "--input", input, "--library", built!.so, "--out", join(dir, "b.csv"));
    expect([a.code, b.code]).toEqual([0, 0]);
    const fa = readFileSync(join(dir, "a.csv"));
    expect(fa.length).toBeGreaterThan(400 * 10);
    expect(Buffer.compare(readFileSync(join(dir, "b.csv")), fa)).toBe(0);
  });
});

const noGcc = onPath("gcc") ? undefined : recordSkip("usercode-library (crash reporting)", "gcc not on PATH", "apt-get install gcc");

describe.skipIf(noGcc !== undefined)("a library that crashes or does not follow the ABI", () => {
  const CRASH = `#include "areal.h"
static double out[64];
double *areal_out(void) { return out; }
int32_t areal_real_bytes(void) { return 8; }
int32_t kepler_elliptic(double e, double M) {
  if (M > 1.5) { volatile int *p = 0; *p = 1; }
  out[AREAL_SLOT_KEPLER_ELLIPTIC_E] = M; out[AREAL_SLOT_KEPLER_ELLIPTIC_ITERATIONS] = 0; (void)e; return 0;
}
`;
  it("reports the signal with the export and the inputs, and the CLI exits 2 (a faulty module) naming them", () => {
    const so = buildSo(dir, "crash", CRASH);
    const { kernels } = loadLibrary(so);
    expect(kernels.call("kepler_elliptic", [0.5, 1])).toBe(0);
    expect(kernels.out[slotsOf("kepler_elliptic", "E").E]).toBe(1);
    let err: unknown;
    try {
      kernels.call("kepler_elliptic", [0.5, 2]);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ModuleError);
    expect((err as Error).message).toMatch(/signal SIGSEGV.*kepler_elliptic\(0\.5, 2\)/);
    const input = join(dir, "crash.csv");
    writeFileSync(input, "e,M\n" + "0.5,1\n".repeat(30) + "0.5,2\n0.5,0.5\n"); // the crash is in the middle of one batch of rows
    const r = areal("eval", "kepler-elliptic", "--input", input, "--library", so);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/signal SIGSEGV.*kepler_elliptic\(0\.5, 2\)/);
  });

  it("a library without areal_out is refused with a plain message", () => {
    const so = buildSo(dir, "noout", "int kepler_elliptic(double e, double M) { return 0; }\n");
    expect(() => loadLibrary(so)).toThrow(/lacks areal_out\(\) or areal_real_bytes\(\)/);
    expect(() => loadLibrary(join(dir, "nothing.so"))).toThrow(/no such file/);
  });
});
