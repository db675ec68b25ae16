// Types of scripts/gen-codec-tables.mjs for tests/codec.test.ts.
export declare const K_MIN: number;
export declare const K_MAX: number;
export declare const Q5_MIN: number;
export declare const Q5_MAX: number;
export declare function flog2pow10(e: number): number;
export declare function gOf(k: number): bigint;
export declare function pow5Of(q: number): bigint;
/** The text of codec/tables.ts. */
export declare function render(): string;
