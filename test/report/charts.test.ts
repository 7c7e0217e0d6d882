// Frequency-response charts and the HTML report. The chart's points must be the sweep's values
// (the small-signal stage's own sweepGain, run here independently of the pipeline), the SVG must
// be well-formed XML with the marks a reviewer looks for (gain window, band edges, −3 dB
// corners), and the HTML report must render in a real browser (headless Chromium: the page's
// own XML/HTML parsers and layout are the outside reference) with every chart drawn.
// Needs `chromium` on PATH (or CHROMIUM=/path) for the browser checks; .ci/run installs it when
// missing; without one those checks skip and say why.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { loadCircuitFile } from "../../src/circuit/index.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint } from "../../src/solve/types.js";
import { analyseSmallSignal, defaultSweepRange, sweepGain } from "../../src/smallsignal/index.js";
import { gainEntries } from "../../src/pipeline/entries.js";
import { withGainExtras } from "../../src/pipeline/gain-extras.js";
import type { CircuitResult, ResultsDocument } from "../../src/report/document.js";
import { chartFileName, chartScale, renderCircuitSvg } from "../../src/report/svg-chart.js";
import { renderHtml } from "../../src/report/html.js";
import { descendants, parseXml } from "./xml.js";

const EXAMPLE = join(import.meta.dirname, "..", "..", "examples", "tide-gauge-preamp.yaml");

async function exampleCircuit(): Promise<{ result: CircuitResult; op: OperatingPoint; circuit: Awaited<ReturnType<typeof loadCircuitFile>> }> {
  const circuit = await loadCircuitFile(EXAMPLE, { displayPath: "examples/tide-gauge-preamp.yaml" });
  if (!circuit.ok) throw new Error("example did not load");
  const op = solveOperatingPoint(circuit.circuit);
  if (!op.ok) throw new Error(op.reason);
  const gains = withGainExtras(gainEntries(circuit.circuit, analyseSmallSignal(circuit.circuit, op)), circuit.circuit, op);
  const result: CircuitResult = { file: "examples/tide-gauge-preamp.yaml", name: "tide <gauge> & preamp", status: "pass", operatingPoint: null, gains, scenarios: [], findings: [], passed: [] };
  return { result, op, circuit };
}

/** The (x, y) pairs of an SVG path of M/L commands. */
function pathPoints(d: string): [number, number][] {
  return [...d.matchAll(/[ML]([-\d.]+) ([-\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
}

describe("frequency-response chart", () => {
  it("draws exactly the sweep's values, at 0.01 px", async () => {
    const { result, op, circuit } = await exampleCircuit();
    if (!circuit.ok) throw new Error();
    const g = result.gains[0]!;
    const sweep = sweepGain(circuit.circuit, op, g.name, defaultSweepRange(circuit.circuit));
    // The document's response is the sweep, value for value.
    expect(g.response!.points.map((p) => [p.frequency, p.db, p.phaseDeg])).toEqual(sweep.points.map((p) => [p.frequency, p.db, p.phaseDeg]));
    expect(g.response!.lowCorner).toBe(sweep.lowCorner);
    expect(g.response!.highCorner).toBe(sweep.highCorner);
    // The drawn polyline maps back to those values through the chart's own scale.
    const svg = parseXml(renderCircuitSvg(result)!);
    const paths = descendants(svg, "path");
    const magnitude = paths.find((p) => p.attributes.class === "trace magnitude")!;
    const phase = paths.find((p) => p.attributes.class === "trace phase")!;
    const s = chartScale(g)!;
    const mag = pathPoints(magnitude.attributes.d!);
    const ph = pathPoints(phase.attributes.d!);
    expect(mag).toHaveLength(sweep.points.length);
    sweep.points.forEach((p, i) => {
      expect(Math.abs(mag[i]![0] - s.x(p.frequency))).toBeLessThanOrEqual(0.005 + 1e-9);
      expect(Math.abs(mag[i]![1] - s.yDb(p.db))).toBeLessThanOrEqual(0.005 + 1e-9);
      expect(Math.abs(ph[i]![1] - s.yPhase(p.phaseDeg))).toBeLessThanOrEqual(0.005 + 1e-9);
    });
  });

  it("is well-formed XML with the window, band edges and −3 dB corners marked, names escaped", async () => {
    const { result } = await exampleCircuit();
    const text = renderCircuitSvg(result)!;
    const svg = parseXml(text);
    expect(svg.name).toBe("svg");
    const classes = [...descendants(svg, "line"), ...descendants(svg, "rect")].map((e) => e.attributes.class ?? "");
    expect(classes.filter((c) => c === "mark window")).toHaveLength(1);
    const edges = descendants(svg, "line").filter((e) => e.attributes.class === "mark band-edge").map((e) => Number(e.attributes["data-frequency"]));
    expect(edges).toEqual([10, 20e3]); // specs.band of the example
    const g = result.gains[0]!;
    const corners = descendants(svg, "line").filter((e) => e.attributes.class === "mark corner").map((e) => Number(e.attributes["data-frequency"]));
    expect(corners).toEqual([g.response!.lowCorner, g.response!.highCorner].filter((f) => f !== null));
    expect(text).toContain("tide &lt;gauge&gt; &amp; preamp");
    expect(chartFileName("boards/../a b.yaml")).toBe("boards--..--a--b.svg".replace(/^[.-]+/, ""));
  });
});

function findBrowser(): string | undefined {
  for (const c of [process.env.CHROMIUM, "chromium", "chromium-browser", "google-chrome"].filter((x): x is string => Boolean(x))) {
    const r = spawnSync(c, ["--version"], { encoding: "utf8", timeout: 20_000 });
    if (r.status === 0 && /chrom/i.test(r.stdout)) return c;
  }
  return undefined;
}
const browser = findBrowser();
if (!browser) console.warn("charts.test.ts: browser checks skipped — no Chromium found (install Debian's `chromium`, or set CHROMIUM=/path); .ci/run installs it");
const dir = mkdtempSync(join(tmpdir(), "opgate-charts-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function dumpDom(file: string): string {
  const r = spawnSync(browser!, ["--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--window-size=1200,900", "--dump-dom", pathToFileURL(file).href], { encoding: "utf8", timeout: 90_000 });
  return r.stdout ?? "";
}

describe.skipIf(!browser)("in a headless browser", () => {
  it("the SVG file parses as XML (no parser error) ", async () => {
    const { result } = await exampleCircuit();
    const file = join(dir, chartFileName(result.file));
    writeFileSync(file, renderCircuitSvg(result)!);
    const dom = dumpDom(file);
    expect(dom).toContain("trace magnitude");
    expect(dom).not.toMatch(/parsererror/i);
  });

  it("the HTML report renders: verdict, findings, and every chart drawn with a non-empty trace", async () => {
    const { result } = await exampleCircuit();
    const failing: CircuitResult = { ...result, file: "examples/b.yaml", status: "fail", findings: [{ rule: "gain-window", severity: "error", subject: "preamp", message: "gain <b>x</b>", measured: -0.79, limit: -10.8, unit: "V/V", margin: -0.9, scenario: "nominal", file: "examples/b.yaml", line: 3, column: 7 }] };
    const doc: ResultsDocument = {
      format: "opgate-results/1",
      tool: { name: "opgate", version: "0.0.0" },
      variation: { mode: "nominal", samples: 0, seed: 1 },
      rules: [],
      circuits: [failing, result],
      summary: { circuits: 2, passed: 1, failed: 1, errors: 0, findings: { error: 1, warning: 0, note: 0 }, failOn: "error", verdict: "fail" },
    };
    const html = renderHtml(doc);
    expect(html).not.toContain("<b>x</b>");
    // The report itself carries no script (its CSP forbids them); the probe below is the test's own.
    const probe = `<script>
const errors = [];
window.addEventListener("error", (e) => errors.push(String(e.message)));
const charts = [...document.querySelectorAll("svg.opgate-chart")];
const traces = [...document.querySelectorAll("svg .trace.magnitude")].map((p) => p.getBBox());
const out = document.createElement("pre"); out.id = "probe";
out.textContent = JSON.stringify({ errors, charts: charts.length, traces: traces.map((b) => [b.width, b.height]),
  verdict: document.querySelector("h1.verdict")?.textContent, findings: document.querySelectorAll("table.findings tr").length,
  explanations: document.querySelectorAll("pre.explanation").length });
document.body.appendChild(out);
</script>`;
    const file = join(dir, "report.html");
    writeFileSync(file, html.replace(/<meta http-equiv="Content-Security-Policy"[^>]*>/, "").replace("</body>", `${probe}</body>`));
    const dom = dumpDom(file);
    const m = /<pre id="probe">([^<]*)<\/pre>/.exec(dom);
    expect(m, dom.slice(0, 500)).not.toBeNull();
    const probeResult = JSON.parse(m![1]!.replace(/&quot;/g, '"').replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&amp;/g, "&"));
    expect(probeResult.errors).toEqual([]);
    expect(probeResult.verdict).toBe("opgate: fail");
    expect(probeResult.charts).toBe(2);
    expect(probeResult.findings).toBe(2); // header + one finding
    expect(probeResult.explanations).toBe(2);
    for (const [w, h] of probeResult.traces) {
      expect(w).toBeGreaterThan(500);
      expect(h).toBeGreaterThan(10);
    }
  });
});
