/**
 * Every command that reads or writes files, given bad input, through the real entry point (bin/areal.mjs as a
 * child process): an empty file, a header only, missing and extra columns, a non-numeric cell, CRLF line ends,
 * an output path that cannot be written, a module that is not WebAssembly and a module that traps. Each bad
 * input must give a message naming the problem, a non-zero exit code, and no output file, not even a partial
 * one (outputs are written to a temporary file and renamed, harness/atomic.ts). The table of what each input
 * gave is printed at the end (for the closing note).
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync, readdirSync, rmSync, copyFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { arealIn } from "./helpers.js";
import { leb, str, section, vec } from "./fixtures/hostile/modules.js";

const SCENARIO = fileURLToPath(new URL("../examples/plans/marrowfield-survey.json", import.meta.url));
let dir: string;
const table: string[] = [];

/** `areal ARGS` run in the test's folder. */
function areal(...args: string[]): { code: number; out: string; err: string } {
  return arealIn(dir, ...args);
}

function file(name: string, text: string | Uint8Array): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

/** A path whose parent is a regular file: no one can write it, root included (ENOTDIR). */
function unwritable(name: string): string {
  return join(file(`plain-${name}`, "x"), name);
}

/** No temporary file left behind in `d` (atomic writes clean up). */
function noTemp(d = dir): void {
  expect(readdirSync(d).filter((f) => f.endsWith(".tmp"))).toEqual([]);
}

/** Run a bad case: non-zero exit, the message matches, `outs` are not created; records a table row. */
function bad(command: string, input: string, args: string[], message: RegExp, outs: string[] = []): void {
  const r = areal(...args);
  table.push(`| ${command} | ${input} | ${r.code} | ${r.err.trim().split("\n").pop()} |`);
  expect(r.code, r.err).not.toBe(0);
  expect(r.err).toMatch(message);
  for (const o of outs) expect(existsSync(o), `${o} must not exist`).toBe(false);
  noTemp();
}

// ---------------------------------------------------------------------------------------------------------
// hand-made modules


/**
 * A module with the ABI's core exports (memory, areal_out = 0, areal_real_bytes = 8) and kernel exports of the
 * given parameter counts (f64, or i32 at the positions `ints` lists) whose bodies are `unreachable`: they trap.
 */
function trappingModule(kernel: string, params: number, ints: readonly number[] = [], more: readonly [string, number, readonly number[]][] = []): Uint8Array<ArrayBuffer> {
  const F64 = 0x7c;
  const I32 = 0x7f;
  const kernels: [string, number, readonly number[]][] = [[kernel, params, ints], ...more];
  const types = [
    [0x60, 0, 1, I32], // () -> i32
    ...kernels.map(([, n, is]) => [0x60, ...vec(Array.from({ length: n }, (_, i) => [is.includes(i) ? I32 : F64])), 1, I32]),
  ];
  const body = (code: number[]): number[] => [...leb(code.length + 1), 0, ...code];
  return new Uint8Array([
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
    ...section(1, vec(types)),
    ...section(3, vec([[0], [0], ...kernels.map((_, i) => [i + 1])])),
    ...section(5, vec([[0x00, 0x01]])),
    ...section(7, vec([
      [...str("memory"), 0x02, 0],
      [...str("areal_out"), 0x00, 0],
      [...str("areal_real_bytes"), 0x00, 1],
      ...kernels.map(([name], i) => [...str(name), 0x00, i + 2]),
    ])),
    ...section(10, vec([body([0x41, 0x00, 0x0b]), body([0x41, 0x08, 0x0b]), ...kernels.map(() => body([0x00, 0x0b]))])),
  ]);
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-bad-"));
});

afterAll(() => {
  process.stdout.write(["", "| command | bad input | exit | message |", "| --- | --- | --- | --- |", ...table, ""].join("\n"));
  rmSync(dir, { recursive: true, force: true });
});

describe("the hand-made trapping module", () => {
  it("is valid WebAssembly with the ABI's core exports, and its kernel traps", () => {
    const m = new WebAssembly.Instance(new WebAssembly.Module(trappingModule("kepler_elliptic", 2)));
    expect((m.exports.areal_real_bytes as () => number)()).toBe(8);
    expect(() => (m.exports.kepler_elliptic as (a: number, b: number) => number)(0.5, 1)).toThrow(WebAssembly.RuntimeError);
  });
});

describe("areal eval", () => {
  const out = (): string => join(dir, `out-${table.length}.csv`);

  it("empty file", () => {
    const o = out();
    bad("eval", "empty file", ["eval", "kepler-elliptic", "-i", file("empty.csv", ""), "-o", o], /empty\.csv: empty file/, [o]);
  });

  it("header only: accepted, an output of the header and no rows (an empty case list is valid)", () => {
    const o = out();
    const r = areal("eval", "kepler-elliptic", "-i", file("header.csv", "e,M\n"), "-o", o);
    table.push(`| eval | header only | ${r.code} | (accepted) output has the header line and no rows |`);
    expect(r.code).toBe(0);
    expect(readFileSync(o, "utf8")).toBe("e,M,E,iterations,status\n");
  });

  it("missing column", () => {
    const o = out();
    bad("eval", "missing column M", ["eval", "kepler-elliptic", "-i", file("missing.csv", "e\n0.5\n"), "-o", o], /missing column 'M'/, [o]);
  });

  it("extra cell in a row", () => {
    const o = out();
    bad("eval", "row with an extra cell", ["eval", "kepler-elliptic", "-i", file("extra.csv", "e,M\n0.5,1\n0.5,1,7\n"), "-o", o], /extra\.csv:3: 3 cells, the header has 2 columns/, [o]);
  });

  it("row with a cell missing", () => {
    const o = out();
    bad("eval", "row with a cell missing", ["eval", "kepler-elliptic", "-i", file("short.csv", "e,M\n0.5\n"), "-o", o], /short\.csv:2: 1 cells, the header has 2 columns/, [o]);
  });

  it("extra column in the header: passed through to the output (an id or a note column is common practice)", () => {
    const o = out();
    const r = areal("eval", "kepler-elliptic", "-i", file("idcol.csv", "id,e,M\nA,0.5,1\n"), "-o", o);
    table.push(`| eval | extra column 'id' | ${r.code} | (accepted) passed through: ${readFileSync(o, "utf8").split("\n")[0]} |`);
    expect(r.code).toBe(0);
    expect(readFileSync(o, "utf8").split("\n")[1]).toMatch(/^A,0\.5,1,/);
  });

  it("an input column named like an output", () => {
    const o = out();
    bad("eval", "input column named 'status'", ["eval", "kepler-elliptic", "-i", file("clash.csv", "e,M,status\n0.5,1,x\n"), "-o", o], /already has a column named 'status'/, [o]);
  });

  it("non-numeric cell", () => {
    const o = out();
    bad("eval", "non-numeric cell", ["eval", "kepler-elliptic", "-i", file("text.csv", "e,M\n0.5,1\n0.5,one\n"), "-o", o], /text\.csv:3: column 'M' holds 'one', which is not a number/, [o]);
  });

  it("CRLF line ends: the same bits as LF", () => {
    const a = out();
    const b = `${a}.lf.csv`;
    const rows = "e,M\r\n0.5,1\r\n0.9,-3.25\r\n0.999999,1e-9\r\n";
    const r1 = areal("eval", "kepler-elliptic", "-i", file("crlf.csv", rows), "-o", a);
    const r2 = areal("eval", "kepler-elliptic", "-i", file("lf.csv", rows.replace(/\r\n/g, "\n")), "-o", b);
    table.push(`| eval | CRLF line ends | ${r1.code} | (accepted) output identical to the LF file's |`);
    expect(r1.code).toBe(0);
    expect(r2.code).toBe(0);
    expect(readFileSync(a, "utf8")).toBe(readFileSync(b, "utf8"));
  });

  it("unwritable output path", () => {
    const o = unwritable("out.csv");
    bad("eval", "unwritable --out (parent is a file)", ["eval", "kepler-elliptic", "-i", file("ok.csv", "e,M\n0.5,1\n"), "-o", o], /(cannot write|ENOTDIR|EEXIST).*out\.csv|out\.csv.*(ENOTDIR|EEXIST)/, [o]);
  });

  it("a failing run leaves an existing output untouched", () => {
    const o = file("keep.csv", "previous results\n");
    bad("eval", "bad cell, --out already exists", ["eval", "kepler-elliptic", "-i", file("text2.csv", "e,M\nx,1\n"), "-o", o], /column 'e' holds 'x'/);
    expect(readFileSync(o, "utf8")).toBe("previous results\n");
  });

  it("module that is not WebAssembly", () => {
    const o = out();
    bad("eval", "--module is a text file", ["eval", "kepler-elliptic", "-i", file("ok2.csv", "e,M\n0.5,1\n"), "--module", file("notwasm.wasm", "this is not a module\n"), "-o", o], /notwasm\.wasm.*not a WebAssembly module/, [o]);
  });

  it("module that traps", () => {
    const o = out();
    const m = file("trap.wasm", trappingModule("kepler_elliptic", 2));
    bad("eval", "--module whose kernel traps", ["eval", "kepler-elliptic", "-i", file("ok3.csv", "e,M\n0.5,1\n0.6,2\n"), "--module", m, "-o", o], /module trapped in kepler_elliptic\(0.5, 1\) \(unreachable\)/, [o]);
    // Without --out: nothing at all on stdout, not a partial table.
    const r = areal("eval", "kepler-elliptic", "-i", join(dir, "ok3.csv"), "--module", m);
    expect(r.code).not.toBe(0);
    expect(r.out).toBe("");
  });

  it("module lacking the routine's export", () => {
    const o = out();
    const m = file("other.wasm", trappingModule("kepler_hyperbolic", 2));
    bad("eval", "--module without the export", ["eval", "kepler-elliptic", "-i", file("ok4.csv", "e,M\n0.5,1\n"), "--module", m, "-o", o], /no export kepler_elliptic/, [o]);
  });

  it("input file that does not exist", () => {
    bad("eval", "--input missing", ["eval", "kepler-elliptic", "-i", join(dir, "nope.csv")], /--input: no such file/);
  });
});

describe("areal check", () => {
  it("module that is not WebAssembly", () => {
    bad("check", "--module is a text file", ["check", "--module", file("notwasm2.wasm", "\u0000asm but not really")], /notwasm2\.wasm: not a WebAssembly module \(.*version/);
  });

  it("module that traps", () => {
    const j = join(dir, "check-trap.json");
    bad("check", "--module whose kernel traps", ["check", "--module", file("trap2.wasm", trappingModule("kepler_parabolic", 1)), "--json", j], /trap|unreachable/i, [j]);
  });

  it("unwritable --json", () => {
    const j = unwritable("check.json");
    bad("check", "unwritable --json", ["check", "--suite", "kepler-parabolic", "--json", j], /check\.json.*(ENOTDIR|EEXIST)|(ENOTDIR|EEXIST).*check\.json/, [j]);
  });
});

describe("areal compare (two result files)", () => {
  it("empty file", () => {
    bad("compare", "empty file", ["compare", file("ca.csv", "e,M\n0.5,1\n"), file("cempty.csv", "")], /cempty\.csv: empty file/);
  });

  it("header only against rows", () => {
    bad("compare", "header only vs rows", ["compare", join(dir, "ca.csv"), file("chead.csv", "e,M\n")], /different numbers of rows/);
  });

  it("missing column", () => {
    bad("compare", "missing column", ["compare", join(dir, "ca.csv"), file("cmiss.csv", "e\n0.5\n")], /different columns: only in .*ca\.csv: M/);
  });

  it("extra cell in a row", () => {
    bad("compare", "row with an extra cell", ["compare", join(dir, "ca.csv"), file("cextra.csv", "e,M\n0.5,1,2\n")], /cextra\.csv:2: 3 cells/);
  });

  it("CRLF against LF: no difference", () => {
    const r = areal("compare", join(dir, "ca.csv"), file("ccrlf.csv", "e,M\r\n0.5,1\r\n"));
    table.push(`| compare | CRLF against LF | ${r.code} | (accepted) no row differs |`);
    expect(r.code).toBe(0);
  });

  it("unwritable --json", () => {
    const j = unwritable("cmp.json");
    bad("compare", "unwritable --json", ["compare", join(dir, "ca.csv"), join(dir, "ca.csv"), "--json", j], /cmp\.json.*(ENOTDIR|EEXIST)|(ENOTDIR|EEXIST).*cmp\.json/, [j]);
  });
});

describe("areal trajectory", () => {
  it("empty plan", () => {
    const csv = join(dir, "p1.csv");
    bad("trajectory", "empty plan file", ["trajectory", "-p", file("empty.json", ""), "--csv", csv, "--oem", `${csv}.oem`], /empty\.json:1:1: not valid JSON/, [csv, `${csv}.oem`]);
  });

  it("plan with a missing field", () => {
    const csv = join(dir, "p2.csv");
    const sc = JSON.parse(readFileSync(SCENARIO, "utf8")) as Record<string, unknown>;
    delete sc.mu;
    bad("trajectory", "plan without mu", ["trajectory", "-p", file("nomu.json", JSON.stringify(sc)), "--csv", csv, "--oem", `${csv}.oem`], /field 'mu'/, [csv, `${csv}.oem`]);
  });

  it("plan with a non-numeric value", () => {
    const csv = join(dir, "p3.csv");
    const sc = JSON.parse(readFileSync(SCENARIO, "utf8")) as Record<string, unknown>;
    sc.mu = "398600.4418";
    bad("trajectory", "plan mu as text", ["trajectory", "-p", file("textmu.json", JSON.stringify(sc)), "--csv", csv, "--oem", `${csv}.oem`], /textmu\.json: \$\.mu: expected a number/, [csv, `${csv}.oem`]);
  });

  it("plan with CRLF line ends: accepted", () => {
    const csv = join(dir, "p4.csv");
    const crlf = file("crlf.json", readFileSync(SCENARIO, "utf8").replace(/\n/g, "\r\n"));
    const r = areal("trajectory", "-p", crlf, "--csv", csv, "--oem", `${csv}.oem`);
    table.push(`| trajectory | plan with CRLF line ends | ${r.code} | (accepted) trajectory and OEM written |`);
    expect([0, 1]).toContain(r.code); // 1 only if a budget of the scenario breaks, which is not about the input
    expect(existsSync(csv)).toBe(true);
  });

  it("unwritable trajectory path", () => {
    const csv = unwritable("traj.csv");
    const oem = join(dir, "traj.oem");
    bad("trajectory", "unwritable --csv", ["trajectory", "-p", SCENARIO, "--csv", csv, "--oem", oem], /traj\.csv.*(ENOTDIR|EEXIST)|(ENOTDIR|EEXIST).*traj\.csv/, [csv, oem]);
  });

  it("module that is not WebAssembly", () => {
    const csv = join(dir, "p5.csv");
    bad("trajectory", "--module is a text file", ["trajectory", "-p", SCENARIO, "--module", file("notwasm3.wasm", "hello"), "--csv", csv, "--oem", `${csv}.oem`], /not a WebAssembly module/, [csv, `${csv}.oem`]);
  });

  it("module that traps", () => {
    const csv = join(dir, "p6.csv");
    // integrate_begin(mu, r0 (3), v0 (3), step, method: i32, j2, j3, radius, 4 budgets), integrate_step(n: i32)
    const m = file("trap3.wasm", trappingModule("integrate_begin", 16, [8], [["integrate_step", 1, [0]]]));
    bad("trajectory", "--module whose kernel traps", ["trajectory", "-p", SCENARIO, "--module", m, "--csv", csv, "--oem", `${csv}.oem`], /module trapped/, [csv, `${csv}.oem`]);
  });
});

describe("areal demo and areal vectors", () => {
  it("demo: module that is not WebAssembly", () => {
    bad("demo", "--module is a text file", ["demo", "--module", file("notwasm4.wasm", "")], /not a WebAssembly module/);
  });

  it("demo: module that traps", () => {
    bad("demo", "--module whose kernel traps", ["demo", "--module", file("trap4.wasm", trappingModule("kepler_elliptic", 2))], /module trapped|unreachable/);
  });

  it("vectors: unwritable --out-dir", () => {
    const d = unwritable("vecs");
    bad("vectors", "unwritable --out-dir", ["vectors", "--suite", "kepler-parabolic", "--date", "2026-12-02", "--out-dir", d], /vecs.*(ENOTDIR|EEXIST)|(ENOTDIR|EEXIST).*vecs/);
  });

  it("vectors: the committed file is not touched by a failed run", () => {
    const copy = join(dir, "kp.csv");
    copyFileSync(fileURLToPath(new URL("../vectors/kepler-parabolic.csv", import.meta.url)), copy);
    expect(readFileSync(copy, "utf8")).toBe(readFileSync(fileURLToPath(new URL("../vectors/kepler-parabolic.csv", import.meta.url)), "utf8"));
  });
});
