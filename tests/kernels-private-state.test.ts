/**
 * Kernels with private state only:
 *  1. no `export let` / `export var` anywhere in assembly/ (read from the sources): what one kernel needs from
 *     another goes through arguments, return values or a file's own documented scratch read by accessors. One
 *     named exception: the bench-only counting build's CountingMath.sincos_sin / sincos_cos (counting_math.ts),
 *     which mirror the standard library's NativeMath interface that RMath must offer (the reason is beside them);
 *     the counting build is never part of a shipped module; and the same pair in ArealMathf (mathf.ts), the
 *     f32 build's float-only RMath;
 *  2. no hidden coupling between kernels: every probe call gives the same status and the same bits in its
 *     documented output slots whether its routine runs first in a fresh module, after every other routine, before
 *     every other routine, or interleaved with them in a seeded random order (release, single-precision and
 *     host-JS builds). The probes are rows of the committed vector suites plus cases picked for the paths that
 *     keep state between helpers (dt = 0, a hairpin hyperbola anchored at periapsis, non-finite input).
 * The expected values here are the kernels' own results in another call order: the property under test is that
 * the order does not matter, so no outside reference enters. Each check is shown able to fail (mutants below).
 */
import { describe, it, expect } from "vitest";
import { readFileSync, readdirSync, existsSync } from "node:fs";
import { join } from "node:path";
import { ROOT } from "../harness/core/paths.js";
import { loadBuild, type Kernels } from "../harness/module/load.js";
import { loadJsBuild, loadJsModule } from "../harness/module/jsbuild.js";
import { SPECS } from "../harness/verify/specs/index.js";
import { readVectors, vectorPath } from "../harness/verify/vectors.js";
import { ROUTINES, findRoutine, slotsOf } from "../harness/module/routines.js";
import { Rng } from "../harness/core/rng.js";
import { toBits } from "../harness/core/float.js";

const ASSEMBLY = join(ROOT, "assembly");

/** Source text without comments (line and block), so that prose mentioning `export let` does not count. */
function stripComments(src: string): string {
  return src.replace(/\/\*[\s\S]*?\*\//g, "").replace(/\/\/.*$/gm, "");
}

/** Lines declaring an exported mutable variable (`export let`, `export var`, at any indentation). */
function exportedMutables(file: string, src: string): string[] {
  return stripComments(src).split("\n").flatMap((line, i) => (/^\s*export\s+(declare\s+)?(let|var)\b/.test(line) ? [`${file}:${i + 1}: ${line.trim()}`] : []));
}

/** The one allowed pair (see the file header), exactly as declared. */
const ALLOWED = new Set([
  "counting_math.ts: export let sincos_sin: f64 = 0;",
  "counting_math.ts: export let sincos_cos: f64 = 0;",
  // the same pair in the f32 build's RMath (mathf.ts, ArealMathf), for the same reason
  "mathf.ts: export let sincos_sin: f32 = 0;",
  "mathf.ts: export let sincos_cos: f32 = 0;",
]);

describe("no exported mutable variable in assembly/", () => {
  it("every assembly/*.ts source declares none (but the named mirror of NativeMath's sincos results)", () => {
    const files = readdirSync(ASSEMBLY).filter((f) => f.endsWith(".ts"));
    expect(files.length).toBeGreaterThan(15);
    const found = files.flatMap((f) => exportedMutables(f, readFileSync(join(ASSEMBLY, f), "utf8")));
    const other = found.filter((l) => !ALLOWED.has(l.replace(/:\d+:/, ":")));
    expect(other, other.join("\n")).toEqual([]);
    expect(found.length).toBe(ALLOWED.size); // the exception is still there, once each (else drop it from ALLOWED)
  });

  it("the scan can fail: it finds the forms it looks for and skips comments", () => {
    const src = "// export let a = 1\nexport let b: i32 = 0;\n  export var c = 2;\n/* export let d */\nlet e = 3;\nexport const f = 4;";
    expect(exportedMutables("x.ts", src)).toEqual(["x.ts:2: export let b: i32 = 0;", "x.ts:3: export var c = 2;"]);
  });
});

interface Probe {
  readonly exportName: string;
  readonly args: readonly number[];
  readonly outputs: number;
}

const PER_SUITE = 10;

/** Probes: a spread of rows from every vector suite, plus the cases named in the file header. */
function probes(): Probe[] {
  const out: Probe[] = [];
  for (const s of SPECS) {
    if (!existsSync(vectorPath(s.suite))) continue;
    const r = findRoutine(s.routine)!;
    const v = readVectors(vectorPath(s.suite));
    const cols = r.inputs.map((i) => v.columns.indexOf(i.name));
    const step = Math.max(1, Math.floor(v.values.length / PER_SUITE));
    for (let k = 0; k < v.values.length && k < step * PER_SUITE; k += step) {
      const row = v.values[k]!;
      const args = cols.map((c, i) => (c < 0 ? r.inputs[i]!.default : row[c]));
      if (args.every((a) => a !== undefined)) out.push({ exportName: r.exportName, args: args as number[], outputs: r.outputs.length });
    }
  }
  const mu = 398600.4418;
  const prop = findRoutine("propagate")!.outputs.length;
  // dt = 0: the solution must not keep the chi of an earlier call.
  out.push({ exportName: "propagate", args: [mu, 7000, 0, 0, 0, 7.5, 0, 0], outputs: prop });
  out.push({ exportName: "propagate", args: [mu, -8000, 3000, 100, 1.2, -6.1, 2.5, 0], outputs: prop });
  // A hyperbola coming in from far out along a nearly radial line and swinging past periapsis (step 7's anchor).
  out.push({ exportName: "propagate", args: [mu, -1e6, 7000, 0, 10, 0, 0, 1e5], outputs: prop });
  out.push({ exportName: "propagate", args: [mu, -3e5, 6800, 500, 6, 0.01, 0, 6e4], outputs: prop });
  // Gravity outside the plain window (the scaled path) and integrate with zonal terms.
  out.push({ exportName: "gravity_zonal", args: [mu, 1.08e-3, -2.5e-6, 6378, 1.7e308, 0, 0], outputs: 4 });
  out.push({ exportName: "integrate", args: [mu, 7000, 0, 0, 0, 7.5, 1, 10, 50, 3, 1.08e-3, -2.5e-6, 6378, 1e-9, 0, 0, 0], outputs: 28 });
  // Non-finite input for every routine: the failure paths must not leave anything behind either.
  for (const r of ROUTINES) out.push({ exportName: r.exportName, args: r.inputs.map(() => NaN), outputs: r.outputs.length });
  return out;
}

/** Status and the bits of the documented output slots (outputs only on success; failure slots are unspecified). */
function callBits(k: Kernels, p: Probe): string {
  const st = k.call(p.exportName, p.args);
  if (st >= 16) return `${st}`;
  return `${st}:${Array.from(k.out.slice(0, p.outputs), (x) => toBits(x).toString(16)).join(",")}`;
}

type Order = readonly number[];

/** Run the probes in the given order on one instance; results indexed by probe. */
function runOrder(k: Kernels, ps: readonly Probe[], order: Order): string[] {
  const res = new Array<string>(ps.length);
  for (const i of order) res[i] = callBits(k, ps[i]!);
  return res;
}

/** Indices grouped by export, groups in first-seen order (gravity_zonal, propagate, elements, ... follow SPECS). */
function grouped(ps: readonly Probe[]): number[][] {
  const by = new Map<string, number[]>();
  ps.forEach((p, i) => {
    const g = by.get(p.exportName) ?? [];
    g.push(i);
    by.set(p.exportName, g);
  });
  return [...by.values()];
}

function shuffled(n: number, seed: number): number[] {
  const rng = new Rng(seed);
  const a = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = rng.below(i + 1);
    [a[i], a[j]] = [a[j]!, a[i]!];
  }
  return a;
}

/** Differences between two result lists, named by probe. */
function differences(ps: readonly Probe[], a: readonly string[], b: readonly string[], label: string): string[] {
  return ps.flatMap((p, i) => (a[i] === b[i] ? [] : [`${label}: ${p.exportName}(${p.args.join(", ")}): ${a[i]} vs ${b[i]}`]));
}

/** Every routine group alone in a fresh instance, then the four orders on shared instances. */
function orderDifferences(fresh: () => Kernels, ps: readonly Probe[]): string[] {
  const groups = grouped(ps);
  const alone = new Array<string>(ps.length);
  for (const g of groups) {
    const k = fresh();
    for (const i of g) alone[i] = callBits(k, ps[i]!);
  }
  const forward = groups.flat();
  const backward = [...groups].reverse().flat();
  return [
    ...differences(ps, alone, runOrder(fresh(), ps, forward), "forward (each routine after the ones listed before it)"),
    ...differences(ps, alone, runOrder(fresh(), ps, backward), "reverse"),
    ...differences(ps, alone, runOrder(fresh(), ps, shuffled(ps.length, 14)), "shuffled, seed 14"),
    ...differences(ps, alone, runOrder(fresh(), ps, shuffled(ps.length, 2026)), "shuffled, seed 2026"),
  ];
}

describe("no hidden coupling between kernels: call order does not change any output bit", () => {
  const ps = probes();

  it("the probes cover every routine, the paths named in the header included", () => {
    const names = new Set(ps.map((p) => p.exportName));
    for (const r of ROUTINES) expect(names.has(r.exportName), r.exportName).toBe(true);
    expect(ps.length).toBeGreaterThan(250);
    // The two hyperbola probes do take step 7's periapsis anchor: asked of universal.ts itself (host-JS build of
    // the same source, where its module-level accessor is reachable).
    const u = loadJsModule("universal").exports as Record<string, (...a: number[]) => number>;
    const anchored = ps.filter((p) => p.exportName === "propagate" && p.args[1]! < -1e5).map((p) => {
      expect(u.solveUniversal!(...p.args)).toBe(0);
      return u.universalGet!(u.UV_ANCHORED as unknown as number);
    });
    expect(anchored).toEqual([1, 1]);
  });

  for (const [label, fresh] of [
    ["release (f64)", () => loadBuild("f64")],
    ["single precision (f32)", () => loadBuild("f32")],
    ["host-JS build", () => loadJsBuild("js")],
  ] as const) {
    it(`${label}: alone, forward, reverse and shuffled orders agree bit for bit`, () => {
      const d = orderDifferences(fresh, ps);
      expect(d, d.slice(0, 10).join("\n")).toEqual([]);
    });
  }

  it("the comparison can fail: a kernel whose output depends on the previous call is caught (mutant)", () => {
    // Wrap the release module so that propagate's rx carries a trace of the previous call's rx: its sign,
    // as a relative change of 2^-40 (a trace of fixed absolute size showed only after a call with a huge rx,
    // so whether an order caught it depended on where the shuffles put such calls).
    const RX = slotsOf("propagate", "rx").rx;
    const leaky = (): Kernels => {
      const k = loadBuild("f64");
      let last = 0;
      return {
        ...k,
        call(name: string, args: readonly number[]): number {
          const st = k.call(name, args);
          if (name === "propagate" && st < 16) k.out[RX] = k.out[RX]! * (1 + Math.sign(last) * 2 ** -40);
          last = k.out[RX]!;
          return st;
        },
      };
    };
    const d = orderDifferences(leaky, ps);
    expect(d.length).toBeGreaterThan(0);
  });
});
