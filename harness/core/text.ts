/** Text for a terminal: lines wrapped to a width (the command line keeps within 100 columns). */

/** `head` then `text` wrapped to `width` columns, continuation lines indented to the head's width. */
export function hang(head: string, text: string, width = 100): string[] {
  return wrap(text, width - head.length, "").map((l, i) => (i === 0 ? head : " ".repeat(head.length)) + l);
}

/** Wrap words to a width (the terminal output stays within 100 columns). */
export function wrap(text: string, width: number, indent: string): string[] {
  const out: string[] = [];
  let line = "";
  for (const w of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + w.length > width) {
      out.push(line);
      line = indent + w;
    } else line = line ? `${line} ${w}` : w;
  }
  if (line) out.push(line);
  return out;
}

/**
 * Rows of cells as aligned columns: the head, a rule of dashes, the rows; two spaces between columns, no trailing
 * blanks. Columns whose index is in `right` are right-aligned (numbers), the others left-aligned.
 */
export function table(head: readonly string[], rows: readonly (readonly string[])[], right: ReadonlySet<number> = new Set()): string[] {
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const cell = (c: string, i: number): string => (right.has(i) ? c.padStart(widths[i]!) : c.padEnd(widths[i]!));
  const line = (cells: readonly string[]): string => cells.map(cell).join("  ").trimEnd();
  return [line(head), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)];
}
