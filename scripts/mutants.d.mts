// Types of scripts/mutants.mjs for the tests that use its scratch-copy helpers.
export declare const ROOT: string;
export declare const CATALOGUE: string;
export interface Mutant {
  readonly id: string;
  readonly file: string;
  readonly pattern: string;
  readonly replacement: string;
  readonly why: string;
  readonly tests: readonly string[];
  readonly targets?: readonly string[];
  readonly equivalent?: string;
  readonly slice?: boolean;
}
export type MutantVerdict = "caught" | "survived" | "equivalent" | "pattern-not-found" | "build-failed";
export interface MutantResult {
  readonly id: string;
  readonly verdict: MutantVerdict;
  readonly detail: string;
}
export declare function scratchCopy(root?: string): string;
export declare function removeScratch(dir: string): void;
export declare function applyPattern(dir: string, file: string, pattern: string, replacement: string): "applied" | "not-found" | "ambiguous";
export declare function runIn(cwd: string, cmd: string, args: readonly string[], timeoutMs?: number): Promise<{ code: number; out: string }>;
export declare function buildTargets(dir: string, targets: readonly string[]): Promise<{ code: number; out: string }>;
export declare function runMutant(m: Mutant, root?: string, keep?: boolean): Promise<MutantResult>;
export declare function readCatalogue(path?: string): Mutant[];
export declare function score(results: readonly MutantResult[]): { caught: number; survived: number; equivalent: number; notFound: number; buildFailed: number; text: string };
