/**
 * Nothing in harness/ or tests/ reads or writes the output region by a bare slot number: slots go by their names
 * in the ABI table (abi/areal.abi.json) through `slotsOf` (harness/module/routines.ts), `run` and `outs`
 * (tests/helpers.ts), the integration layout of tests/integrate-helpers.ts, or `outsOf` (tests/support/fuzz-props.ts).
 * This test reads every .ts file of harness/ and tests/ and fails, naming file and line, on a literal index into
 * the region: `.out[<digit>`, `.out.slice(<digit>, <digit>`, `.out.subarray(<digit>`, and a tamper callback's
 * `out[<digit>] =`. Arrays destructured from `run()` (outputs in table order) are not the region and may stay
 * positional.
 */
import { describe, it, expect } from "vitest";
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { ROOT } from "../harness/core/paths.js";

/** Files not converted yet, each with the reason; an entry whose files no longer need it must be removed. */
const EXCEPTIONS: readonly { readonly files: RegExp; readonly why: string }[] = [
];

/** Literal-index accesses to the output region (k.out, res.out, a tamper's out). */
const PATTERNS: readonly { readonly re: RegExp; readonly what: string }[] = [
  { re: /\.out\s*\[\s*\d/, what: "reads or writes a slot by number" },
  { re: /\.out\s*\.\s*(?:slice|subarray)\(\s*\d+\s*(?:,\s*\d|\))/, what: "copies slots by number" },
  { re: /(?<![.\w])out\s*\[\s*\d+\s*\]\s*(?:[-+*/]?=)(?!=)/, what: "writes a slot by number (tamper callback)" },
];

function walk(dir: string): string[] {
  const found: string[] = [];
  for (const n of readdirSync(dir)) {
    const p = join(dir, n);
    if (statSync(p).isDirectory()) found.push(...walk(p));
    else if (p.endsWith(".ts")) found.push(p);
  }
  return found;
}

/** Every literal-index access to the output region in a source text, as "file:line: what: text". */
export function slotNumberUses(file: string, text: string): string[] {
  const bad: string[] = [];
  text.split("\n").forEach((line, i) => {
    for (const { re, what } of PATTERNS) if (re.test(line)) bad.push(`${file}:${i + 1}: ${what}: ${line.trim()}`);
  });
  return bad;
}

const FILES = ["harness", "tests"].flatMap((d) => walk(join(ROOT, d))).map((p) => relative(ROOT, p).split("\\").join("/"));
const excepted = (f: string): boolean => EXCEPTIONS.some((e) => e.files.test(f));

describe("the output region is read by slot names, never by bare numbers", () => {
  it("no file of harness/ or tests/ (but the named exceptions) indexes the region by a literal", () => {
    expect(FILES.length).toBeGreaterThan(100);
    const bad = FILES.filter((f) => !excepted(f)).flatMap((f) => slotNumberUses(f, readFileSync(join(ROOT, f), "utf8")));
    expect(bad, "read the slot by name: slotsOf, run/outs (tests/helpers.ts), read/slot (tests/integrate-helpers.ts), outsOf (fuzz-props)").toEqual([]);
  });

  it("each exception still covers a file with such an access (remove it once its files are converted)", () => {
    for (const e of EXCEPTIONS) {
      const uses = FILES.filter((f) => e.files.test(f)).flatMap((f) => slotNumberUses(f, readFileSync(join(ROOT, f), "utf8")));
      expect(uses.length, `exception ${e.files} (${e.why}) covers no access any more: remove it`).toBeGreaterThan(0);
    }
  });

  it("catches a hostile fixture: every form of literal index, with file and line", () => {
    const d = 3; // built into the fixture so that this file itself holds no such access
    const hostile = [
      "const st = k.call(\"propagate\", x);",
      `const vx = k.out[${d}]!;`,
      `const r = Array.from(k.out.slice(0, ${d}));`,
      `const v = res.out.subarray(${d});`,
      `const m = mutant(k, (name, args, out, st) => { out[${d}] = out[${d}]! + 1e-10; return st; });`,
      `  out[${d}] *= 2;`,
      `c.res.out [ ${d}]`,
    ].join("\n");
    const found = slotNumberUses("tests/hostile.test.ts", hostile);
    expect(found.map((s) => s.split(":").slice(0, 2).join(":"))).toEqual([2, 3, 4, 5, 6, 7].map((n) => `tests/hostile.test.ts:${n}`));
    expect(found[0]).toContain("reads or writes a slot by number");
    expect(found[3]).toContain("writes a slot by number (tamper callback)");
  });

  it("passes named accesses and arrays that are not the region", () => {
    const clean = [
      "const P = slotsOf(\"propagate\", \"vx\", \"vy\");",
      "out[P.vx] = x - 1e-12 * y;",
      "const v0 = outs(k, \"lambert\", \"v1x\", \"v1y\", \"v1z\");",
      "const [st, rx, ry, rz] = run(k, \"propagate\", x);",
      "expect(ref[6]).toBe(rows[4320]![2]); const layout = k.out[S.rx]; if (out[0] === 1) return;",
      "state[2] = state[5] = 0; timeout[3] = 1; about[2] = 0;",
    ].join("\n");
    expect(slotNumberUses("tests/clean.test.ts", clean)).toEqual([]);
  });
});
