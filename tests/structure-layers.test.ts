/**
 * The harness is in layers, imports only downward: core <- module <- verify <- run <- perf <- report <- cli
 * (DEVELOPERS.md). This test reads every import of harness/ (static, and dynamic `import("...")` with a literal)
 * and fails on an import into a higher layer, on a cycle between files, on more than 10 files directly in
 * harness/, and on shipped code importing test support.
 */
import { describe, it, expect } from "vitest";
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, dirname, posix } from "node:path";
import { ROOT } from "../harness/core/paths.js";

export const LAYERS = ["core", "module", "verify", "run", "perf", "report", "cli"] as const;

function walk(dir: string): string[] {
  const out: string[] = [];
  for (const n of readdirSync(dir)) {
    const p = join(dir, n);
    if (statSync(p).isDirectory()) out.push(...walk(p));
    else if (p.endsWith(".ts")) out.push(p);
  }
  return out;
}

/** Relative imports of a source text, resolved to project paths (".js" read as the ".ts" source). */
export function importsOf(file: string, text: string): string[] {
  const found: string[] = [];
  const re = /(?:^|[\s;])(?:import|export)\s[^;]*?from\s*["'](\.{1,2}\/[^"']+)["']|import\(\s*["'](\.{1,2}\/[^"']+)["']\s*\)/gm;
  for (const m of text.matchAll(re)) {
    const spec = m[1] ?? m[2]!;
    found.push(posix.normalize(posix.join(posix.dirname(file), spec)).replace(/\.js$/, ".ts"));
  }
  return found;
}

/** The layer index of a harness path, or -1 outside the layers. */
export function layerOf(path: string): number {
  const m = /^harness\/([^/]+)\//.exec(path);
  return m ? LAYERS.indexOf(m[1] as (typeof LAYERS)[number]) : -1;
}

/** Violations of the layering in a graph { file: imports }. */
export function layerViolations(graph: ReadonlyMap<string, readonly string[]>): string[] {
  const bad: string[] = [];
  for (const [f, deps] of graph) {
    for (const d of deps) {
      if (d.startsWith("tests/")) bad.push(`${f} imports test support ${d}`);
      const lf = layerOf(f);
      const ld = layerOf(d);
      if (lf >= 0 && ld > lf) bad.push(`${f} (${LAYERS[lf]}) imports ${d} (${LAYERS[ld]}), a higher layer`);
    }
  }
  return bad;
}

/** Cycles in a graph, each as a path of files. */
export function cycles(graph: ReadonlyMap<string, readonly string[]>): string[][] {
  const state = new Map<string, 1 | 2>();
  const found: string[][] = [];
  const stack: string[] = [];
  const visit = (f: string): void => {
    state.set(f, 1);
    stack.push(f);
    for (const d of graph.get(f) ?? []) {
      if (!graph.has(d)) continue;
      if (state.get(d) === 1) found.push([...stack.slice(stack.indexOf(d)), d]);
      else if (!state.has(d)) visit(d);
    }
    stack.pop();
    state.set(f, 2);
  };
  for (const f of graph.keys()) if (!state.has(f)) visit(f);
  return found;
}

function harnessGraph(): Map<string, string[]> {
  const g = new Map<string, string[]>();
  for (const p of walk(join(ROOT, "harness"))) {
    const rel = relative(ROOT, p).split("\\").join("/");
    g.set(rel, importsOf(rel, readFileSync(p, "utf8")));
  }
  return g;
}

describe("harness layers", () => {
  const graph = harnessGraph();
  it("every file is in a layer folder, at most 10 directly in harness/", () => {
    const top = [...graph.keys()].filter((f) => dirname(f) === "harness");
    expect(top.length).toBeLessThanOrEqual(10);
    const outside = [...graph.keys()].filter((f) => layerOf(f) < 0 && dirname(f) !== "harness");
    expect(outside).toEqual([]);
  });
  it("imports only run downward, and shipped code imports no test support", () => {
    expect(layerViolations(graph)).toEqual([]);
  });
  it("no cycle between files", () => {
    expect(cycles(graph).map((c) => c.join(" -> "))).toEqual([]);
  });
  it("the checks catch an upward import and a cycle (hostile graphs)", () => {
    const up = new Map([["harness/core/csv.ts", ["harness/cli/main.ts"]], ["harness/cli/main.ts", []]]);
    expect(layerViolations(up)).toHaveLength(1);
    const loop = new Map([["harness/core/a.ts", ["harness/core/b.ts"]], ["harness/core/b.ts", ["harness/core/a.ts"]]]);
    expect(cycles(loop)).toHaveLength(1);
    expect(importsOf("harness/run/x.ts", 'import { a } from "../core/a.js";\nconst m = await import("../cli/main.js");')).toEqual(["harness/core/a.ts", "harness/cli/main.ts"]);
  });
});
