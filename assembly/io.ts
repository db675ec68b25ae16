// The fixed I/O region. Kernels take their inputs as scalar arguments and write their outputs here, as
// `real` values (f64 in the release build, f32 in the single-precision build), starting at slot 0.
// Nothing is allocated: the region is a static data segment laid out by the compiler.

import { OUT_SLOTS, ABI_VERSION } from "./abi";

const OUT: usize = memory.data(OUT_SLOTS * 8, 16);

/** Write output slot `i` (0 <= i < OUT_SLOTS; callers use constant indices). */
// @ts-ignore: decorator
@inline export function put(i: i32, v: real): void {
  assert(i >= 0 && i < OUT_SLOTS, "output slot out of range"); // debug build only
  store<real>(OUT + (<usize>i << alignof<real>()), v);
}

/** Read output slot `i` back (kernels that chain others use it). */
// @ts-ignore: decorator
@inline export function got(i: i32): real {
  return load<real>(OUT + (<usize>i << alignof<real>()));
}

/** Address of the output region in linear memory. */
export function areal_out(): usize {
  return OUT;
}

/** Size in bytes of one `real`: 8 for the release build, 4 for the single-precision build. */
export function areal_real_bytes(): i32 {
  return sizeof<real>();
}

/** Version of the ABI described in docs/abi.md. */
export function areal_abi_version(): i32 {
  return ABI_VERSION;
}
