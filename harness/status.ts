/** Status codes of the kernels (assembly/status.ts holds the same table; docs/abi.md documents it). */

export const STATUS_WORDS: Readonly<Record<number, string>> = {
  0: "ok",
  1: "ok-circular",
  2: "ok-equatorial",
  3: "ok-circular-equatorial",
  16: "nonfinite-input",
  17: "out-of-domain",
  18: "not-converged",
  19: "degenerate",
  20: "no-solution",
  21: "overflow",
  22: "unreachable",
};

/** First failure code: statuses below it are successes. */
export const FIRST_ERROR = 16;

/** The word for a status code (`status-N` for a code not in the table). */
export function statusWord(code: number): string {
  return STATUS_WORDS[code] ?? `status-${code}`;
}

/** The code for a status word, or undefined. */
export function statusCode(word: string): number | undefined {
  for (const [k, v] of Object.entries(STATUS_WORDS)) if (v === word) return Number(k);
  return undefined;
}

/** True for the success codes. */
export function isOk(code: number): boolean {
  return code >= 0 && code < FIRST_ERROR;
}
