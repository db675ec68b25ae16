/**
 * Helpers for the builds-* tests: a minimal WebAssembly binary encoder (enough for hand-made mutant modules
 * with chosen signatures), and the toolchain probes the native tests use to skip with a reason.
 */
import { execFileSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import { delimiter, join } from "node:path";
import { ROOT } from "../harness/core/paths.js";
import { nativeUnavailable } from "../harness/module/builds.js";
import { fileURLToPath } from "node:url";

const TYPE: Record<string, number> = { i32: 0x7f, i64: 0x7e, f32: 0x7d, f64: 0x7c };

function uleb(n: number): number[] {
  const out: number[] = [];
  do {
    let b = n & 0x7f;
    n >>>= 7;
    if (n !== 0) b |= 0x80;
    out.push(b);
  } while (n !== 0);
  return out;
}

function section(id: number, body: number[]): number[] {
  return [id, ...uleb(body.length), ...body];
}

function vec(items: number[][]): number[] {
  return [...uleb(items.length), ...items.flat()];
}

function name(s: string): number[] {
  const b = [...Buffer.from(s, "utf8")];
  return [...uleb(b.length), ...b];
}

export interface FuncDef {
  readonly name: string;
  readonly params: readonly string[];
  readonly results: readonly string[];
  /** Body instructions without the final `end` (opcodes as bytes). */
  readonly body: readonly number[];
}

/** A module with one page of memory exported as `memory` and the given exported functions. */
export function encodeModule(funcs: readonly FuncDef[]): Uint8Array<ArrayBuffer> {
  const types = funcs.map((f) => [0x60, ...vec(f.params.map((p) => [TYPE[p]!])), ...vec(f.results.map((r) => [TYPE[r]!]))]);
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
    ...section(1, vec(types)),
    ...section(3, vec(funcs.map((_, i) => uleb(i)))),
    ...section(5, vec([[0x01, 0x01, 0x01]])), // memory: min 1, max 1
    ...section(7, vec([...funcs.map((f, i) => [...name(f.name), 0x00, ...uleb(i)]), [...name("memory"), 0x02, 0x00]])),
    ...section(10, vec(funcs.map((f) => {
      const body = [0x00, ...f.body, 0x0b]; // no locals
      return [...uleb(body.length), ...body];
    }))),
  ];
  return new Uint8Array(bytes);
}

/** i32.const n (small non-negative n). */
export const i32const = (n: number): number[] => [0x41, ...sleb(n)];
function sleb(n: number): number[] {
  const out: number[] = [];
  for (;;) {
    const b = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (b & 0x40) === 0) || (n === -1 && (b & 0x40) !== 0)) {
      out.push(b);
      return out;
    }
    out.push(b | 0x80);
  }
}

/** The core exports every module needs (areal_out = 1024, 8-byte reals, ABI version 1). */
export const CORE: readonly FuncDef[] = [
  { name: "areal_out", params: [], results: ["i32"], body: i32const(1024) },
  { name: "areal_real_bytes", params: [], results: ["i32"], body: i32const(8) },
  { name: "areal_abi_version", params: [], results: ["i32"], body: i32const(1) },
];

export function onPath(exe: string): boolean {
  return (process.env.PATH ?? "").split(delimiter).some((d) => {
    try {
      return d !== "" && statSync(join(d, exe)).isFile();
    } catch {
      return false;
    }
  });
}

/** Why the native toolchain is absent (undefined when the npm package wasm2c and a C compiler are here). */
export function nativeToolchainMissing(): string | undefined {
  if (!existsSync(join(fileURLToPath(new URL("..", import.meta.url)), "node_modules", "wasm2c", "wasm2c.js"))) return "the npm package wasm2c is not installed (npm install)";
  if (!onPath("cc") && !onPath("gcc") && !onPath("clang") && !process.env.CC) return "no C compiler on PATH (apt-get install gcc)";
  return undefined;
}

/** CI sets AREAL_REQUIRE_NATIVE=1 so a missing toolchain fails instead of skipping. */
export const REQUIRE_NATIVE = process.env.AREAL_REQUIRE_NATIVE === "1";

/** Run a node script of the project synchronously; returns stdout. */
export function node(root: string, args: readonly string[], flags: readonly string[] = []): string {
  return execFileSync(process.execPath, [...flags, ...args], { cwd: root, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
}

export function exists(p: string): boolean {
  return existsSync(p);
}

/**
 * Make the native build current when the toolchain is here (translating and compiling it, as builds-native does);
 * otherwise the reason it cannot run. Every test that compares the native build calls this first, so whether it
 * runs does not depend on which test file ran before.
 */
export function prepareNative(): string | undefined {
  if (nativeUnavailable() === undefined) return undefined;
  const missing = nativeToolchainMissing();
  if (missing) return missing;
  execFileSync(process.execPath, [join(ROOT, "scripts", "build-native.mjs"), "--require"], { cwd: ROOT, stdio: "pipe" });
  return nativeUnavailable();
}
