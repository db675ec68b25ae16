// Entry of the bench-only "counting" build (asconfig.json target `counting`): every export of the release
// module, compiled with RMath = CountingMath (counting_math.ts), plus the counter access. scripts/build-bench.mjs
// then inserts the arithmetic counters into its text form. Not a kernel module for users. It is compiled without
// optimisation (asconfig.json) so that no library code is inlined into a kernel or moved across the depth marks of
// counting_math.ts: the counts are those of the operations the source writes.
export * from "./index";
export { count_reset, count_get } from "./counting_math";
