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
