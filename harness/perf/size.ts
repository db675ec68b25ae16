/**
 * The release module's size per export: for each exported function, the code bytes of every function it reaches
 * through calls (shared helpers counted in each export that reaches them) and of those only it reaches, plus the
 * module's code and static data. The call graph and the function names come from the text file the build writes
 * beside the module (build/areal.wat, asc --textFile); the body sizes from the binary's code section (read by
 * module/wasm-binary.ts).
 * Used by `areal bench` (the `sizes` field of --json).
 */
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { BUILD_DIR } from "../core/paths.js";
import { WasmReader } from "../module/wasm-binary.js";

export interface ExportSize {
  readonly name: string;
  /** Code bytes of every function the export reaches (itself included). */
  readonly reachedBytes: number;
  /** Code bytes of the functions no other export reaches. */
  readonly ownBytes: number;
  readonly functions: number;
}

export interface ModuleSizes {
  readonly file: string;
  readonly totalBytes: number;
  readonly codeBytes: number;
  readonly dataBytes: number;
  readonly exports: readonly ExportSize[];
}

/** Body sizes (bytes, size field included) of the code section, in function-index order; data section bytes. */
function sections(b: Uint8Array, label: string): { bodies: number[]; dataBytes: number; imports: boolean } {
  const r = new WasmReader(b, label);
  const bodies: number[] = [];
  let dataBytes = 0;
  let imports = false;
  for (const { id, start, end } of r.sections()) {
    if (id === 2) imports = true;
    if (id === 10) {
      r.pos = start;
      for (let n = r.u32(); n > 0; n--) {
        const p = r.pos;
        const len = r.u32();
        bodies.push(r.pos - p + len);
        r.pos += len;
      }
      if (r.pos !== end) r.fail("the code section's bodies do not fill it");
    }
    if (id === 11) dataBytes = end - start;
  }
  return { bodies, dataBytes, imports };
}

/** Sizes of the module at wasmFile (default: the release build) with its text file beside it. */
export function moduleSizes(wasmFile = join(BUILD_DIR, "areal.wasm")): ModuleSizes {
  const watFile = wasmFile.replace(/\.wasm$/, ".wat");
  if (!existsSync(watFile)) throw new Error(`${watFile} is missing: the build writes it beside the module (npm run build)`);
  const bin = new Uint8Array(readFileSync(wasmFile));
  const { bodies, dataBytes, imports } = sections(bin, wasmFile);
  if (imports) throw new Error(`${wasmFile} has imports: the size table assumes a module without any`);
  const wat = readFileSync(watFile, "utf8").split("\n");
  const names: string[] = [];
  const calls = new Map<string, Set<string>>();
  const exportsOf = new Map<string, string>();
  let current: string | undefined;
  for (const line of wat) {
    const fn = /^ \(func (\$\S+)/.exec(line);
    if (fn) {
      current = fn[1]!;
      names.push(current);
      calls.set(current, new Set());
      continue;
    }
    const ex = /^ \(export "([^"]+)" \(func (\$\S+)\)\)/.exec(line);
    if (ex) exportsOf.set(ex[1]!, ex[2]!);
    const call = /\bcall (\$\S+)/.exec(line);
    if (call && current) calls.get(current)!.add(call[1]!.replace(/\)+$/, ""));
  }
  if (names.length !== bodies.length) throw new Error(`${watFile} lists ${names.length} functions, ${wasmFile} has ${bodies.length}: rebuild`);
  const bytes = new Map(names.map((n, i) => [n, bodies[i]!]));
  const reach = (root: string): Set<string> => {
    const seen = new Set<string>([root]);
    const todo = [root];
    while (todo.length > 0) for (const c of calls.get(todo.pop()!) ?? []) if (!seen.has(c)) seen.add(c), todo.push(c);
    return seen;
  };
  const reached = new Map([...exportsOf].map(([e, f]) => [e, reach(f)]));
  const users = new Map<string, number>();
  for (const set of reached.values()) for (const f of set) users.set(f, (users.get(f) ?? 0) + 1);
  const sum = (fs: Iterable<string>): number => [...fs].reduce((a, f) => a + (bytes.get(f) ?? 0), 0);
  const exports = [...reached].map(([name, set]) => ({ name, reachedBytes: sum(set), ownBytes: sum([...set].filter((f) => users.get(f) === 1)), functions: set.size }));
  exports.sort((a, b) => b.reachedBytes - a.reachedBytes);
  return { file: wasmFile.slice(wasmFile.lastIndexOf("build")), totalBytes: bin.length, codeBytes: bodies.reduce((a, x) => a + x, 0), dataBytes, exports };
}
