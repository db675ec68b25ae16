// Build the C example both ways from one source: node examples/c-kepler/build.mjs [OUTDIR]
//   OUTDIR/c-kepler.wasm   clang --target=wasm32 -nostdlib, linked by wasm-ld: no imports, the ABI's exports
//   OUTDIR/libc-kepler.so  gcc (or $CC) -shared -fPIC
// Both with -O2 -ffp-contract=off (no fused multiply-adds: the two builds must give the same bits).
// Needs the Debian packages clang, lld (wasm-ld) and gcc. Exits 3 and names what is missing when one is absent.
import { execFileSync } from "node:child_process";
import { mkdirSync, statSync } from "node:fs";
import { delimiter, dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const here = dirname(fileURLToPath(import.meta.url));
const outDir = resolve(process.argv[2] ?? here);
const src = join(here, "kepler.c");
const FLAGS = ["-O2", "-std=c99", "-ffp-contract=off", "-Wall", "-Wextra"];
const EXPORTS = ["areal_out", "areal_real_bytes", "areal_abi_version", "kepler_elliptic", "kepler_parabolic"];

/** The first of these programs on PATH. */
export function onPath(names) {
  for (const dir of (process.env.PATH ?? "").split(delimiter)) {
    for (const n of names) {
      try {
        if (dir && statSync(join(dir, n)).isFile()) return join(dir, n);
      } catch {
        // not here
      }
    }
  }
  return undefined;
}

const clang = process.env.CLANG ?? onPath(["clang", "clang-16", "clang-15", "clang-14"]);
const wasmLd = onPath(["wasm-ld", "wasm-ld-16", "wasm-ld-15", "wasm-ld-14"]);
const cc = process.env.CC ?? onPath(["gcc", "cc"]);
const missing = [!clang && "clang", !wasmLd && "lld (wasm-ld)", !cc && "gcc"].filter(Boolean);
if (missing.length) {
  process.stderr.write(`c-kepler: missing ${missing.join(", ")}; install with: apt-get install clang lld gcc\n`);
  process.exit(3);
}
mkdirSync(outDir, { recursive: true });
const wasm = join(outDir, "c-kepler.wasm");
const so = join(outDir, "libc-kepler.so");
execFileSync(clang, [...FLAGS, "--target=wasm32", "-nostdlib", `-fuse-ld=${wasmLd}`, "-Wl,--no-entry",
  ...EXPORTS.map((e) => `-Wl,--export=${e}`), src, "-o", wasm], { stdio: "inherit" });
execFileSync(cc, [...FLAGS, "-shared", "-fPIC", src, "-o", so], { stdio: "inherit" });
process.stderr.write(`built ${wasm} and ${so}\n`);
