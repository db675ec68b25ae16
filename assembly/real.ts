// Precision-dependent constants. `real` is a type alias set by the build (asconfig.json "use"):
// f64 in the release and debug builds, f32 in the single-precision build. Every threshold that
// depends on the format is chosen here, once, by `IS_F32`, and folded at compile time.

export const IS_F32: bool = sizeof<real>() == 4;

/** Unit roundoff times two (the spacing of reals at 1): 2^-52 or 2^-23. */
export const EPS: real = IS_F32 ? <real>1.1920928955078125e-7 : <real>2.220446049250313e-16;

/** Above this magnitude every real is an even integer (2^53 or 2^24): the ULP is at least 2. */
export const INTEGER_LIMIT: real = IS_F32 ? <real>16777216.0 : <real>9007199254740992.0;

/** pi rounded to the format. */
export const PI: real = IS_F32 ? <real>3.1415927410125732 : <real>3.141592653589793;
