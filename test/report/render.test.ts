// The markdown report as a reviewer sees it: rendered by a CommonMark + GFM renderer (micromark)
// to HTML, laid out by a real browser (headless Chromium) in a pull-request comment column, and
// measured in the DOM. A table wider than the column scrolls sideways and hides its last columns
// (the old 10-column findings table measured 854–1022 px in an 846 px column).
//
// The column width (846 px) is the one reported for a pull-request comment body in the issue that
// asked for this layout; the styles below are GitHub's markdown defaults as remembered (from
// memory: 14 px sans-serif body, 1.5 line height, 6 px × 13 px cell padding, code at 85 %). The
// machine's fallback fonts (DejaVu) are wider than the usual UI fonts, so widths here err on the
// wide side.
//
// Needs a Chromium or Chrome binary (`chromium` on PATH, or CHROMIUM=/path). .ci/run installs
// Debian's `chromium` when it is missing; without one this test skips and says why.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { micromark } from "micromark";
import { gfm, gfmHtml } from "micromark-extension-gfm";
import { afterAll, describe, expect, it } from "vitest";
import { buildDocument } from "../../src/report/build.js";
import { renderMarkdown } from "../../src/report/markdown.js";
import { FAILING, fixtureDocument, HOSTILE, OPTIONS } from "./fixtures/documents.js";

const COLUMN_PX = 846;

function findBrowser(): string | undefined {
  const candidates = [process.env.CHROMIUM, "chromium", "chromium-browser", "google-chrome", "google-chrome-stable"].filter((c): c is string => Boolean(c));
  for (const c of candidates) {
    const r = spawnSync(c, ["--version"], { encoding: "utf8", timeout: 20_000 });
    if (r.status === 0 && /chrom/i.test(r.stdout)) return c;
  }
  return undefined;
}

const browser = findBrowser();
if (!browser) {
  console.warn("render.test.ts: skipped — no Chromium found (install Debian's `chromium`, or set CHROMIUM=/path/to/chrome); .ci/run installs it");
}

const dir = mkdtempSync(join(tmpdir(), "opgate-render-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const STYLE = `
body { margin: 0; }
.markdown-body { width: ${COLUMN_PX}px; font: 14px/1.5 -apple-system, "Segoe UI", "Noto Sans", Helvetica, Arial, sans-serif; word-wrap: break-word; }
.markdown-body table { display: block; width: max-content; max-width: 100%; overflow: auto; border-spacing: 0; border-collapse: collapse; }
.markdown-body td, .markdown-body th { padding: 6px 13px; border: 1px solid #d1d9e0; }
.markdown-body code { font: 85% ui-monospace, SFMono-Regular, "SF Mono", Menlo, Consolas, "Liberation Mono", monospace; padding: .2em .4em; white-space: break-spaces; }
`;

/** Measures, in the browser, each table's natural width (what it needs with no cell wrapped) and its tallest cell in lines. */
const MEASURE = `
for (const d of document.querySelectorAll("details")) d.open = true;
const body = document.querySelector(".markdown-body");
const tables = [...document.querySelectorAll("table")].map((t) => {
  // As laid out in the column (cells wrap to fit), then at its natural width (nothing wraps).
  const tallestCellLines = Math.max(...[...t.querySelectorAll("td")].map((td) => Math.round((td.clientHeight - 12) / 21)));
  const scrollWidth = t.scrollWidth;
  t.style.maxWidth = "none";
  const width = t.getBoundingClientRect().width;
  t.style.maxWidth = "";
  return { head: [...t.querySelectorAll("th")].map((th) => th.textContent).join(" | "), width, scrollWidth, tallestCellLines };
});
const out = document.createElement("pre");
out.id = "measure";
out.textContent = JSON.stringify({ bodyScrollWidth: body.scrollWidth, tables });
document.body.appendChild(out);
`;

interface Measure {
  bodyScrollWidth: number;
  /** width: natural (nothing wrapped); scrollWidth: in the column (more than the column = sideways scrolling). */
  tables: { head: string; width: number; scrollWidth: number; tallestCellLines: number }[];
}

function measure(name: string, markdown: string): Measure {
  const html = micromark(markdown, { allowDangerousHtml: true, extensions: [gfm()], htmlExtensions: [gfmHtml()] });
  const file = join(dir, `${name}.html`);
  writeFileSync(file, `<!doctype html><meta charset="utf-8"><style>${STYLE}</style><div class="markdown-body">${html}</div><script>${MEASURE}</script>`);
  const r = spawnSync(browser!, ["--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--hide-scrollbars", "--window-size=1200,900", "--dump-dom", pathToFileURL(file).href], {
    encoding: "utf8",
    timeout: 60_000,
  });
  const m = /<pre id="measure">([^<]*)<\/pre>/.exec(r.stdout ?? "");
  if (!m) throw new Error(`the browser did not render ${name}: exit ${r.status}\n${(r.stderr ?? "").slice(0, 2000)}`);
  return JSON.parse(m[1]!.replace(/&quot;/g, '"').replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&amp;/g, "&")) as Measure;
}

describe.skipIf(!browser)("markdown report in a pull-request column (headless Chromium)", () => {
  it("fits every findings and summary table in the column", () => {
    const examples = readFileSync(join(import.meta.dirname, "golden", "examples", "report.md"), "utf8");
    for (const [name, md] of [
      ["examples", examples],
      ["fixture", renderMarkdown(fixtureDocument())],
    ] as const) {
      const m = measure(name, md);
      expect(m.tables.length, name).toBeGreaterThan(3);
      for (const t of m.tables) expect(t.width, `${name}: ${t.head}`).toBeLessThanOrEqual(COLUMN_PX);
      const findings = m.tables.filter((t) => t.head.startsWith("Severity"));
      expect(findings.length, name).toBeGreaterThan(0);
      // Compact rows: no cell of a findings table wraps to more than two lines.
      for (const t of findings) expect(t.tallestCellLines, `${name}: ${t.head}`).toBeLessThanOrEqual(2);
    }
  });

  it("measures what it claims: the earlier ten-column findings table overflows the same column", () => {
    // A control: the layout the issue reported (10 columns with message and fix in the table).
    const f = FAILING.findings[1]!;
    const old = [
      "| Severity | Rule | Subject | Measured | Limit | Margin | Worst scenario | Line | What is wrong | How to fix |",
      "|---|---|---|---:|---:|---:|---|---:|---|---|",
      `| ${f.severity} | \`${f.rule}\` | ${f.subject} | 6.8 mA | 6 mA | -13.3% | corner-03 (VCC max, R1 min, Q1 beta max) | 24:7 | ${f.message} | ${f.hint} |`,
    ].join("\n");
    const m = measure("old-layout", old);
    expect(m.tables[0]!.width).toBeGreaterThan(COLUMN_PX);
    expect(m.tables[0]!.tallestCellLines).toBeGreaterThan(2);
  });

  it("keeps a hostile file's report inside the column and free of live HTML", () => {
    const long = "a".repeat(40);
    const doc = buildDocument([{ ...HOSTILE, name: `${long}|<b>x</b>`, findings: HOSTILE.findings.map((f) => ({ ...f, subject: `${f.subject}<img src=x onerror=alert(1)>` })) }], OPTIONS);
    const md = renderMarkdown(doc);
    const html = micromark(md, { allowDangerousHtml: true, extensions: [gfm()], htmlExtensions: [gfmHtml()] });
    expect(html).not.toMatch(/<img|<b>/);
    // A very long name may wrap, but nothing scrolls sideways.
    const m = measure("hostile", md);
    for (const t of m.tables) expect(t.scrollWidth, t.head).toBeLessThanOrEqual(COLUMN_PX);
    expect(m.bodyScrollWidth).toBeLessThanOrEqual(COLUMN_PX);
  });
});
