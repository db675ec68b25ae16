// How each module of the build is compiled: the asc arguments of a kernel target of asconfig.json (release,
// single, debug; the single-precision build's entry, assembly/index_f32.ts, adds assembly/mathf.ts, its RMath)
// and of the harness's codec module (codec/asconfig.json: not a kernel module, not in the ABI table).
// One home for scripts/build.mjs and scripts/mutants.mjs (a mutant is rebuilt as the build builds it).

/** The kernel targets the build compiles, in order. */
export const KERNEL_TARGETS = ["release", "single", "debug"];
/** The name under which the codec module is built (not an asconfig.json target). */
export const CODEC_TARGET = "codec";

/** asc's arguments for a kernel target or the codec module. */
export function ascArgs(target) {
  if (target === CODEC_TARGET) return ["--config", "codec/asconfig.json", "--target", "release"];
  return [target === "single" ? "assembly/index_f32.ts" : "assembly/index.ts", "--target", target];
}
