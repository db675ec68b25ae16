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

/** The codes the ABI defines. */
const KNOWN = new Set(ABI_TABLE.statuses.map((s) => s.code));

/**
 * What docs/abi.md forbids in one call's result, in words, or undefined when the result keeps the ABI: a
 * status code the ABI does not define; a success with a non-finite output among `outputs` (slot i is
 * outputs[i]); a success whose `iterations` output is not a whole number >= 0.
 */
export function abiViolation(status: number, out: ArrayLike<number>, outputs: readonly string[]): string | undefined {
  if (!KNOWN.has(status)) return `returned status ${status}, which the ABI does not define`;
  if (!isOk(status)) return undefined;
  for (let i = 0; i < outputs.length; i++) {
    const v = out[i]!;
    if (!Number.isFinite(v)) return `returned ${statusWord(status)} with output ${outputs[i]} = ${v}; a success has finite outputs`;
    if (outputs[i] === "iterations" && (!Number.isInteger(v) || v < 0)) return `returned ${statusWord(status)} with iterations = ${v}, not a whole number >= 0`;
  }
  return undefined;
}

/** The message of an ABI violation: the module, the call with its inputs, what was wrong. */
export function abiViolationMessage(label: string, exportName: string, args: readonly number[], what: string): string {
  return `${label}: ABI violation: ${exportName}(${args.join(", ")}) ${what} (docs/abi.md, "Kernel calls")`;
}
