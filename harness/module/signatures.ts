/**
 * The module ABI (docs/abi.md) as the harness checks it. `readSignatures` parses a WebAssembly binary's type,
 * import, function and export sections to get the exact signature of every export (the JS API only gives a
 * function's arity, not its parameter types); `planModule` decides, suite by suite, whether a module can be
 * checked: all exports present with the ABI's signature (run), some missing (skipped, naming them), or a wrong
 * signature (rejected with a message naming the export, what it has and what the ABI asks for). The bytes are
 * read by wasm-binary.ts.
 */
import type { Routine, InputSpec } from "./routines.js";
import { findRoutine } from "./routines.js";
import { ABI_TABLE } from "./abi-table.js";
import { AbiError, WasmReader, type ValType } from "./wasm-binary.js";

export { AbiError, type ValType };

export interface Signature {
  readonly params: readonly ValType[];
  readonly results: readonly ValType[];
}

/** One export of a module. Non-function exports carry no signature. */
export interface ExportInfo {
  readonly kind: "function" | "table" | "memory" | "global" | "tag";
  readonly signature?: Signature;
}

/** The version of docs/abi.md this harness implements (`areal_abi_version()` must return it when exported). */
export const ABI_VERSION = ABI_TABLE.abi_version;
/** Number of output slots a module must provide at `areal_out()`. */
export const OUT_SLOTS = ABI_TABLE.out_slots;

const EXPORT_KINDS: readonly ExportInfo["kind"][] = ["function", "table", "memory", "global", "tag"];

/** Every export of a module with its kind and, for functions, its exact signature. */
export function readSignatures(bytes: Uint8Array, label = "module"): Map<string, ExportInfo> {
  const r = new WasmReader(bytes, label);
  const types: Signature[] = [];
  const funcTypes: number[] = []; // type index of every function, imported ones first
  const exports: { name: string; kind: number; index: number }[] = [];
  for (const { id, start, end } of r.sections()) {
    r.pos = start;
    if (id === 1) {
      const n = r.u32();
      for (let i = 0; i < n; i++) {
        const form = r.byte();
        if (form !== 0x60) r.fail(`type ${i} is not a function type (0x${form.toString(16)})`);
        const params: ValType[] = [];
        const results: ValType[] = [];
        for (let k = r.u32(); k > 0; k--) params.push(r.valType());
        for (let k = r.u32(); k > 0; k--) results.push(r.valType());
        types.push({ params, results });
      }
    } else if (id === 2) {
      const n = r.u32();
      for (let i = 0; i < n; i++) {
        r.name();
        r.name();
        const kind = r.byte();
        if (kind === 0) funcTypes.push(r.u32());
        else if (kind === 1) {
          r.byte();
          r.limits();
        } else if (kind === 2) r.limits();
        else if (kind === 3) {
          r.byte();
          r.byte();
        } else if (kind === 4) {
          r.byte();
          r.u32();
        } else r.fail(`unknown import kind ${kind}`);
      }
    } else if (id === 3) {
      const n = r.u32();
      for (let i = 0; i < n; i++) funcTypes.push(r.u32());
    } else if (id === 7) {
      const n = r.u32();
      for (let i = 0; i < n; i++) {
        const name = r.name();
        const kind = r.byte();
        exports.push({ name, kind, index: r.u32() });
      }
    }
    if (r.pos > end) r.fail(`section ${id} reads past its end`);
  }
  const out = new Map<string, ExportInfo>();
  for (const e of exports) {
    const kind = EXPORT_KINDS[e.kind];
    if (kind === undefined) throw new AbiError(`${label}: export ${e.name} has unknown kind ${e.kind}`);
    if (kind !== "function") {
      out.set(e.name, { kind });
      continue;
    }
    const t = funcTypes[e.index];
    const sig = t === undefined ? undefined : types[t];
    if (sig === undefined) throw new AbiError(`${label}: export ${e.name} refers to function ${e.index}, which has no type`);
    out.set(e.name, { kind, signature: sig });
  }
  return out;
}

/** `(f64, f64) -> i32` */
export function formatSignature(s: Signature): string {
  const res = s.results.length === 0 ? "()" : s.results.length === 1 ? s.results[0]! : `(${s.results.join(", ")})`;
  return `(${s.params.join(", ")}) -> ${res}`;
}

function sameSignature(a: Signature, b: Signature): boolean {
  return a.params.length === b.params.length && a.results.length === b.results.length &&
    a.params.every((p, i) => p === b.params[i]) && a.results.every((p, i) => p === b.results[i]);
}

/** The ABI type of one input: i32 for integers and enumerations, else the module's real type. */
export function paramType(input: InputSpec, real: "f64" | "f32"): ValType {
  return input.integer || input.choices ? "i32" : real;
}

/** The signature the ABI asks of a kernel export taking these inputs. */
export function kernelSignature(inputs: readonly InputSpec[], real: "f64" | "f32"): Signature {
  return { params: inputs.map((i) => paramType(i, real)), results: ["i32"] };
}

/** The fixed exports every module has (besides `memory`), with their signatures. */
export const CORE_EXPORTS: readonly { readonly name: string; readonly signature: Signature; readonly required: boolean }[] = [
  { name: "areal_out", signature: { params: [], results: ["i32"] }, required: true },
  { name: "areal_real_bytes", signature: { params: [], results: ["i32"] }, required: true },
  { name: "areal_abi_version", signature: { params: [], results: ["i32"] }, required: false },
];

/** Every kernel export the routine table knows: export name -> the routine and input set behind it. */
export function kernelExports(routines: readonly Routine[]): Map<string, { routine: Routine; inputs: readonly InputSpec[] }> {
  const m = new Map<string, { routine: Routine; inputs: readonly InputSpec[] }>();
  for (const r of routines) {
    m.set(r.exportName, { routine: r, inputs: r.inputs });
    for (const alt of r.alternatives ?? []) m.set(alt.exportName, { routine: r, inputs: alt.inputs });
  }
  return m;
}

/**
 * Check the core exports (memory, areal_out, areal_real_bytes, areal_abi_version when present).
 * Throws AbiError naming the export and both signatures on a mismatch.
 */
export function checkCore(sigs: ReadonlyMap<string, ExportInfo>, label: string): void {
  const mem = sigs.get("memory");
  if (!mem || mem.kind !== "memory") throw new AbiError(`${label}: the module exports no memory named 'memory' (docs/abi.md, "Module")`);
  for (const c of CORE_EXPORTS) {
    const e = sigs.get(c.name);
    if (!e) {
      if (c.required) throw new AbiError(`${label}: the module lacks ${c.name}: ${formatSignature(c.signature)} (docs/abi.md, "Module")`);
      continue;
    }
    if (e.kind !== "function" || !e.signature || !sameSignature(e.signature, c.signature)) {
      throw new AbiError(`${label}: export ${c.name} is ${e.signature ? formatSignature(e.signature) : `a ${e.kind}`}; the ABI needs ${formatSignature(c.signature)} (docs/abi.md, "Module")`);
    }
  }
}

/**
 * Check the core exports and every kernel export the routine table knows (whether or not a command uses it):
 * a wrong signature means the module and the harness disagree about the ABI. Every command that takes
 * `--module` calls this before any call, so the message is the same everywhere. Throws AbiError naming the
 * module, the export, what it has and what the ABI asks for.
 */
export function checkKernelSignatures(sigs: ReadonlyMap<string, ExportInfo>, realBytes: 4 | 8, routines: readonly Routine[], label: string): void {
  checkCore(sigs, label);
  const real = realBytes === 8 ? "f64" : "f32";
  for (const [name, { routine, inputs }] of kernelExports(routines)) {
    const e = sigs.get(name);
    if (!e) continue;
    const want = kernelSignature(inputs, real);
    if (e.kind !== "function" || !e.signature) {
      throw new AbiError(`${label}: export ${name} is a ${e.kind}; the ABI needs a function ${formatSignature(want)} (routine ${routine.name}, docs/abi.md)`);
    }
    if (!sameSignature(e.signature, want)) {
      const names = inputs.map((i) => `${i.name}: ${paramType(i, real)}`).join(", ");
      throw new AbiError(`${label}: export ${name} has signature ${formatSignature(e.signature)}; the ABI needs ${formatSignature(want)}, that is ${name}(${names}) -> status: i32 with ${real} reals (areal_real_bytes() = ${realBytes}; routine ${routine.name}, docs/abi.md)`);
    }
  }
}

/** What the plan needs of a suite (a VectorSpec has more). */
export interface SuiteRef {
  readonly suite: string;
  readonly routine: string;
}

export interface ModulePlan<S extends SuiteRef = SuiteRef> {
  readonly run: readonly S[];
  readonly skipped: readonly { readonly suite: string; readonly missing: readonly string[] }[];
}

/**
 * Decide which suites a module can run. A suite runs when its routine's export is present with the ABI's
 * signature for the module's real type; it is skipped (with the missing export named) when absent. Any kernel
 * export the routine table knows that has the wrong signature rejects the module (AbiError), whether or not a
 * suite uses it: a wrong signature means the module and the harness disagree about the ABI.
 */
export function planModule<S extends SuiteRef>(sigs: ReadonlyMap<string, ExportInfo>, realBytes: 4 | 8, specs: readonly S[], routines: readonly Routine[], label: string): ModulePlan<S> {
  checkKernelSignatures(sigs, realBytes, routines, label);
  const run: S[] = [];
  const skipped: { suite: string; missing: string[] }[] = [];
  for (const s of specs) {
    const routine = findRoutine(s.routine);
    const need = routine ? [routine.exportName] : [];
    const missing = need.filter((n) => !sigs.has(n));
    if (missing.length === 0) run.push(s);
    else skipped.push({ suite: s.suite, missing });
  }
  return { run, skipped };
}

/** One line per skipped suite, for the check output. */
export function skippedLines(plan: ModulePlan): string[] {
  return plan.skipped.map((s) => `skipped ${s.suite}: the module has no ${s.missing.join(", ")} (docs/abi.md)`);
}
