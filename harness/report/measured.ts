/**
 * Measurements the report shows when their files are given and says "not measured" otherwise: timings from
 * `areal bench --json FILE`, and instruction counts on target instruction sets from `areal count --json FILE`
 * ({ "targets": { TARGET: { BUILD: { KERNEL: { "typical": N, "worst": N, "worst_inputs": {...} } } } } }).
 * A file that is not of that shape is named with what was expected.
 */
import { existsSync, readFileSync } from "node:fs";
import { parseJsonText } from "../core/json.js";

export interface SpeedRow {
  readonly routine: string;
  readonly cases: number;
  readonly wasmNs?: number;
  readonly jsNs?: number;
  readonly note?: string;
}

export interface Speed {
  readonly date?: string;
  readonly host?: string;
  readonly rows: readonly SpeedRow[];
  readonly ratios: Readonly<Record<string, number>>;
}

export interface CountRow {
  readonly target: string;
  readonly build: string;
  readonly kernel: string;
  readonly typical: number;
  readonly worst: number;
  readonly worstInputs: string;
}

/** A measurement file parsed, or the message saying why it cannot be read. */
function readJson(file: string, what: string): { json: unknown } | string {
  if (!existsSync(file)) return `${file}: no such file (${what})`;
  try {
    return { json: parseJsonText(readFileSync(file, "utf8"), file, (m) => new Error(m)) };
  } catch (err) {
    return (err as Error).message;
  }
}

const isObj = (x: unknown): x is Record<string, unknown> => typeof x === "object" && x !== null && !Array.isArray(x);
const num = (x: unknown): number | undefined => (typeof x === "number" && Number.isFinite(x) ? x : undefined);

/** Timings from a bench JSON file; a string saying why when there is none or it is not one. */
export function readSpeed(file: string | undefined): Speed | string {
  if (file === undefined) return "not measured: run `areal bench --json FILE` and pass the file to the report (`--bench-json FILE`)";
  const got = readJson(file, "areal bench --json");
  if (typeof got === "string") return got;
  const j = got.json;
  if (!isObj(j) || !Array.isArray(j.kernels)) return `${file}: expected the output of \`areal bench --json\` (an object with a "kernels" array)`;
  const rows: SpeedRow[] = [];
  for (const [i, x] of (j.kernels as unknown[]).entries()) {
    if (!isObj(x) || typeof x.routine !== "string") return `${file}: kernels[${i}] has no "routine" name`;
    const wasmNs = num(x.wasmNs);
    const jsNs = num(x.jsNs);
    rows.push({ routine: x.routine, cases: num(x.cases) ?? 0, ...(wasmNs !== undefined ? { wasmNs } : {}), ...(jsNs !== undefined ? { jsNs } : {}), ...(typeof x.note === "string" ? { note: x.note } : {}) });
  }
  const ratios: Record<string, number> = {};
  if (isObj(j.ratios)) for (const [k, v] of Object.entries(j.ratios)) if (num(v) !== undefined) ratios[k] = v as number;
  const host = isObj(j.host) ? `${String(j.host.cpu ?? "")} (${String(j.host.cores ?? "?")} cores), Node ${String(j.host.node ?? "?")}` : undefined;
  return { rows, ratios, ...(typeof j.date === "string" ? { date: j.date } : {}), ...(host ? { host } : {}) };
}

/** Instruction counts from a count JSON file; a string saying why when there is none or it is not one. */
export function readCounts(file: string | undefined): CountRow[] | string {
  if (file === undefined) return "not measured: run `areal count --json FILE` (instruction counts on target instruction sets) and pass the file to the report (`--counts-json FILE`)";
  const got = readJson(file, "areal count --json");
  if (typeof got === "string") return got;
  const j = got.json;
  const shape = `expected { "targets": { TARGET: { BUILD: { KERNEL: { "typical": N, "worst": N, "worst_inputs": {...} } } } } }`;
  if (!isObj(j) || !isObj(j.targets)) return `${file}: no "targets" object; ${shape}`;
  const rows: CountRow[] = [];
  for (const [target, builds] of Object.entries(j.targets)) {
    if (!isObj(builds)) return `${file}: targets.${target} is not an object; ${shape}`;
    for (const [build, kernels] of Object.entries(builds)) {
      if (!isObj(kernels)) return `${file}: targets.${target}.${build} is not an object; ${shape}`;
      for (const [kernel, c] of Object.entries(kernels)) {
        const at = `targets.${target}.${build}.${kernel}`;
        if (!isObj(c) || num(c.typical) === undefined || num(c.worst) === undefined) return `${file}: ${at} needs numbers "typical" and "worst"`;
        const wi = isObj(c.worst_inputs) ? Object.entries(c.worst_inputs).map(([a, b]) => `${a}=${String(b)}`).join(", ") : "";
        rows.push({ target, build, kernel, typical: c.typical as number, worst: c.worst as number, worstInputs: wi });
      }
    }
  }
  return rows.length > 0 ? rows : `${file}: no kernel counted`;
}
