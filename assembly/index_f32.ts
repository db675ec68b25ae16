// Entry of the single-precision build (asconfig.json target `single`, `--use real=f32 --use RMath=ArealMathf`):
// every export of the release module, compiled with this project's float-only math (mathf.ts) as RMath, so that
// the f32 module holds no f64 operation.
import "./mathf";
export * from "./index";
