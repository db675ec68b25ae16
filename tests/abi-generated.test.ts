/**
 * The ABI table (abi/areal.abi.json) is the one home of the exports, slots, units, statuses and enumerations:
 * the files generated from it must be current, the built module must export what the table declares with the
 * table's signatures, and the C header must compile as C99 with every warning an error.
 */
import { describe, it, expect } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync, mkdirSync, cpSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { ROOT, BUILD_FILES } from "../harness/core/paths.js";
import { ABI_TABLE } from "../harness/module/abi-table.js";
import { readSignatures } from "../harness/module/signatures.js";
import { ROUTINES, slotsOf } from "../harness/module/routines.js";
import { noteSkip } from "./support/skips.js";

const GEN = join(ROOT, "scripts", "gen-abi.mjs");
const has = (cmd: string): boolean => spawnSync("sh", ["-c", `command -v ${cmd}`]).status === 0;
if (!has("gcc")) noteSkip("C header, native (tests/abi-generated)", "no gcc on PATH", "apt-get install gcc");
if (!has("clang")) noteSkip("C header, wasm32 (tests/abi-generated)", "no clang on PATH", "apt-get install clang lld");

describe("files generated from the ABI table", () => {
  it("are current (npm run abi writes them)", () => {
    const r = spawnSync(process.execPath, [GEN, "--check"], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
  });

  it("a hand edit of a generated file is caught (hostile fixture: a copy of the project files with one slot changed)", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-abi-"));
    try {
      for (const d of ["abi", "scripts", "assembly", "harness/module", "include", "docs"]) mkdirSync(join(dir, d), { recursive: true });
      cpSync(join(ROOT, "abi"), join(dir, "abi"), { recursive: true });
      copyFileSync(GEN, join(dir, "scripts", "gen-abi.mjs"));
      for (const f of ["assembly/status.ts", "assembly/abi.ts", "harness/module/abi-table.ts", "include/areal.h", "docs/abi.md"]) copyFileSync(join(ROOT, f), join(dir, f));
      const h = join(dir, "include", "areal.h");
      writeFileSync(h, readFileSync(h, "utf8").replace("#define AREAL_SLOT_KEPLER_ELLIPTIC_E 0", "#define AREAL_SLOT_KEPLER_ELLIPTIC_E 1"));
      const r = spawnSync(process.execPath, [join(dir, "scripts", "gen-abi.mjs"), "--check"], { encoding: "utf8" });
      expect(r.status).toBe(1);
      expect(r.stderr).toContain("stale: include/areal.h");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("the built module against the table", () => {
  it("exports every kernel of the table with the table's signature, in both precisions", () => {
    for (const [build, real] of [["f64", "f64"], ["f32", "f32"]] as const) {
      const sigs = readSignatures(readFileSync(BUILD_FILES[build]), build);
      for (const x of ABI_TABLE.exports) {
        const s = sigs.get(x.name)?.signature;
        expect(s, `${build}: ${x.name}`).toBeDefined();
        expect(s!.params).toEqual(x.params.map((p) => (p.type === "i32" ? "i32" : real)));
        expect(s!.results).toEqual(["i32"]);
      }
    }
  });

  it("names each slot once and the routines follow the table", () => {
    for (const x of ABI_TABLE.exports) expect(new Set(x.outputs.map((o) => o.name)).size).toBe(x.outputs.length);
    expect(slotsOf("integrate", "t").t).toBe(15);
    expect(() => slotsOf("integrate", "nope")).toThrow(/no output nope/); // the layout documented in docs/abi.md
    expect(ROUTINES.map((r) => r.exportName)).toEqual(ABI_TABLE.exports.filter((x) => x.routine).map((x) => x.name));
  });
});

describe("include/areal.h", () => {
  const src = `#define AREAL_IMPLEMENTATION\n#include "areal.h"\nstatic areal_real out[AREAL_OUT_SLOTS];\nareal_real *areal_out(void) { return out; }\nint32_t areal_real_bytes(void) { return (int32_t)sizeof(areal_real); }\nint32_t areal_abi_version(void) { return AREAL_ABI_VERSION; }\nint32_t kepler_parabolic(areal_real M) { out[AREAL_SLOT_KEPLER_PARABOLIC_D] = M; return M > 0 ? AREAL_OK : AREAL_ERR_DOMAIN; }\n`;
  it.runIf(has("gcc"))("compiles as C99 with -Wall -Wextra -Werror -pedantic, f64 and f32, as a shared library", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-h-"));
    try {
      writeFileSync(join(dir, "k.c"), src);
      for (const def of [[], ["-DAREAL_REAL_F32"]]) {
        execFileSync("gcc", ["-std=c99", "-Wall", "-Wextra", "-Werror", "-pedantic", ...def, "-I", join(ROOT, "include"), "-shared", "-fPIC", "-o", join(dir, "k.so"), join(dir, "k.c")]);
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
  it.runIf(has("clang"))("compiles for wasm32 with clang, -Wall -Wextra -Werror", () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-h-"));
    try {
      writeFileSync(join(dir, "k.c"), src);
      execFileSync("clang", ["--target=wasm32", "-std=c99", "-Wall", "-Wextra", "-Werror", "-c", "-I", join(ROOT, "include"), "-o", join(dir, "k.o"), join(dir, "k.c")]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
