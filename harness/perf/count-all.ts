/**
 * `areal count` over targets, builds and kernels (the steps are in count.ts): builds the plugin, translates each
 * module once, compiles it once per target, then links and counts one driver per kernel, two at a time.
 */
import { execFile } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { promisify } from "node:util";
import { COUNT_DIR, buildObjects, buildPlugin, driverSource, linkDriver, perCall, readCountInputs, translate, worstFor, type CountCase, type InsnClass, type KernelInputs, type Signature } from "./count.js";
import { TARGET_SPECS, missingPackages, versionOf, type TargetName } from "./toolchain.js";
import { table } from "../core/text.js";

const run = promisify(execFile);

export interface KernelCount {
  readonly typical: number;
  readonly worst: number;
  readonly worst_inputs: Record<string, unknown>;
  /** The typical and the worst call's instructions by class (count/insn-plugin.c): fdiv, fp, mem, branch, int. */
  readonly typical_classes: Record<InsnClass, number>;
  readonly worst_classes: Record<InsnClass, number>;
}
/** Image bytes a kernel adds on cortex-m4f (arm-none-eabi-size: text holds code and read-only data). */
export interface KernelSize {
  readonly text: number;
  readonly data: number;
  readonly bss: number;
}
export interface CountBuild {
  /** The key in the JSON: f64, f32, debug, or the module's file name. */
  readonly key: string;
  readonly wasm: string;
}
export interface CountResult {
  readonly targets: Record<string, Record<string, Record<string, KernelCount>>>;
  /** build -> kernel -> bytes over the image that calls no kernel; "(base)" is that image itself. */
  readonly sizes: Record<string, Record<string, KernelSize>>;
  readonly notes: string[];
  readonly tools: Record<string, string>;
}

/** Run tasks with at most `limit` at once (the machine's cores), in order of completion. */
async function pool<T>(tasks: readonly (() => Promise<T>)[], limit: number): Promise<T[]> {
  const out: T[] = new Array(tasks.length);
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < tasks.length) {
      const i = next++;
      out[i] = await tasks[i]!();
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, tasks.length) }, worker));
  return out;
}

function worstInputs(w: CountCase): Record<string, unknown> {
  return w.setup ? { ...w.args, [w.setup.export]: w.setup.args } : { ...w.args };
}

async function sizeOf(image: string): Promise<KernelSize> {
  const { stdout } = await run("arm-none-eabi-size", [image]);
  const [text, data, bss] = stdout.split("\n")[1]!.trim().split(/\s+/).map(Number);
  return { text: text!, data: data!, bss: bss! };
}

/** Count every kernel of one build on one target. */
async function countTarget(target: TargetName, b: CountBuild, dir: string, sigs: Map<string, Signature>, kernels: readonly string[],
  inputs: Record<string, KernelInputs>, plugin: string, res: CountResult, jobs: number, log: (s: string) => void): Promise<void> {
  const tdir = join(dir, target);
  mkdirSync(tdir, { recursive: true });
  const objs = await buildObjects(target, dir, "module");
  const per: Record<string, KernelCount> = {};
  const sizes: Record<string, KernelSize> = {};
  const image = async (name: string, k?: string): Promise<string> => {
    const c = join(tdir, `drv_${name}.c`);
    writeFileSync(c, driverSource("module.h", sigs, k, k ? [inputs[k]!.typical, worstFor(inputs[k]!, sigs.get(k))] : []));
    const img = join(tdir, `${name}.elf`);
    await linkDriver(target, dir, c, objs, img);
    return img;
  };
  const base = target === "cortex-m4f" ? await sizeOf(await image("none")) : undefined;
  if (base) sizes["(base)"] = base;
  const countKernel = async (k: string): Promise<void> => {
    const img = await image(k, k);
    const stateful = inputs[k]!.typical.setup !== undefined;
    const t = await perCall(target, img, 0, plugin, stateful);
    const w = await perCall(target, img, 1, plugin, stateful);
    for (const [which, r] of [["typical", t], ["worst", w]] as const) {
      if (r.status >= 16) res.notes.push(`${target} ${b.key} ${k}: the ${which} inputs return status ${r.status}${r.status === 99 ? " (its setup call failed)" : ""}`);
    }
    // The worst inputs were screened on x86-64 with the f64 build; where the typical ones cost more on this target
    // and build, they are this target's worst of the two, said in a note.
    const screened = w.insns >= t.insns;
    if (!screened) res.notes.push(`${target} ${b.key} ${k}: the typical inputs cost more here than the worst screened on x86-64 f64 (${t.insns} > ${w.insns}); worst is the typical count`);
    per[k] = { typical: t.insns, worst: screened ? w.insns : t.insns, worst_inputs: worstInputs(screened ? worstFor(inputs[k]!, sigs.get(k)) : inputs[k]!.typical),
      typical_classes: t.classes, worst_classes: screened ? w.classes : t.classes };
    if (base) {
      const s = await sizeOf(img);
      sizes[k] = { text: s.text - base.text, data: s.data - base.data, bss: s.bss - base.bss };
    }
    log(`${target} ${b.key} ${k}: typical ${t.insns}, worst ${w.insns}`);
  };
  await pool(kernels.map((k) => async () => {
    try {
      await countKernel(k);
    } catch (err) {
      res.notes.push(`${target} ${b.key} ${k}: not counted: ${((err as Error).message ?? String(err)).split("\n").slice(0, 3).join(" ")}`);
    }
  }), jobs);
  (res.targets[target] ??= {})[b.key] = Object.fromEntries(kernels.filter((k) => per[k]).map((k) => [k, per[k]!]));
  if (base) res.sizes[b.key] = sizes;
}

/** Count the builds on the targets that have their tools; missing tools give one note per target. */
export async function countAll(targets: readonly TargetName[], builds: readonly CountBuild[], opts: { jobs?: number; kernels?: readonly string[]; dir?: string; log?: (s: string) => void } = {}): Promise<CountResult> {
  const log = opts.log ?? (() => {});
  const res: CountResult = { targets: {}, sizes: {}, notes: [], tools: {} };
  const usable = targets.filter((t) => {
    const m = missingPackages(t);
    if (m.length) res.notes.push(`${t}: not counted, missing tools; on Debian: apt-get install ${m.join(" ")}`);
    return m.length === 0;
  });
  if (usable.length === 0) return res;
  res.tools.wasm2c = `wasm2c ${versionOf("wasm2c")}`;
  for (const t of usable) res.tools[t] = `${versionOf(TARGET_SPECS[t].cc)}; ${versionOf(TARGET_SPECS[t].command("", [], "")[0]!)}`;
  const plugin = await buildPlugin(opts.dir);
  const inputs = readCountInputs();
  for (const b of builds) {
    const dir = join(opts.dir ?? COUNT_DIR, b.key.replace(/[^\w.-]/g, "_"));
    const sigs = await translate(b.wasm, dir, "module");
    const wanted = opts.kernels ?? Object.keys(inputs);
    const kernels = wanted.filter((k) => {
      if (!inputs[k]) throw new Error(`count: no inputs for ${k} in vectors/count-inputs.json`);
      if (sigs.has(k)) return true;
      res.notes.push(`${b.key}: no export ${k} (with an i32 result): not counted`);
      return false;
    });
    for (const t of usable) await countTarget(t, b, dir, sigs, kernels, inputs, plugin, res, opts.jobs ?? 2, log);
  }
  return res;
}

/** The JSON of `--json`: { targets: { TARGET: { BUILD: { KERNEL: { typical, worst, worst_inputs } } } } }. */
export function countJson(r: CountResult): object {
  return { targets: r.targets };
}

/** The text report: one table per build, kernels down, targets across (typical / worst), sizes on cortex-m4f. */
export function formatCount(r: CountResult): string {
  const o: string[] = [];
  const builds = [...new Set(Object.values(r.targets).flatMap((b) => Object.keys(b)))];
  const targets = Object.keys(r.targets);
  for (const b of builds) {
    const kernels = [...new Set(targets.flatMap((t) => Object.keys(r.targets[t]![b] ?? {})))];
    const sz = r.sizes[b];
    const head = ["kernel", ...targets.map((t) => `${t} typical/worst`), ...(sz ? ["cortex-m4f code+rodata B"] : [])];
    const rows = kernels.map((k) => [k, ...targets.map((t) => {
      const c = r.targets[t]![b]?.[k];
      return c ? `${c.typical} / ${c.worst}` : "-";
    }), ...(sz ? [sz[k] ? String(sz[k]!.text) : "-"] : [])]);
    const numeric = new Set(head.map((_, i) => i).filter((i) => i > 0));
    o.push(`instructions per call, build ${b}`, ...table(head, rows, numeric));
    if (sz?.["(base)"]) o.push(`(cortex-m4f image that instantiates the ${b} module and calls nothing: text ${sz["(base)"].text} B, data ${sz["(base)"].data} B, bss ${sz["(base)"].bss} B)`);
    o.push("");
  }
  for (const [k, v] of Object.entries(r.tools)) o.push(`${k}: ${v}`);
  o.push(...r.notes);
  return o.join("\n") + "\n";
}
