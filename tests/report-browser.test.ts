/**
 * The HTML report in a real browser: headless Chromium (Debian package `chromium`) opens the file, the page's own
 * check counts the plots whose SVG has marks and a non-empty box, the test reads that from the rendered DOM, and
 * fails on any console message (the page writes none by design). A screenshot and the page printed to PDF are kept in test-artifacts/; each section is looked for in the rendered DOM.
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
import { readSpeed, readCounts } from "../harness/report/measured.js";

/** The report's sections after the summary, provenance and suite tables, in order. */
const SECTION_IDS = ["error-map", "iteration-map", "drift", "linearisation", "builds", "hyperbolic", "propagation", "transition", "lambert", "f32-physical", "speed", "counts"];

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

/** Headless, no sandbox (root in CI), no GPU, no network activity of its own (the machine has no outside network). */
const CHROMIUM_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--disable-background-networking",
  "--disable-component-update", "--disable-sync", "--no-first-run", "--hide-scrollbars"];

interface Seen {
  /** Ids of the sections with a heading in the rendered DOM. */
  sections: string[];
  plots: number;
  rendered: number;
  marks: number[];
  console: string[];
}

/** Open a file in headless Chromium; return the page's own plot check and every console message. */
function openInBrowser(htmlPath: string, screenshot?: string): Seen {
  const args = [...CHROMIUM_FLAGS, "--enable-logging=stderr", "--v=0", "--window-size=1200,3400", ...(screenshot ? [`--screenshot=${screenshot}`] : []), "--dump-dom", `file://${htmlPath}`];
  const r = spawnSync(CHROMIUM!, args, { encoding: "utf8", timeout: 120_000, maxBuffer: 64 * 1024 * 1024 });
  if (r.error) throw r.error;
  const dom = r.stdout;
  const html = /<html[^>]*>/.exec(dom)?.[0] ?? "";
  const attr = (name: string): number => Number(new RegExp(`${name}="(\\d+)"`).exec(html)?.[1] ?? NaN);
  const marks = [...dom.matchAll(/<figure class="plot"[^>]*data-marks="(\d+)"/g)].map((m) => Number(m[1]));
  const consoleLines = (r.stderr ?? "").split("\n").filter((l) => /:CONSOLE[:(]/.test(l));
  const sections = [...dom.matchAll(/<section id="([^"]+)"><h2>/g)].map((m) => m[1]!);
  return { sections, plots: attr("data-plots"), rendered: attr("data-plots-rendered"), marks, console: consoleLines };
}

describe("areal check --report", () => {
  let html = "";
  let htmlPath = "";
  let json: { pass: boolean; caution: string; sections: { id: string; shown: boolean; plot: boolean; absent?: string; outcome?: string }[]; suites: unknown[]; f32_physical: { rows: { scenario: string; unit: string; difference: number }[] } };
  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), "areal-report-"));
    const k = release();
    const results = [runSuite(findSpec("kepler-elliptic")!, k)];
    // Measurement files of the shapes `areal bench --json` and `areal count --json` write (invented figures: the
    // test is of the rendering, not of the measurements).
    const benchJson = join(dir, "bench.json");
    writeFileSync(benchJson, JSON.stringify({ tool: "areal bench", date: "2026-12-05", host: { node: "v20", arch: "x64", cpu: "test cpu", cores: 2 },
      kernels: [{ routine: "kepler-elliptic", exportName: "kepler_elliptic", cases: 512, wasmNs: 91.5, jsNs: 180.2 }, { routine: "lambert", exportName: "lambert", cases: 512, wasmNs: 1500, jsNs: 2100 }],
      ratios: { elliptic_vs_newton: 1.8 } }));
    const countsJson = join(dir, "counts.json");
    writeFileSync(countsJson, JSON.stringify({ targets: { "cortex-m4f": { f32: { kepler_elliptic: { typical: 1200, worst: 1850, worst_inputs: { e: 0.99, M: 0.001 } } }, f64: { kepler_elliptic: { typical: 9000, worst: 14000, worst_inputs: { e: 0.99, M: 0.001 } } } }, rv64: { f64: { kepler_elliptic: { typical: 700, worst: 900, worst_inputs: { e: 0.5, M: 1 } } } } } }));
    const out = await writeReport(dir, results, k, { compareRows: 150, orbits: 20, benchJson, countsJson });
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

  it("has the suite table, a section per family, and a plot or a stated reason for each", () => {
    expect(html).toContain("<td>kepler-elliptic</td>");
    const ids = json.sections.map((s) => s.id);
    expect(ids).toEqual(SECTION_IDS);
    for (const id of ["summary", "provenance", "suites"]) expect(html).toContain(`<section id="${id}">`);
    for (const s of json.sections) {
      if (s.plot) expect(html).toContain(`data-plot="${s.id}"`);
      else if (!s.shown) expect(s.absent, s.id).toBeTruthy();
    }
    // Every family of the release build has its plot here (builds: js always loads).
    for (const id of ["error-map", "iteration-map", "linearisation", "hyperbolic", "propagation", "transition", "lambert", "f32-physical", "speed", "counts"]) {
      expect(json.sections.find((s) => s.id === id)?.plot, id).toBe(true);
    }
    expect((html.match(/<figure class="plot"/g) ?? []).length).toBe(json.sections.filter((s) => s.plot).length);
    // The measurement files' figures are in the tables; without the files the sections say "not measured".
    expect(html).toContain("<td>cortex-m4f</td><td>f32</td><td>kepler_elliptic</td><td>1,200</td><td>1,850</td><td>e=0.99, M=0.001</td>");
    expect(html).toMatch(/<td>kepler-elliptic<\/td><td>512<\/td><td>91\.5<\/td><td>180\.2<\/td><td>1\.97<\/td>/);
    expect(readSpeed(undefined)).toMatch(/^not measured: run `areal bench --json FILE`/);
    expect(readCounts(undefined)).toMatch(/^not measured: run `areal count --json FILE`/);
    expect(readCounts(join(ROOT, "package.json"))).toMatch(/package\.json: no "targets" object; expected \{ "targets"/);
  });

  it("plots per case the figures the suite table gives: the largest error / limit of propagate and lambert", () => {
    const k = release();
    for (const [suite, id] of [["propagate", "propagation"], ["lambert", "lambert"]] as const) {
      const cases = (json as unknown as Record<string, { cases: [string, string, number, number, number][] }>)[id]!.cases;
      const r = runSuite(findSpec(suite)!, k);
      expect(cases.length, suite).toBe((r.cases - r.skipped - r.statusFailures) * r.metrics.length);
      expect(Math.max(...cases.map((c) => c[4])), suite).toBe(Math.max(...r.metrics.map((m) => m.maxRatio)));
      expect(json.sections.find((s) => s.id === id)?.outcome, suite).toMatch(new RegExp(`^${suite}: [\\d,]+ cases, the worst at [\\d.e-]+ of its limit; passed\\.$`));
    }
    expect(html).toMatch(/The family sections below run their own suites on this build, case by case: all passed/);
  });

  it("gives single precision in physical units: metres and mm/s after a low-orbit revolution", () => {
    const rows = json.f32_physical.rows;
    const leo = rows.filter((r) => r.scenario.startsWith("400 km circular, i = 51.6 deg: 1 rev"));
    expect(leo.map((r) => r.unit)).toEqual(["m", "mm/s"]);
    // One revolution of a 6778 km orbit in single precision: the position is known to some metres, no better and
    // not worse than about 2 pi r x 2^-24 x (a few tens of operations) (common practice: error growth along-track).
    expect(leo[0]!.difference).toBeGreaterThan(0.01);
    expect(leo[0]!.difference).toBeLessThan(100);
    for (const r of rows) expect(Number.isFinite(r.difference), r.scenario).toBe(true);
  });

  it.skipIf(!CHROMIUM)("renders every plot in headless Chromium with no console message; keeps a screenshot", () => {
    const art = join(ROOT, "test-artifacts");
    mkdirSync(art, { recursive: true });
    const shot = join(art, "report.png");
    const seen = openInBrowser(htmlPath, shot);
    const shown = json.sections.filter((s) => s.plot).length;
    expect(seen.plots).toBe(shown);
    // Every section is in the page the browser built, with its heading.
    for (const id of ["summary", "provenance", "suites", ...SECTION_IDS]) expect(seen.sections, id).toContain(id);
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

  it.skipIf(!CHROMIUM)("prints to PDF: a PDF file of several pages (the report is long: one page would mean a cut page)", () => {
    const pdf = join(mkdtempSync(join(tmpdir(), "areal-report-pdf-")), "report.pdf");
    const r = spawnSync(CHROMIUM!, [...CHROMIUM_FLAGS, "--no-pdf-header-footer", `--print-to-pdf=${pdf}`, `file://${htmlPath}`], { encoding: "utf8", timeout: 180_000 });
    if (r.error) throw r.error;
    const bytes = readFileSync(pdf);
    expect(bytes.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(bytes.length).toBeGreaterThan(100_000);
    // Page objects (PDF 32000-1:2008, 7.7.3.3: a page is a dictionary of /Type /Page; the tree nodes are /Pages).
    const pages = bytes.toString("latin1").match(/\/Type\s*\/Page(?![s\w])/g)?.length ?? 0;
    expect(pages).toBeGreaterThan(3);
    expect(pages).toBeLessThan(60);
    mkdirSync(join(ROOT, "test-artifacts"), { recursive: true });
    copyFileSync(pdf, join(ROOT, "test-artifacts", "areal-report.pdf"));
  });
});
