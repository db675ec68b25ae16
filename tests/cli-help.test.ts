/**
 * Help is generated from the option table (harness/cli/options.ts), so it cannot drift from what the parser
 * takes: every option a command accepts is in its usage and help, every enumerated value is listed, and no help
 * line is wider than 100 columns (a terminal of common width; common practice).
 */
import { describe, it, expect } from "vitest";
import { COMMAND_NAMES, loadCommands } from "../harness/cli/main.js";
import { commandHelp, usageLines, OPTIONS, suggest } from "../harness/cli/options.js";
import { BUILDS } from "../harness/module/builds.js";
import { areal } from "./helpers.js";

// Commands load lazily (main.ts): their declarations are read here once every module is loaded.
const COMMANDS = await loadCommands();

describe("generated help", () => {
  for (const [name, c] of Object.entries(COMMANDS)) {
    it(`${name}: usage and help list every option it takes, within 100 columns`, () => {
      const help = commandHelp(name, c);
      const usage = usageLines(name, c).join("\n");
      for (const o of [...c.options, ...(c.alternative?.options ?? [])]) {
        expect(usage).toContain(`--${o}`);
        expect(help).toContain(`--${o}`);
      }
      if (c.options.includes("build")) for (const b of BUILDS) expect(help).toContain(b);
      for (const line of help.split("\n")) expect(line.length).toBeLessThanOrEqual(100);
    });
  }
  it("the overview fits 100 columns and names every command", () => {
    const r = areal("--help");
    for (const line of r.out.split("\n")) expect(line.length).toBeLessThanOrEqual(100);
    expect(Object.keys(COMMANDS)).toEqual(COMMAND_NAMES);
    for (const name of COMMAND_NAMES) expect(r.out).toContain(`  ${name} `);
  });
  it("required options are shown without brackets, optional ones with", () => {
    expect(usageLines("eval", COMMANDS.eval!)[0]).toMatch(/^areal eval <routine> --input FILE \[--out FILE\]/);
    expect(Object.keys(OPTIONS)).toContain("plan");
  });
  it("suggest finds near names and not far ones", () => {
    expect(suggest("kepler-eliptic", ["kepler-elliptic", "lambert"])).toEqual(["kepler-elliptic"]);
    expect(suggest("zzz", ["kepler-elliptic", "lambert"])).toEqual([]);
  });
});
