/**
 * The command line as a user meets it: `areal eval` and `areal check` through the real entry point
 * (bin/areal.mjs, run as a child process), good input and bad.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { mkdtempSync, writeFileSync, readFileSync, existsSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { release, run, areal } from "./helpers.js";
import { sameBits } from "../harness/core/float.js";

let dir: string;

function file(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-cli-"));
});

describe("areal eval", () => {
  it("writes every input column, then the outputs and status, as round-trip decimals equal to a direct call", () => {
    const input = file("ok.csv", "id,e,M\n1,0.5,1\n2,0.999999,1e-9\n3,1.5,1\n4,0.1,-7.25\n");
    const out = join(dir, "ok-out.csv");
    const r = areal("eval", "kepler-elliptic", "--input", input, "--out", out);
    expect(r.code).toBe(0);
    const lines = readFileSync(out, "utf8").trim().split("\n");
    expect(lines[0]).toBe("id,e,M,E,iterations,status");
    const k = release();
    for (const line of lines.slice(1)) {
      const [, e, M, E, it, status] = line.split(",");
      const [st, want, wantIt] = run(k, "kepler_elliptic", [Number(e), Number(M)]);
      if (st === 0) {
        expect(status).toBe("ok");
        expect(sameBits(Number(E), want!)).toBe(true);
        expect(Number(it)).toBe(wantIt);
      } else {
        expect(status).toBe("out-of-domain");
        expect(E).toBe("NaN");
      }
    }
  });

  it("accepts CRLF line ends and prints to stdout without --out", () => {
    const input = file("crlf.csv", "M\r\n0.5\r\n-2\r\n");
    const r = areal("eval", "kepler-parabolic", "-i", input);
    expect(r.code).toBe(0);
    expect(r.out.split("\n")[0]).toBe("M,D,iterations,nu,status");
    expect(r.out.trim().split("\n")).toHaveLength(3);
  });

  it("unknown routine: exit 2, names it and lists the known ones", () => {
    const r = areal("eval", "kepler-circular", "--input", file("x.csv", "e,M\n0,1\n"));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/unknown routine 'kepler-circular'.*kepler-elliptic/);
  });

  it("missing column: exit 2, names the column, writes nothing", () => {
    const out = join(dir, "missing-out.csv");
    const r = areal("eval", "kepler-elliptic", "--input", file("missing.csv", "e,N\n0.1,1\n"), "--out", out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/missing column 'M'/);
    expect(existsSync(out)).toBe(false);
  });

  it("non-numeric cell: exit 2, names file, line and column, writes nothing", () => {
    const out = join(dir, "bad-out.csv");
    const r = areal("eval", "kepler-elliptic", "--input", file("bad.csv", "e,M\n0.1,1\n0.2,x1\n"), "--out", out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/bad\.csv:3: column 'M' holds 'x1'/);
    expect(existsSync(out)).toBe(false);
  });

  it("ragged row, empty file, duplicate header: exit 2 with the place named", () => {
    expect(areal("eval", "kepler-elliptic", "-i", file("ragged.csv", "e,M\n0.1,1,3\n")).err).toMatch(/ragged\.csv:2: 3 cells, the header has 2 columns/);
    expect(areal("eval", "kepler-elliptic", "-i", file("empty.csv", "")).err).toMatch(/empty file/);
    expect(areal("eval", "kepler-elliptic", "-i", file("dup.csv", "e,e\n1,1\n")).err).toMatch(/names column 'e' twice/);
  });

  it("header only: an output with the header and no rows", () => {
    const r = areal("eval", "kepler-elliptic", "-i", file("header.csv", "e,M\n"));
    expect(r.code).toBe(0);
    expect(r.out).toBe("e,M,E,iterations,status\n");
  });

  it("a typo in a routine, a command or a value gets a suggestion (did you mean)", () => {
    expect(areal("eval", "kepler-eliptic", "-i", "x.csv").err).toMatch(/unknown routine 'kepler-eliptic' \(did you mean 'kepler-elliptic'\?\)/);
    expect(areal("evl").err).toMatch(/unknown command 'evl' \(did you mean 'eval'\?\)/);
    expect(areal("check", "--build", "f46").err).toMatch(/--build: 'f46' is not one of .*did you mean 'f64'/);
  });

  it("bad option values name the flag", () => {
    expect(areal("eval", "kepler-elliptic", "-i", file("y.csv", "e,M\n0,1\n"), "--build", "f16").err).toMatch(/--build: 'f16' is not one of/);
    expect(areal("eval", "kepler-elliptic", "--bogus").err).toMatch(/bogus/);
    expect(areal("eval", "kepler-elliptic").err).toMatch(/--input/);
  });
});

describe("areal check", () => {
  it("prints one row per suite with the worst case, and exits 0 when all pass", () => {
    const r = areal("check", "--suite", "kepler-parabolic", "--suite", "time-of-flight");
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/kepler-parabolic\s+1000\s+D 1 ulp/);
    expect(r.out).toMatch(/time-of-flight\s+1000/);
    expect(r.out).toMatch(/qualified verification and validation/);
  });

  it("unknown suite: exit 2", () => {
    const r = areal("check", "--suite", "nope");
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/unknown suite 'nope'/);
  });

  it("--json writes the same results for machines", () => {
    const out = join(dir, "check.json");
    const r = areal("check", "--suite", "kepler-parabolic", "--json", out);
    expect(r.code).toBe(0);
    const j = JSON.parse(readFileSync(out, "utf8")) as { pass: boolean; suites: { suite: string; cases: number }[] };
    expect(j.pass).toBe(true);
    expect(j.suites[0]!.suite).toBe("kepler-parabolic");
    expect(j.suites[0]!.cases).toBe(1000);
  });
});
