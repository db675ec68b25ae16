/**
 * The HTML report in a real browser: headless Chromium (Debian package `chromium`) opens the file, the page's own
 * check counts the plots whose SVG has marks and a non-empty box, the test reads that from the rendered DOM, and
 * fails on any console message (the page writes none by design). A screenshot is kept in test-artifacts/.
 * Skipped, with the reason printed, when no Chromium is installed.
 */
import { describe, it, expect, beforeAll } from "vitest";
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync, mkdirSync, statSync, copyFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { delimiter, join } from "node:path";
import { writeReport } from "../harness/report/html.js";
import { runSuite } from "../harness/verify/check.js";
import { findSpec } from "../harness/verify/specs/index.js";
import { ROOT } from "../harness/core/paths.js";
import { release } from "./helpers.js";
import { noteSkip } from "./support/skips.js";

function findChromium(): string | undefined {
  for (const dir of (process.env.PATH ?? "").split(delimiter)) {
    for (const name of ["chromium", "chromium-browser", "google-chrome", "google-chrome-stable"]) {
      const p = join(dir, name);
      if (dir && existsSync(p)) return p;
    }
  }
  return undefined;
}

const CHROMIUM = findChromium();
if (!CHROMIUM) noteSkip("report in a browser (tests/report-browser)", "no Chromium on PATH", "apt-get install chromium");

interface Seen {
  plots: number;
  rendered: number;
  marks: number[];
  console: string[];
}

/** Open a file in headless Chromium; return the page's own plot check and every console message. */
function openInBrowser(htmlPath: string, screenshot?: string): Seen {
  const args = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--disable-background-networking",
    "--disable-component-update", "--disable-sync", "--no-first-run", "--hide-scrollbars", "--enable-logging=stderr", "--v=0",
    "--window-size=1200,3400", ...(screenshot ? [`--screenshot=${screenshot}`] : []), "--dump-dom", `file://${htmlPath}`];
  const r = spawnSync(CHROMIUM!, args, { encoding: "utf8", timeout: 120_000, maxBuffer: 64 * 1024 * 1024 });
  if (r.error) throw r.error;
  const dom = r.stdout;
  const html = /<html[^>]*>/.exec(dom)?.[0] ?? "";
  const attr = (name: string): number => Number(new RegExp(`${name}="(\\d+)"`).exec(html)?.[1] ?? NaN);
  const marks = [...dom.matchAll(/<figure class="plot"[^>]*data-marks="(\d+)"/g)].map((m) => Number(m[1]));
  const consoleLines = (r.stderr ?? "").split("\n").filter((l) => /:CONSOLE[:(]/.test(l));
  return { plots: attr("data-plots"), rendered: attr("data-plots-rendered"), marks, console: consoleLines };
}

describe("areal check --report", () => {
  let html = "";
  let htmlPath = "";
  let json: { pass: boolean; caution: string; sections: { id: string; shown: boolean; absent?: string }[]; suites: unknown[] };
  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-report-"));
    const k = release();
    const results = [runSuite(findSpec("kepler-elliptic")!, k)];
    const out = await writeReport(dir, results, k, { compareRows: 150, orbits: 20 });
    htmlPath = out.html;
    html = readFileSync(out.html, "utf8");
    json = JSON.parse(readFileSync(out.json, "utf8"));
  });

  it("writes one self-contained HTML file and its JSON beside it", () => {
    expect(html).toMatch(/^<!DOCTYPE html>/);
    expect(html).not.toMatch(/<(script|img|iframe)[^>]+src=/i);
    expect(html).not.toMatch(/<link\b/i);
    expect(html).toContain("flight use needs qualified verification and validation");
    expect(json.caution).toContain("flight use needs qualified verification and validation");
    expect(json.suites).toHaveLength(1);
    expect(json.pass).toBe(true);
  });

  it("has the suite table, an error map, an iteration map, and a plot or a stated reason for drift and builds", () => {
    expect(html).toContain("<td>kepler-elliptic</td>");
    const ids = json.sections.map((s) => s.id);
    expect(ids).toEqual(["error-map", "iteration-map", "drift", "linearisation", "builds"]);
    for (const id of ["summary", "provenance", "suites"]) expect(html).toContain(`<section id="${id}">`);
    for (const s of json.sections) {
      if (s.shown) expect(html).toContain(`data-plot="${s.id}"`);
      else expect(s.absent, s.id).toBeTruthy();
    }
    expect(json.sections.filter((s) => s.id === "error-map" || s.id === "iteration-map" || s.id === "linearisation").every((s) => s.shown)).toBe(true);
    expect((html.match(/<figure class="plot"/g) ?? []).length).toBe(json.sections.filter((s) => s.shown).length);
  });

  it.skipIf(!CHROMIUM)("renders every plot in headless Chromium with no console message; keeps a screenshot", () => {
    const art = join(ROOT, "test-artifacts");
    mkdirSync(art, { recursive: true });
    const shot = join(art, "report.png");
    const seen = openInBrowser(htmlPath, shot);
    const shown = json.sections.filter((s) => s.shown).length;
    expect(seen.plots).toBe(shown);
    expect(seen.rendered).toBe(shown);
    expect(seen.marks).toHaveLength(shown);
    for (const m of seen.marks) expect(m).toBeGreaterThan(0);
    expect(seen.console).toEqual([]);
    expect(statSync(shot).size).toBeGreaterThan(10_000);
    copyFileSync(htmlPath, join(art, "areal-report.html"));
  });

  it.skipIf(!CHROMIUM)("the browser check fails on a plot without marks and on a console error (mutant page)", () => {
    // Marks renamed in the SVG only (the page's check script, after the last figure, is left as it is).
    const cut = html.lastIndexOf("<script>");
    const bad = html.slice(0, cut).replace(/role-mark/g, "role-none") + html.slice(cut).replace("</body>", `<script>console.error("mutant page")</script></body>`);
    const p = join(mkdtempSync(join(tmpdir(), "areal-report-bad-")), "bad.html");
    writeFileSync(p, bad);
    const seen = openInBrowser(p);
    expect(seen.plots).toBeGreaterThan(0);
    expect(seen.rendered).toBe(0);
    expect(seen.console.some((l) => l.includes("mutant page"))).toBe(true);
  });
});
