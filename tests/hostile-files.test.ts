/**
 * Files that tried to hang areal, make it lose a file or accept a cell that lost its meaning, through
 * the real entry point: an output path that is the input (also through a symbolic or hard link), unwritable
 * paths under /proc and /sys, lines and headers longer than the limit, a file with no line end (a sparse 10 GB
 * file and a header followed by NUL bytes), a folder as input, cells that underflow or overflow on parsing, and
 * SIGINT / SIGTERM during a large eval (conventional exit codes, no temporary file or folder left, the target
 * never half-written). Each case hung, lost the input or passed silently before.
 */
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { spawn, spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync, existsSync, readdirSync, rmSync, symlinkSync, linkSync, openSync, ftruncateSync, closeSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { BIN } from "./helpers.js";
import { MAX_LINE_BYTES } from "../harness/core/stream.js";

let dir: string;

function areal(...args: string[]): { code: number; out: string; err: string; timedOut: boolean } {
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: "utf8", cwd: dir, timeout: 120_000, killSignal: "SIGKILL", env: { ...process.env, NO_COLOR: "1" } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr, timedOut: r.signal === "SIGKILL" };
}

function file(name: string, text: string | Uint8Array): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

const GOOD = "e,M\n0.1,1\n0.2,2\n";

function noTemp(d = dir): void {
  expect(readdirSync(d).filter((f) => f.endsWith(".tmp"))).toEqual([]);
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "areal-hostile-files-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("an output path that is the input is refused; the input is kept", () => {
  it("the same path", () => {
    const p = file("same.csv", GOOD);
    const r = areal("eval", "kepler-elliptic", "-i", p, "-o", p);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--out: .*same\.csv is the input file .*same\.csv \(the same file\)/);
    expect(readFileSync(p, "utf8")).toBe(GOOD);
    noTemp();
  });
  it("another spelling, a symbolic link and a hard link", () => {
    const p = file("linked.csv", GOOD);
    symlinkSync(p, join(dir, "soft.csv"));
    linkSync(p, join(dir, "hard.csv"));
    for (const o of ["./linked.csv", "soft.csv", "hard.csv"]) {
      const r = areal("eval", "kepler-elliptic", "-i", "linked.csv", "-o", o);
      expect(r.code, o).toBe(2);
      expect(r.err, o).toMatch(/is the input file linked\.csv \(the same file\)/);
      expect(readFileSync(p, "utf8")).toBe(GOOD);
    }
    noTemp();
  });
});

describe("unwritable output paths fail at once with the path and the system's reason", () => {
  for (const o of ["/proc/nope/out.csv", "/proc/nope/deeper/out.csv", "/proc/self/out.csv", "/sys/nope/out.csv"]) {
    it(o, () => {
      const r = areal("eval", "kepler-elliptic", "-i", file("ok.csv", GOOD), "-o", o);
      expect(r.timedOut).toBe(false);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(new RegExp(`cannot write ${o.replace(/\//g, "\\/").replace(/\./g, "\\.")}: E[A-Z]+ \\(`));
    });
  }
  it("check --json under /proc", () => {
    const r = areal("check", "--suite", "kepler-elliptic", "--json", "/proc/nope/r.json");
    expect(r.timedOut).toBe(false);
    expect(r.err).toMatch(/cannot write \/proc\/nope\/r\.json: E[A-Z]+ \(/);
    expect(r.code).not.toBe(0);
  });
});

describe("line length is bounded; a file with no line end is an error, not a hang", () => {
  const long = "e,M\n0.1,1\n0.2," + "1".repeat(MAX_LINE_BYTES + 10) + "\n0.3,3\n";
  for (const w of ["1", "2"]) {
    it(`a row longer than the limit names the line and the limit (--workers ${w})`, () => {
      const o = join(dir, "long-out.csv");
      const r = areal("eval", "kepler-elliptic", "-i", file("long.csv", long), "-o", o, "--workers", w);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(new RegExp(`long\\.csv.*longer than the limit of ${MAX_LINE_BYTES} bytes`));
      if (w === "1") expect(r.err).toMatch(/long\.csv:3: line 3 is longer/);
      expect(existsSync(o)).toBe(false);
      noTemp();
    });
  }
  it("a header longer than the limit", () => {
    const r = areal("eval", "kepler-elliptic", "-i", file("longhead.csv", "e,M" + ",x".repeat(MAX_LINE_BYTES) + "\n0.1,1\n"));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/longhead\.csv:1: line 1 is longer than the limit/);
  });
  it("a sparse 10 GB file with no line end", () => {
    const p = join(dir, "sparse.csv");
    const fd = openSync(p, "w");
    ftruncateSync(fd, 10 * 1024 ** 3);
    closeSync(fd);
    const r = areal("eval", "kepler-elliptic", "-i", p);
    expect(r.timedOut).toBe(false);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/sparse\.csv:1: line 1 is longer than the limit/);
    rmSync(p);
  });
  for (const w of ["1", "2"]) {
    // 10 GB (sparse: no disk used) so that a reader without its bound would hold gigabytes, not just a long
    // line that the row check still finds (a 64 MB file let the chunk and range bounds be removed unnoticed).
    it(`a header then a sparse 10 GB of NUL bytes (--workers ${w})`, () => {
      const p = join(dir, "nul.csv");
      writeFileSync(p, "e,M\n");
      const fd = openSync(p, "r+");
      ftruncateSync(fd, 10 * 1024 ** 3);
      closeSync(fd);
      const r = areal("eval", "kepler-elliptic", "-i", p, "-o", join(dir, "nul-out.csv"), "--workers", w);
      expect(r.timedOut).toBe(false);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/nul\.csv.*longer than the limit/);
      if (w === "1") expect(r.err).toMatch(/nul\.csv:2: line 2/);
      noTemp();
      rmSync(p);
    });
  }
});

describe("inputs that lose meaning are input errors naming line and column", () => {
  const cases: [string, RegExp][] = [
    ["1e-400", /under\.csv:3: column 'M' holds '1e-400', which underflows to 0 in double precision .* \(column 2\)/],
    ["1e400", /under\.csv:3: column 'M' holds '1e400', which overflows to infinity in double precision .* \(column 2\)/],
    ["-2.5e-999", /holds '-2\.5e-999', which underflows to 0/],
  ];
  for (const [cell, message] of cases) {
    it(cell, () => {
      const r = areal("eval", "kepler-elliptic", "-i", file("under.csv", `e,M\n0.1,1\n0.1,${cell}\n`));
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
    });
  }
  it("a literal 0, inf and nan spelled as such, and a subnormal, stay allowed", () => {
    const r = areal("eval", "kepler-elliptic", "-i", file("lit.csv", "e,M\n0.1,0\n0.1,0e5\n0.1,inf\n0.1,nan\n0.1,5e-324\n"));
    expect(r.code).toBe(0);
    expect(r.out.trim().split("\n").map((l) => l.split(",").pop())).toEqual(["status", "ok", "ok", "nonfinite-input", "nonfinite-input", "ok"]);
  });
  it("a non-number names the column's number too", () => {
    const r = areal("eval", "kepler-elliptic", "-i", file("word.csv", "e,M\n0.1,one\n"));
    expect(r.err).toMatch(/word\.csv:2: column 'M' holds 'one', which is not a number \(column 2\)/);
  });
});

describe("JSON errors name line and column", () => {
  it("a trajectory plan with a bad line", () => {
    const r = areal("trajectory", "-p", file("plan.json", '{\n  "mu": 1,\n  x\n}\n'), "--csv", join(dir, "p.csv"), "--oem", join(dir, "p.oem"));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/plan\.json:3:3: not valid JSON \(Expected double-quoted property name in JSON\)/);
  });
  it("a sweep grid cut short", () => {
    const r = areal("sweep", "kepler-elliptic", "--grid", file("grid.json", '{\n "inputs": {\n'), "--out", join(dir, "s.json"));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/grid\.json:3:1: not valid JSON \(/);
  });
});

describe("a folder as input", () => {
  it("names the path and says it is a folder", () => {
    mkdirSync(join(dir, "afolder"));
    const r = areal("eval", "kepler-elliptic", "-i", "afolder");
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/cannot read afolder: EISDIR \(is a folder\)/);
  });
});

describe("interrupts remove temporary files and keep the target whole", () => {
  let big: string;
  beforeAll(() => {
    const lines = ["e,M"];
    for (let i = 0; i < 600_000; i++) lines.push(`0.${(i % 97) + 1},${(i % 628) / 100}`);
    big = file("big.csv", lines.join("\n") + "\n");
  });

  /** Start an eval, wait until `ready()` (its temporary file exists), send `sig`; the exit code and stderr. */
  async function interrupt(args: string[], env: NodeJS.ProcessEnv, ready: () => boolean, sig: NodeJS.Signals): Promise<{ code: number | null; err: string; sent: boolean }> {
    const child = spawn(process.execPath, [BIN, ...args], { cwd: dir, env: { ...process.env, NO_COLOR: "1", ...env }, stdio: ["ignore", "ignore", "pipe"] });
    let err = "";
    child.stderr.on("data", (d) => (err += String(d)));
    const exited = new Promise<number | null>((resolve) => child.on("exit", (c) => resolve(c)));
    let sent = false;
    for (let i = 0; i < 2000 && child.exitCode === null; i++) {
      if (ready()) {
        child.kill(sig);
        sent = true;
        break;
      }
      await new Promise((r) => setTimeout(r, 10));
    }
    return { code: await exited, err, sent };
  }

  for (const [sig, code, w] of [["SIGINT", 130, "1"], ["SIGTERM", 143, "2"]] as const) {
    it(`${sig} with --out (--workers ${w}): exit ${code}, no temporary file, the old target untouched`, async () => {
      const out = join(dir, `target-${sig}.csv`);
      writeFileSync(out, "old\n");
      const r = await interrupt(["eval", "kepler-elliptic", "-i", big, "-o", out, "--workers", w], {}, () => readdirSync(dir).some((f) => f.startsWith(`.target-${sig}.csv.`)), sig);
      expect(r.sent, r.err).toBe(true);
      expect(r.code, r.err).toBe(code);
      expect(readFileSync(out, "utf8")).toBe("old\n");
      noTemp();
    });
    it(`${sig} without --out (--workers ${w}): exit ${code}, the areal-eval-* folder removed`, async () => {
      const t = mkdtempSync(join(dir, "tmp-"));
      const r = await interrupt(["eval", "kepler-elliptic", "-i", big, "--workers", w], { TMPDIR: t }, () => readdirSync(t).some((f) => f.startsWith("areal-eval-")), sig);
      expect(r.sent, r.err).toBe(true);
      expect(r.code, r.err).toBe(code);
      expect(readdirSync(t)).toEqual([]);
    });
  }
});

