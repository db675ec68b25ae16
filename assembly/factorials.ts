// Reciprocal factorials 1/n!, n = 2 .. 27, rounded to the format (relative error at most 2^-53, or 2^-24 for
// f32, each): the one home of the series coefficients of the Stumpff functions (stumpff.ts) and of the
// odd-remainder series (series.ts). Bit patterns beside each: f64, then f32. The f64 values are the correctly
// rounded 1/n! (common practice; checked against exact rationals by tests/kernels-constants.test.ts).

export const F2: real = <real>0.5; // f64 0x3FE0000000000000, f32 0x3F000000
export const F3: real = <real>0.16666666666666666; // f64 0x3FC5555555555555, f32 0x3E2AAAAB
export const F4: real = <real>0.041666666666666664; // f64 0x3FA5555555555555, f32 0x3D2AAAAB
export const F5: real = <real>0.008333333333333333; // f64 0x3F81111111111111, f32 0x3C088889
export const F6: real = <real>0.001388888888888889; // f64 0x3F56C16C16C16C17, f32 0x3AB60B61
export const F7: real = <real>0.0001984126984126984; // f64 0x3F2A01A01A01A01A, f32 0x39500D01
export const F8: real = <real>2.48015873015873e-5; // f64 0x3EFA01A01A01A01A, f32 0x37D00D01
export const F9: real = <real>2.7557319223985893e-6; // f64 0x3EC71DE3A556C734, f32 0x3638EF1D
export const F10: real = <real>2.755731922398589e-7; // f64 0x3E927E4FB7789F5C, f32 0x3493F27E
export const F11: real = <real>2.505210838544172e-8; // f64 0x3E5AE64567F544E4, f32 0x32D7322B
export const F12: real = <real>2.08767569878681e-9; // f64 0x3E21EED8EFF8D898, f32 0x310F76C7
export const F13: real = <real>1.6059043836821613e-10; // f64 0x3DE6124613A86D09, f32 0x2F309231
export const F14: real = <real>1.1470745597729725e-11; // f64 0x3DA93974A8C07C9D, f32 0x2D49CBA5
export const F15: real = <real>7.647163731819816e-13; // f64 0x3D6AE7F3E733B81F, f32 0x2B573F9F
export const F16: real = <real>4.779477332387385e-14; // f64 0x3D2AE7F3E733B81F, f32 0x29573F9F
export const F17: real = <real>2.8114572543455206e-15; // f64 0x3CE952C77030AD4A, f32 0x274A963C
export const F18: real = <real>1.5619206968586225e-16; // f64 0x3CA6827863B97D97, f32 0x253413C3
export const F19: real = <real>8.22063524662433e-18; // f64 0x3C62F49B46814157, f32 0x2317A4DA
export const F20: real = <real>4.110317623312165e-19; // f64 0x3C1E542BA4020225, f32 0x20F2A15D
export const F21: real = <real>1.9572941063391263e-20; // f64 0x3BD71B8EF6DCF572, f32 0x1EB8DC78
export const F22: real = <real>8.896791392450574e-22; // f64 0x3B90CE396DB7F853, f32 0x1C8671CB
export const F23: real = <real>3.868170170630684e-23; // f64 0x3B4761B41316381A, f32 0x1A3B0DA1
export const F24: real = <real>1.6117375710961184e-24; // f64 0x3AFF2CF01972F578, f32 0x17F96781
export const F25: real = <real>6.446950284384474e-26; // f64 0x3AB3F3CCDD165FA9, f32 0x159F9E67
export const F26: real = <real>2.4795962632247976e-27; // f64 0x3A688E85FC6A4E5A, f32 0x13447430
export const F27: real = <real>9.183689863795546e-29; // f64 0x3A1D1AB1C2DCCEA3, f32 0x10E8D58E
