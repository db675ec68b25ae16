/** JSON input files with errors a person can find: the line and column of a syntax error, not a character offset. */

/** Line and column (1-based) of character `pos` of `text`. */
export function lineColumn(text: string, pos: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = text.indexOf("\n"); i >= 0 && i < pos; i = text.indexOf("\n", i + 1)) {
    line++;
    start = i + 1;
  }
  return { line, column: pos - start + 1 };
}

/**
 * JSON.parse's message for `text` with its place as `source:line:column` (V8 gives a character offset, or says the
 * input ended; a message with neither is kept as it is). Returns the parsed value or throws `make(message)`.
 */
export function parseJsonText(text: string, source: string, make: (message: string) => Error): unknown {
  try {
    return JSON.parse(text);
  } catch (err) {
    const msg = (err as Error).message;
    let pos: number | undefined;
    const at = / at position (\d+)/.exec(msg);
    if (at) pos = Number(at[1]);
    else if (/end of JSON input/.test(msg)) pos = text.length;
    // V8's excerpt of the text (', "..." is not valid JSON') may hold line ends: the place says enough.
    const reason = msg.replace(/ at position \d+/, "").replace(/, ".*"(?:\.\.\.)? is not valid JSON$/s, "");
    if (pos === undefined) throw make(`${source}: not valid JSON (${reason})`);
    const { line, column } = lineColumn(text, pos);
    throw make(`${source}:${line}:${column}: not valid JSON (${reason})`);
  }
}

