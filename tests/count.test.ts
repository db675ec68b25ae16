/**
 * `areal count` (harness/perf/count.ts): a short slice only, one kernel on x86-64 (the full count over every
 * kernel and target is `npm run count`, several minutes). Checked against outside instruments: the count of the
 * QEMU plugin equals valgrind's callgrind on the same binary run natively (Nethercote and Seward 2007, an
 * independent instrumentation), and repeated runs give the same number. Skipped, with a line saying which
 * package is missing, where the tools are not installed.
 */
import { describe, it, expect } from "vitest";
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { BUILD_FILES } from "../harness/core/paths.js";
import { ABI_TABLE } from "../harness/module/abi-table.js";
import { countAll } from "../harness/perf/count-all.js";
import { readCountInputs, N_LOW, N_HIGH, INSN_CLASSES } from "../harness/perf/count.js";
import { missingPackages, missingLines, onPath } from "../harness/perf/toolchain.js";
import { main } from "../harness/cli/main.js";
import { noteSkip } from "./support/skips.js";

const run = promisify(execFile);
const missing = missingPackages("x86-64");
if (missing.length) noteSkip("instruction counts (tests/count.test.ts)", `missing tools: ${missing.join(", ")}`, `apt-get install ${missing.join(" ")}`);
const noValgrind = !onPath("valgrind");
if (!missing.length && noValgrind) noteSkip("callgrind cross-check of the counts (tests/count.test.ts)", "valgrind is not installed", "apt-get install valgrind");

describe("count inputs", () => {
  it("every export of the ABI table has typical and worst inputs, the worst with its argument and how it was found", () => {
    const inputs = readCountInputs();
    const kernels = ABI_TABLE.exports.map((x) => x.name);
    expect(Object.keys(inputs).sort()).toEqual([...kernels].sort());
    for (const k of kernels) {
      expect(inputs[k]!.worst.why.length, k).toBeGreaterThan(40);
      expect(inputs[k]!.worst.measured ?? "", k).toMatch(/^screened on x86-64/);
    }
  });
});

describe("missing tools", () => {
  it("name the Debian package of each missing tool, one line per target", () => {
    const path = process.env.PATH;
    process.env.PATH = "";
    try {
      const lines = missingLines(["x86-64", "armhf", "riscv64", "cortex-m4f"]);
      expect(lines).toHaveLength(4);
      expect(lines[0]).toMatch(/^x86-64: .*apt-get install .*\bqemu-user\b/);
      expect(lines[1]).toMatch(/gcc-arm-linux-gnueabihf/);
      expect(lines[2]).toMatch(/gcc-riscv64-linux-gnu/);
      expect(lines[3]).toMatch(/gcc-arm-none-eabi.*qemu-system-arm|qemu-system-arm.*gcc-arm-none-eabi/);
    } finally {
      process.env.PATH = path;
    }
  });
  it("an unknown target is bad usage", async () => {
    expect(await main(["count", "--targets", "x86_64"])).toBe(2);
  });
});

describe.skipIf(missing.length > 0)("counts on x86-64 (short slice: kepler_elliptic, f64)", () => {
  it("are identical run to run, and equal callgrind's on the same binary", async () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-count-"));
    try {
      const once = () => countAll(["x86-64"], [{ key: "f64", wasm: BUILD_FILES.f64 }], { kernels: ["kepler_elliptic"], dir, jobs: 1 });
      const a = await once();
      const b = await once();
      expect(a.notes).toEqual([]);
      const ka = a.targets["x86-64"]!.f64!.kepler_elliptic!;
      expect(b.targets["x86-64"]!.f64!.kepler_elliptic).toEqual(ka);
      expect(ka.typical).toBeGreaterThan(100);
      // The worst inputs (a reduction of whole turns before the solve) take more than the typical ones.
      expect(ka.worst).toBeGreaterThan(ka.typical);
      // The classes of the plugin (by the disassembled mnemonic) add up to the count (tests/bench-plumbing.test.ts
      // checks the fdiv class against the instrumented build's divisions and square roots).
      expect(INSN_CLASSES.reduce((s, c) => s + ka.typical_classes[c], 0)).toBe(ka.typical);
      expect(INSN_CLASSES.reduce((s, c) => s + ka.worst_classes[c], 0)).toBe(ka.worst);
      if (noValgrind) return;
      const image = join(dir, "f64", "x86-64", "kepler_elliptic.elf");
      const refs = async (n: number): Promise<number> => {
        const r = await run("valgrind", ["--tool=callgrind", "--callgrind-out-file=/dev/null", image, "0", String(n).padStart(7, "0")], { env: {} });
        return Number(/I\s+refs:\s+([\d,]+)/.exec(r.stderr)![1]!.replaceAll(",", ""));
      };
      expect(((await refs(N_HIGH)) - (await refs(N_LOW))) / (N_HIGH - N_LOW)).toBe(ka.typical);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
