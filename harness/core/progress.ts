/** The one progress display of the command line: a throttled line on stderr, drawn only on a terminal. */

/** True when a progress line may be drawn: stderr is a terminal and no CI variable is set. */
export function progressWanted(): boolean {
  return Boolean(process.stderr.isTTY) && !process.env.CI;
}

/** A throttled one-line progress display on stderr (at most ~4 updates a second); `end()` clears the line. */
export function progressLine(enabled: boolean): { update(text: string): void; end(): void } {
  let last = 0;
  let shown = false;
  return {
    update(text) {
      if (!enabled) return;
      const now = Date.now();
      if (now - last < 250) return;
      last = now;
      shown = true;
      process.stderr.write(`\r${text}\x1b[K`);
    },
    end() {
      if (shown) process.stderr.write("\r\x1b[K");
      shown = false;
    },
  };
}

/** A text bar for `done` of `total`: `[#####.....]  50% 5/10`. */
export function barText(done: number, total: number, width = 30): string {
  const pct = total === 0 ? 100 : Math.floor((100 * done) / total);
  const fill = Math.round((width * pct) / 100);
  return `[${"#".repeat(fill)}${".".repeat(width - fill)}] ${String(pct).padStart(3)}% ${done}/${total}`;
}
