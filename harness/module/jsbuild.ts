/**
 * The host-JS build: the SAME assembly/*.ts sources, made runnable as JavaScript on the host's Math. Nothing is
 * rewritten by hand. Each kernel file goes through the TypeScript compiler's `transpileModule` (types erased,
 * CommonJS output) with one mechanical transform:
 *  - a conversion written as a type assertion (`<i32>x`, `x as u32`, `<real>y`) becomes a call of the matching
 *    portable conversion (`i32(x)` truncates like the WebAssembly instruction; `f64`/`real` are the identity);
 *  - a builtin whose meaning depends on its type argument (`load<real>`, `store<f32>`, `sizeof<real>`,
 *    `alignof`, `reinterpret`) gets the type name as a first argument.
 * The AssemblyScript builtins the kernels use (abs, min, max, sqrt, floor, nearest, copysign, isFinite,
 * memory.data, load/store, RMath, ...) come from the shim in `jsshim.ts`; RMath is the host Math.
 *
 * What differs from the WebAssembly build, by design: the host's sin, cos, exp, ... (V8's, within an ULP or so of
 * the AssemblyScript library compiled into the module) and integer arithmetic in doubles (no 32-bit wrap-around,
 * `/` on integers is not truncated). 64-bit integer tricks (reinterpret to u64) give BigInt values and fail loudly
 * where they mix with numbers. `real` is always f64 here.
 */
import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { createRequire } from "node:module";
import type * as TS from "typescript";
import { ROOT } from "../core/paths.js";
import { ModuleError, type Kernels } from "./load.js";
import { makeShim, CONVERSIONS, TYPED_BUILTINS, type Shim } from "./jsshim.js";

const ASSEMBLY_DIR = join(ROOT, "assembly");

let tsLib: typeof TS | undefined;
function typescript(): typeof TS {
  if (!tsLib) {
    try {
      tsLib = createRequire(import.meta.url)("typescript") as typeof TS;
    } catch {
      throw new ModuleError("the js build needs the 'typescript' package (a dev dependency): run 'npm install'");
    }
  }
  return tsLib;
}

/** The transform described in the file header, as a TypeScript `before` transformer. */
function asTransform(ts: typeof TS): TS.TransformerFactory<TS.SourceFile> {
  return (ctx) => {
    const f = ctx.factory;
    const shimMember = (group: string, name: string): TS.Expression =>
      f.createPropertyAccessExpression(f.createPropertyAccessExpression(f.createIdentifier("__shim"), group), name);
    const typeName = (t: TS.TypeNode): string | undefined =>
      ts.isTypeReferenceNode(t) && ts.isIdentifier(t.typeName) ? t.typeName.text : t.kind === ts.SyntaxKind.BooleanKeyword ? "bool" : undefined;
    const visit = (node: TS.Node): TS.Node => {
      if (ts.isTypeAssertionExpression(node) || ts.isAsExpression(node)) {
        const name = typeName(node.type);
        const inner = ts.visitNode(node.expression, visit) as TS.Expression;
        if (name !== undefined && CONVERSIONS.has(name)) return f.createCallExpression(shimMember("conv", name), undefined, [inner]);
        return f.createParenthesizedExpression(inner);
      }
      if (ts.isCallExpression(node) && node.typeArguments && node.typeArguments.length > 0 && ts.isIdentifier(node.expression) && TYPED_BUILTINS.has(node.expression.text)) {
        const tname = typeName(node.typeArguments[0]!) ?? "unknown";
        const args = node.arguments.map((a) => ts.visitNode(a, visit) as TS.Expression);
        return f.createCallExpression(shimMember("typed", node.expression.text), undefined, [f.createStringLiteral(tname), ...args]);
      }
      return ts.visitEachChild(node, visit, ctx);
    };
    return (sf) => ts.visitNode(sf, visit) as TS.SourceFile;
  };
}

/** Names declared at the top level of a source file (imports, functions, variables, classes, enums). */
function topLevelNames(ts: typeof TS, sf: TS.SourceFile): Set<string> {
  const names = new Set<string>();
  for (const st of sf.statements) {
    if (ts.isImportDeclaration(st)) {
      const b = st.importClause;
      if (b?.name) names.add(b.name.text);
      const nb = b?.namedBindings;
      if (nb && ts.isNamedImports(nb)) for (const el of nb.elements) names.add(el.name.text);
      if (nb && ts.isNamespaceImport(nb)) names.add(nb.name.text);
    } else if ((ts.isFunctionDeclaration(st) || ts.isClassDeclaration(st) || ts.isEnumDeclaration(st)) && st.name) {
      names.add(st.name.text);
    } else if (ts.isVariableStatement(st)) {
      for (const d of st.declarationList.declarations) if (ts.isIdentifier(d.name)) names.add(d.name.text);
    }
  }
  return names;
}

interface Compiled {
  readonly code: string;
}

const compiledCache = new Map<string, Compiled>();

/** Transpile one assembly file to a CommonJS function body (cached by content). */
function compileFile(file: string, globalNames: readonly string[]): Compiled {
  const src = readFileSync(join(ASSEMBLY_DIR, file), "utf8");
  const key = `${file}\0${src}`;
  const hit = compiledCache.get(key);
  if (hit) return hit;
  const ts = typescript();
  const sf = ts.createSourceFile(file, src, ts.ScriptTarget.ES2022, true);
  const declared = topLevelNames(ts, sf);
  const out = ts.transpileModule(src, {
    fileName: file,
    compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2022, removeComments: true },
    transformers: { before: [asTransform(ts)] },
  });
  const free = globalNames.filter((n) => !declared.has(n));
  const prelude = free.length ? `const { ${free.join(", ")} } = __shim.globals;\n` : "";
  const code = `"use strict";\n${prelude}${out.outputText.replace(/^"use strict";\n/, "")}`;
  const c = { code };
  compiledCache.set(key, c);
  return c;
}

/** The kernel source files, as module names (`io`, `kepler_elliptic`, ...). */
export function assemblyModules(): string[] {
  return readdirSync(ASSEMBLY_DIR).filter((f) => f.endsWith(".ts") && !f.endsWith(".d.ts")).map((f) => f.slice(0, -3)).sort();
}

/** Load one assembly file (and what it imports) as JavaScript in a fresh memory; returns its exports. */
export function loadJsModule(name: string, label = "js"): { exports: Record<string, unknown>; memory: WebAssembly.Memory } {
  const memory = new WebAssembly.Memory({ initial: 1, maximum: 1 });
  const shim: Shim = makeShim(memory);
  const globalNames = Object.keys(shim.globals);
  const known = new Set(assemblyModules());
  const cache = new Map<string, { exports: Record<string, unknown> }>();
  const requireFrom = (spec: string): Record<string, unknown> => {
    const name = spec.replace(/^\.\//, "").replace(/\.(ts|js)$/, "");
    if (!spec.startsWith("./") || !known.has(name)) throw new ModuleError(`${label}: assembly module imports '${spec}', which is not a file in assembly/`);
    const done = cache.get(name);
    if (done) return done.exports;
    const mod = { exports: {} as Record<string, unknown> };
    cache.set(name, mod);
    const { code } = compileFile(`${name}.ts`, globalNames);
    try {
      // eslint-disable-next-line @typescript-eslint/no-implied-eval
      new Function("exports", "require", "module", "__shim", code)(mod.exports, requireFrom, mod, shim);
    } catch (err) {
      throw new ModuleError(`${label}: assembly/${name}.ts does not run as JavaScript: ${(err as Error).message}`);
    }
    return mod.exports;
  };
  return { exports: requireFrom(`./${name}`), memory };
}

/** A fresh instance of the JS build: its own memory and module state. `entry` defaults to index (every export). */
export function loadJsBuild(label = "js", entry = "index"): Kernels {
  const { exports: ex, memory } = loadJsModule(entry, label);
  const fns = new Map<string, (...a: number[]) => number>();
  for (const k of Object.keys(ex)) {
    const v = ex[k];
    if (typeof v === "function") fns.set(k, v as (...a: number[]) => number);
  }
  const realBytesFn = fns.get("areal_real_bytes");
  const outFn = fns.get("areal_out");
  if (!realBytesFn || !outFn) throw new ModuleError(`${label}: assembly/${entry}.ts exports no areal_out/areal_real_bytes`);
  const realBytes = realBytesFn();
  if (realBytes !== 8) throw new ModuleError(`${label}: the js build runs reals as f64, but areal_real_bytes() gave ${realBytes}`);
  const base = outFn();
  const out = new Float64Array(memory.buffer, base, 64);
  return {
    label,
    realBytes: 8,
    exportNames: [...fns.keys()],
    out,
    memory,
    exports: ex as unknown as WebAssembly.Exports,
    has: (name) => fns.has(name),
    arity: (name) => fns.get(name)?.length ?? -1,
    call(name, args) {
      const fn = fns.get(name);
      if (!fn) throw new ModuleError(`${label}: no export named ${name}`);
      return fn(...args);
    },
  };
}

/** The transpiled JavaScript of one kernel file (for inspection: `areal` does not write it anywhere). */
export function jsSource(file: string): string {
  return compileFile(file, Object.keys(makeShim(new WebAssembly.Memory({ initial: 1, maximum: 1 })).globals)).code;
}
