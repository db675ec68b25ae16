/**
 * `npm run bench` (vitest bench, never part of `npm test`): per-call timings of every routine that has a vector
 * suite, release WebAssembly against the host-JS build, and the elliptic solver against its two baselines in
 * the bench-only module. `areal bench` gives the same figures with ratios, iteration and operation counts.
 */
import { describe, bench } from "vitest";
import { ROUTINES, slotsOf } from "../harness/module/routines.js";
import { loadBuild, loadFile, type Kernels } from "../harness/module/load.js";
import { loadNamedBuild } from "../harness/module/builds.js";
import { routineInputs, ensureBenchModules, BASELINE_FILE, domainCases, DOMAIN_CASES } from "../harness/perf/bench.js";

ensureBenchModules();
const wasm = loadBuild("f64");
let js: Kernels | undefined;
try {
  js = loadNamedBuild("js");
} catch {
  js = undefined; // the host-JS build is optional here: its rows are left out
}
const OPTS = { time: 300, warmupTime: 50 };

for (const r of ROUTINES) {
  const { rows } = routineInputs(r, wasm, 256);
  if (rows.length === 0) continue;
  describe(r.name, () => {
    const w = wasm.exports[r.exportName] as (...a: number[]) => number;
    bench(`wasm ${r.name} x${rows.length}`, () => {
      for (const a of rows) w(...a);
    }, OPTS);
    if (js?.has(r.exportName)) {
      const j = js.exports[r.exportName] as unknown as (...a: number[]) => number;
      bench(`js ${r.name} x${rows.length}`, () => {
        for (const a of rows) j(...a);
      }, OPTS);
    }
  });
}

describe("elliptic solver and baselines (loops in the bench module)", () => {
  const m = loadFile(BASELINE_FILE, "bench-baseline");
  const ex = m.exports as Record<string, (n: number) => number>;
  const mem = new Float64Array(m.memory.buffer, (m.exports.bench_inputs as () => number)(), 2 * DOMAIN_CASES);
  domainCases().forEach(([e, M], i) => {
    mem[2 * i] = e!;
    mem[2 * i + 1] = M!;
  });
  bench("kepler_elliptic", () => void ex.loop_elliptic!(DOMAIN_CASES), OPTS);
  bench("Newton from E = M", () => void ex.loop_newton!(DOMAIN_CASES), OPTS);
  bench("one sin + one cos", () => void ex.loop_sincos!(DOMAIN_CASES), OPTS);
  bench("one sincos fed by the previous one", () => void ex.loop_sincos_dep!(DOMAIN_CASES), OPTS);
  const roots = new Float64Array(m.memory.buffer, (m.exports.bench_roots as () => number)(), DOMAIN_CASES);
  domainCases().forEach(([e, M], i) => {
    wasm.call("kepler_elliptic", [e!, M!]);
    roots[i] = Math.abs(wasm.out[slotsOf("kepler_elliptic", "E").E]!); // |M| <= pi: the reduced root is |E|
  });
  bench("floor: reduction + one correction from a perfect starter", () => void ex.loop_floor!(DOMAIN_CASES), OPTS);
});
