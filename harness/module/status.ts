/** Status codes of the kernels, from the ABI table (abi/areal.abi.json; docs/abi.md documents it). */
import { ABI_TABLE } from "./abi-table.js";

export const STATUS_WORDS: Readonly<Record<number, string>> = Object.fromEntries(ABI_TABLE.statuses.map((s) => [s.code, s.word]));

/** First failure code: statuses below it are successes. */
export const FIRST_ERROR = ABI_TABLE.first_error;

/** The word for a status code (`status-N` for a code not in the table). */
export function statusWord(code: number): string {
  return STATUS_WORDS[code] ?? `status-${code}`;
}

/** The code for a status word, or undefined. */
export function statusCode(word: string): number | undefined {
  return ABI_TABLE.statuses.find((s) => s.word === word)?.code;
}

/** True for the success codes. */
export function isOk(code: number): boolean {
  return code >= 0 && code < FIRST_ERROR;
}

/** True for a code the ABI defines. */
export function isKnownStatus(code: number): boolean {
  return ABI_TABLE.statuses.some((s) => s.code === code);
}
