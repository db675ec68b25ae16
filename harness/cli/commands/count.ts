/** `areal count`: exact instruction counts per kernel call on x86-64, armhf, riscv64 and cortex-m4f (QEMU). */
import { existsSync } from "node:fs";
import { basename } from "node:path";
import { writeAtomic } from "../../core/atomic.js";
import { BUILD_FILES } from "../../core/paths.js";
import { countAll, countJson, formatCount, type CountBuild } from "../../perf/count-all.js";
import { TARGETS, type TargetName } from "../../perf/toolchain.js";
import { modelCheck, formatModel } from "../../perf/count-model.js";
import { readProfile } from "../../perf/opcount.js";
import { EXAMPLE_PROFILE } from "../../perf/bench.js";
import { UsageError, unknownName, type Command } from "../options.js";

/** The modules to count: --module FILE, --build f64|f32|debug, or both f64 and f32. */
function buildsOf(values: Record<string, unknown>): CountBuild[] {
  const mod = values.module as string | undefined;
  const build = values.build as string | undefined;
  if (mod !== undefined) {
    if (build !== undefined) throw new UsageError("--module and --build exclude each other");
    if (!existsSync(mod)) throw new UsageError(`--module: no such file: ${mod}`);
    return [{ key: basename(mod), wasm: mod }];
  }
  const names = build === undefined ? ["f64", "f32"] : [build];
  return names.map((n) => {
    if (!(n in BUILD_FILES)) throw new UsageError(`--build: count takes a WebAssembly build (f64, f32, debug), not '${n}'`);
    const wasm = BUILD_FILES[n as keyof typeof BUILD_FILES];
    if (!existsSync(wasm)) throw new UsageError(`--build ${n}: ${wasm} is not built (npm run build)`);
    return { key: n, wasm };
  });
}

function targetsOf(v: string | undefined): TargetName[] {
  if (v === undefined) return [...TARGETS];
  return v.split(",").map((t) => {
    if (!(TARGETS as readonly string[]).includes(t)) throw unknownName("target", t, TARGETS);
    return t as TargetName;
  });
}

export const countCommand: Command = {
  summary: "exact instructions retired per kernel call (typical and worst inputs of vectors/count-inputs.json) on x86-64, armhf, riscv64 and cortex-m4f, under QEMU with areal's counting plugin; code size per kernel on cortex-m4f",
  options: ["targets", "build", "module", "json"],
  async run(_pos, values) {
    const targets = targetsOf(values.targets as string | undefined);
    const builds = buildsOf(values);
    const tty = process.stderr.isTTY;
    const r = await countAll(targets, builds, { log: (l) => void (tty ? process.stderr.write(`${l}\n`) : undefined) });
    process.stdout.write(formatCount(r));
    // The cost model of `bench` against the counts (needs the counting module: npm run build:bench).
    const profile = readProfile(EXAMPLE_PROFILE);
    const m = modelCheck(r, profile);
    if (m && m.rows.length) process.stdout.write(`\n${formatModel(m, profile.name)}`);
    else if (!m) process.stdout.write("\n(cost model check skipped: the counting module is not built; npm run build:bench)\n");
    if (values.json !== undefined) writeAtomic(values.json as string, JSON.stringify(countJson(r), null, 2) + "\n");
    return Object.keys(r.targets).length > 0 ? 0 : 1;
  },
};
