// One self-contained HTML page for nightly runs: verdict, caution, summary, then per circuit its
// findings, each gain's frequency-response chart (inline SVG from svg-chart.ts) and the hand-
// analysis chain of each gain. No scripts, no external files: it opens from an artifact as it is.
// A pure function of the results document; every text from a file is HTML-escaped.
import type { CircuitResult, ResultsDocument } from "./document.js";
import { renderExplanationText } from "./explain-text.js";
import { count, formatQuantity, formatMargin } from "./format.js";
import { CAUTION } from "./markdown.js";
import { renderCircuitSvg, xmlEscape } from "./svg-chart.js";

const esc = xmlEscape;

const STYLE = `
body{font:14px/1.5 system-ui,sans-serif;margin:24px auto;max-width:1000px;color:#1f2328;padding:0 16px}
h1{font-size:22px}h2{font-size:18px;margin-top:32px;border-bottom:1px solid #d1d9e0}h3{font-size:15px}
table{border-collapse:collapse;margin:8px 0}td,th{border:1px solid #d1d9e0;padding:4px 10px;text-align:left}
td.num{text-align:right}.pass{color:#1a7f37}.fail{color:#cf222e}.error{color:#9a6700}
pre{background:#f6f8fa;padding:10px;overflow-x:auto;font-size:12px}blockquote{color:#59636e;border-left:4px solid #d1d9e0;margin:0;padding:0 12px}
figure{margin:12px 0}`;

function circuitSection(c: CircuitResult): string {
  const parts = [`<section class="circuit ${c.status}" data-file="${esc(c.file)}">`, `<h2><span class="${c.status}">${c.status}</span> ${esc(c.name ?? c.file)} <code>${esc(c.file)}</code></h2>`];
  if (c.findings.length > 0) {
    parts.push("<table class=\"findings\"><thead><tr><th>Severity</th><th>Rule</th><th>Subject</th><th>Measured</th><th>Limit</th><th>Margin</th><th>Line</th><th>Message</th></tr></thead><tbody>");
    for (const f of c.findings) {
      parts.push(
        `<tr><td class="${f.severity === "error" ? "fail" : ""}">${f.severity}</td><td><code>${esc(f.rule)}</code></td><td><code>${esc(f.subject)}</code></td>` +
          `<td class="num">${esc(formatQuantity(f.measured, f.unit))}</td><td class="num">${esc(formatQuantity(f.limit, f.unit))}</td><td class="num">${esc(formatMargin(f.margin))}</td>` +
          `<td class="num">${f.line}</td><td>${esc(f.message)}${f.hint ? `<br><small>Fix: ${esc(f.hint)}</small>` : ""}</td></tr>`,
      );
    }
    parts.push("</tbody></table>");
  } else {
    parts.push("<p>No findings.</p>");
  }
  const svg = renderCircuitSvg(c);
  if (svg) parts.push(`<figure class="response">${svg}<figcaption>Frequency response at nominal: gain window shaded, band edges dashed, −3 dB corners in red.</figcaption></figure>`);
  const chains = c.gains.filter((g) => g.explanation);
  if (chains.length > 0) {
    parts.push("<h3>Hand analysis</h3>");
    for (const g of chains) parts.push(`<pre class="explanation" data-gain="${esc(g.name)}">${esc(renderExplanationText(g.explanation!))}</pre>`);
  }
  parts.push("</section>");
  return parts.join("\n");
}

export function renderHtml(doc: ResultsDocument): string {
  const s = doc.summary;
  const rows = doc.circuits
    .map((c) => `<tr><td>${esc(c.name ?? "")}</td><td><code>${esc(c.file)}</code></td><td class="${c.status}">${c.status}</td><td class="num">${c.findings.length}</td></tr>`)
    .join("\n");
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>opgate: ${s.verdict}</title><style>${STYLE}</style></head><body>
<h1 class="verdict ${s.verdict}">opgate: ${s.verdict}</h1>
<p>${count(s.circuits, "circuit")}: ${s.passed} passed, ${s.failed} failed, ${s.errors} could not be checked; findings: ${count(s.findings.error, "error")}, ${count(s.findings.warning, "warning")}, ${count(s.findings.note, "note")} (the gate fails on ${s.failOn} and above).</p>
<blockquote>${esc(CAUTION)}</blockquote>
<table class="summary"><thead><tr><th>Circuit</th><th>File</th><th>Status</th><th>Findings</th></tr></thead><tbody>
${rows}
</tbody></table>
${doc.circuits.map(circuitSection).join("\n")}
<p><small>opgate ${esc(doc.tool.version)}${doc.generatedAt ? `, ${esc(doc.generatedAt)}` : ""}</small></p>
</body></html>
`;
}
