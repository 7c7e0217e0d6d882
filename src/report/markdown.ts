// The markdown report for a pull-request comment or the CI step summary, built as a markdown
// syntax tree (mdast) and serialized by mdast-util-to-markdown with the GFM extensions: the
// serializer escapes what circuit files and team rules say (names, ids, units, messages), picks
// code-span fences longer than any backtick inside, escapes `|` in table cells and keeps bare
// URLs and e-mail addresses from becoming links. Nothing here escapes markdown by hand.
//
// Layout, for a pull-request column (~846 px): the verdict; the caution; per circuit that did not
// pass, a compact findings table (severity, rule, subject, measured vs limit, margin) and below it
// a collapsed list with each finding's message, worst scenario and fix; then the summary table;
// baseline changes; circuits that pass with warnings or notes; operating points, collapsed.
// Sections go in that order of importance, and under the size cap the later ones are cut whole,
// with a note saying what was cut.
import type { BlockContent, Break, Heading, Html, InlineCode, List, ListItem, Paragraph, PhrasingContent, Root, RootContent, Strong, Table, TableRow, Text } from "mdast";
import { gfmToMarkdown } from "mdast-util-gfm";
import { toMarkdown } from "mdast-util-to-markdown";
import type { BaselineDiff, CircuitDiff, FigureChange } from "./baseline.js";
import type { CircuitStatus, DeviceEntry, Finding } from "./document.js";
import type { CircuitOutline, ReportDocument } from "./outline.js";
import { count, formatMargin, formatNumber, formatQuantity, measuredLimitMargin } from "./format.js";
import { inertText } from "./untrusted.js";
import { explanationBlocks } from "./explain-md.js";

/** A pull-request comment holds at most 65,536 characters. */
export const PR_COMMENT_MAX_CHARS = 65_536;

/** Beyond this many circuits the summary table lists only those that did not pass. */
export const SUMMARY_ROWS_MAX = 50;

export const CAUTION =
  "opgate checks a model of each circuit, not the board. Mains-connected, high-voltage and battery-powered " +
  "designs still need review under local codes and by a qualified engineer.";

const STATUS_MARK: Readonly<Record<CircuitStatus, string>> = { pass: "✅ pass", fail: "❌ fail", error: "⚠️ error" };
const STATUS_ICON: Readonly<Record<CircuitStatus, string>> = { pass: "✅", fail: "❌", error: "⚠️" };
const STATUS_ORDER: Readonly<Record<CircuitStatus, number>> = { error: 0, fail: 1, pass: 2 };

export interface MarkdownOptions {
  readonly baseline?: BaselineDiff;
  /** Size cap in characters; default PR_COMMENT_MAX_CHARS. */
  readonly maxChars?: number;
}

// ---- node builders ---------------------------------------------------------------------------

/**
 * Untrusted text as plain markdown text: control characters made visible (inertText); an `@`
 * before a name kept from becoming a mention, and `scheme://` and `www.` from becoming links (a
 * word joiner, U+2060, inside each: mentions and bare-URL links are GitHub extensions that a
 * backslash escape does not turn off). The serializer escapes the markdown syntax itself.
 */
export function untrusted(value: string): string {
  return inertText(value)
    .replace(/@(?=[A-Za-z0-9_-])/g, "@\u2060")
    .replace(/:\/\//g, ":/\u2060/")
    .replace(/\b(www)\./gi, "$1\u2060.");
}
const text = (value: string): Text => ({ type: "text", value });
const utext = (value: string): Text => text(untrusted(value));
/** An identifier from a file (file path, rule id, subject, unit) as a code span: never a mention or a link. */
const code = (value: string): InlineCode => ({ type: "inlineCode", value: inertText(value) });
const strong = (...children: PhrasingContent[]): Strong => ({ type: "strong", children });
const para = (...children: PhrasingContent[]): Paragraph => ({ type: "paragraph", children });
const heading = (depth: 2 | 3, ...children: PhrasingContent[]): Heading => ({ type: "heading", depth, children });
const html = (value: string): Html => ({ type: "html", value });
const br = (): Break => ({ type: "break" });
const item = (...children: BlockContent[]): ListItem => ({ type: "listItem", spread: false, children });
const list = (items: ListItem[], ordered = false): List => ({ type: "list", ordered, spread: false, children: items });

type Cell = string | PhrasingContent | PhrasingContent[];
function row(cells: readonly Cell[]): TableRow {
  return {
    type: "tableRow",
    children: cells.map((c) => ({ type: "tableCell", children: typeof c === "string" ? [text(c)] : Array.isArray(c) ? c : [c] })),
  };
}
function table(align: ("left" | "right" | null)[], head: string[], rows: Cell[][]): Table {
  return { type: "table", align, children: [row(head), ...rows.map(row)] };
}

/** `<details>` around blocks; the summary is our own fixed text, never a file's. */
function details(summary: string, body: RootContent[]): RootContent[] {
  if (/[<>&]/.test(summary)) throw new Error("details summary must be plain text");
  return [html(`<details><summary>${summary}</summary>`), ...body, html("</details>")];
}

// Made once: the serializer compiles its escape patterns per extension object.
let gfmExtension: ReturnType<typeof gfmToMarkdown> | undefined;

function serialize(nodes: RootContent[]): string {
  const root: Root = { type: "root", children: nodes };
  gfmExtension ??= gfmToMarkdown({ tablePipeAlign: false });
  return toMarkdown(root, {
    extensions: [gfmExtension],
    bullet: "-",
    rule: "-",
    emphasis: "_",
    fences: true,
  });
}

// ---- content ---------------------------------------------------------------------------------

function circuitLabel(c: { name: string | null; file: string }): PhrasingContent[] {
  return c.name ? [utext(c.name), text(" "), code(c.file)] : [code(c.file)];
}

function verdictBlock(doc: ReportDocument): RootContent[] {
  const s = doc.summary;
  const head = s.verdict === "pass" ? "✅ " : s.verdict === "fail" ? "❌ " : "⚠️ ";
  const f = s.findings;
  return [
    para(
      text(head),
      strong(text(`opgate: ${s.verdict}`)),
      text(
        ` — ${count(s.circuits, "circuit")}: ${s.passed} passed, ${s.failed} failed, ${s.errors} could not be checked; ` +
          `findings: ${count(f.error, "error")}, ${count(f.warning, "warning")}, ${count(f.note, "note")} (the gate fails on ${s.failOn} and above)`,
      ),
    ),
    { type: "blockquote", children: [para(text(CAUTION))] },
    ...(doc.shard ? [para(text(`This report covers shard ${doc.shard.index} of ${doc.shard.count}.`))] : []),
  ];
}

function scenarioLabel(c: CircuitOutline, id: string): string {
  const s = c.scenarios.find((x) => x.id === id);
  return s && s.label && s.label !== id ? `${id} (${s.label})` : id;
}

/** "measured vs limit" and the margin in the finding's unit; the relative margin when there is no limit distance. */
function numbersCells(f: Finding): [Cell, Cell] {
  const all = measuredLimitMargin(f);
  if (!all) return ["—", "—"];
  const [measuredVsLimit, margin] = all.split(", margin ");
  return [utext(measuredVsLimit ?? all), margin ? utext(margin) : "—"];
}

/** The three parameters that move a failing quantity most across their bands: "RC +0.12 V … −0.12 V (1.02 %/%)". */
function topSensitivities(f: Finding): string | null {
  const top = (f.sensitivities ?? []).filter((e) => e.low !== 0 || e.high !== 0).slice(0, 3);
  if (top.length === 0) return null;
  const unit = f.unit ?? "";
  const signed = (v: number): string => `${v < 0 ? "\u2212" : "+"}${formatQuantity(Math.abs(v), unit)}`;
  return top
    .map((e) => `${e.name} ${signed(e.low)} … ${signed(e.high)} across its band${e.normalised !== null ? ` (${formatNumber(e.normalised)} %/%)` : e.perDegree !== null ? ` (${signed(e.perDegree)}/°C)` : ""}`)
    .join("; ");
}

/** Monte Carlo yield of a circuit, when it ran. */
function yieldBlock(c: CircuitOutline): RootContent[] {
  const mc = c.monteCarlo;
  if (!mc) return [];
  const pct = (v: number): string => `${formatNumber(100 * v)} %`;
  const words = `Monte Carlo yield ${pct(mc.yield)} (${mc.samples - mc.failed} of ${mc.samples} samples pass; 95 % ${mc.interval.method} interval ${pct(mc.interval.low)}–${pct(mc.interval.high)})${mc.nonConverged ? `; ${count(mc.nonConverged, "sample")} did not converge (counted as failing)` : ""}${mc.worstSample ? `; worst sample ${mc.worstSample.scenario}: ${mc.worstSample.label}` : ""}`;
  return [para(utext(words))];
}

/** The compact table of one circuit's findings, then each finding's message, worst scenario and fix. */
function circuitFindings(c: CircuitOutline): RootContent[] {
  const rows: Cell[][] = c.findings.map((f) => [f.severity, code(f.rule), code(f.subject), ...numbersCells(f)]);
  const items = c.findings.map((f) => {
    const lines: PhrasingContent[] = [strong(text(f.severity)), text(" "), code(f.rule), text(" "), code(f.subject), text(` (line ${f.line}): `), utext(f.message)];
    if (c.scenarios.length > 1 || f.scenario !== "nominal") lines.push(br(), text("Worst scenario: "), utext(scenarioLabel(c, f.scenario)));
    if (f.corner && !(c.scenarios.find((x) => x.id === f.scenario)?.label === f.corner.label)) lines.push(br(), text(c.monteCarlo ? "Its parameters: " : "Worst corner: "), utext(f.corner.label));
    const moves = topSensitivities(f);
    if (moves) lines.push(br(), text("Moves it most: "), utext(moves));
    if (f.hint) lines.push(br(), text("Fix: "), utext(f.hint));
    return item(para(...lines));
  });
  return [
    heading(3, text(`${STATUS_ICON[c.status]} `), ...circuitLabel(c)),
    ...yieldBlock(c),
    table([null, null, null, "right", "right"], ["Severity", "Rule", "Subject", "Measured vs limit", "Margin"], rows),
    ...details(`What is wrong, the worst scenario and the fix (${count(c.findings.length, "finding")})`, [list(items, true)]),
    ...explanationBlocks(c, untrusted),
  ];
}

function bySeverity(c: CircuitOutline): { error: number; warning: number; note: number } {
  const n = { error: 0, warning: 0, note: 0 };
  for (const f of c.findings) n[f.severity]++;
  return n;
}

function summaryBlock(doc: ReportDocument): RootContent[] {
  const rows = doc.circuits.length > SUMMARY_ROWS_MAX ? doc.circuits.filter((c) => c.status !== "pass") : [...doc.circuits];
  rows.sort((a, b) => STATUS_ORDER[a.status] - STATUS_ORDER[b.status]);
  const cells: Cell[][] = rows.map((c) => {
    const n = bySeverity(c);
    return [circuitLabel(c), STATUS_MARK[c.status], String(n.error), String(n.warning), String(n.note)];
  });
  if (doc.circuits.length === 0) cells.push(["(no circuit files)", "", "", "", ""]);
  const out: RootContent[] = [heading(2, text("Summary")), table([null, null, "right", "right", "right"], ["Circuit", "Status", "Errors", "Warnings", "Notes"], cells)];
  const hidden = doc.circuits.length - rows.length;
  if (hidden > 0) out.push(para(text(`…and ${count(hidden, "more circuit")} that passed.`)));
  return out;
}

function num(d: DeviceEntry, key: string): number | null {
  const v = d[key];
  return typeof v === "number" ? v : null;
}

const TRANSISTOR_KINDS = new Set(["npn", "pnp", "nmos", "pmos"]);

function figuresBlock(c: CircuitOutline): RootContent[] {
  const op = c.operatingPoint;
  if (!op && c.gains.length === 0) return [];
  const body: RootContent[] = [];
  if (op) {
    body.push(table([null, "right"], ["Node", "Voltage"], Object.keys(op.nodes).sort().map((n) => [code(n), formatQuantity(op.nodes[n]!, "V")])));
    const sources = Object.keys(op.sources).sort();
    if (sources.length > 0) {
      body.push(
        table(
          [null, "right", "right", "right"],
          ["Source", "Voltage", "Current delivered", "Power delivered"],
          sources.map((id) => {
            const s = op.sources[id]!;
            return [code(id), formatQuantity(s.voltage, "V"), formatQuantity(s.current, "A"), formatQuantity(s.power, "W")];
          }),
        ),
      );
    }
    const transistors = Object.keys(op.devices)
      .sort()
      .filter((id) => TRANSISTOR_KINDS.has(op.devices[id]!.kind));
    if (transistors.length > 0) {
      body.push(
        table(
          [null, null, "right", "right", "right", "right", "right"],
          ["Transistor", "Region", "IC / ID", "VCE / VDS", "Headroom", "gm", "Power"],
          transistors.map((id) => {
            const d = op.devices[id]!;
            const bjt = d.kind === "npn" || d.kind === "pnp";
            const current = num(d, bjt ? "collectorCurrent" : "drainCurrent");
            const voltage = num(d, bjt ? "collectorEmitterVoltage" : "drainSourceVoltage");
            return [
              [code(id), text(` ${d.kind}`)],
              utext(String(d.region ?? "—")),
              formatQuantity(current, "A"),
              formatQuantity(voltage, "V"),
              formatQuantity(num(d, "headroom"), "V"),
              formatQuantity(num(d, "transconductance"), "S"),
              formatQuantity(num(d, "power"), "W"),
            ];
          }),
        ),
      );
    }
    // A convergence aid means the bias point was hard to find: worth a reviewer's second look.
    if (op.solve.aid !== "none") body.push(para(text("The bias point needed a convergence aid: "), code(op.solve.aid), text(".")));
  }
  if (c.gains.length > 0) {
    body.push(
      table(
        [null, "right", "right", "right", "right", "right"],
        ["Gain", "Midband", "Target (window)", "dB", "Zin", "Zout"],
        c.gains.map((g) => [
          code(g.name),
          `${formatNumber(g.midband)} V/V`,
          `${formatNumber(g.target)} (${formatNumber(g.window.min)} … ${formatNumber(g.window.max)}) V/V`,
          `${formatNumber(g.db)} dB`,
          formatQuantity(g.inputImpedance, "Ω"),
          formatQuantity(g.outputImpedance, "Ω"),
        ]),
      ),
    );
  }
  return [para(strong(...circuitLabel(c))), ...details("Operating point and gains", body)];
}

function figureItems(title: string, changes: readonly FigureChange[]): ListItem[] {
  return changes.map((ch) =>
    item(
      para(
        text(`${title} `),
        code(ch.subject),
        text(`: ${formatQuantity(ch.before, ch.unit)} → ${formatQuantity(ch.after, ch.unit)}`),
        ...(ch.before !== null && ch.after !== null && ch.before !== 0 ? [text(` (${formatMargin((ch.after - ch.before) / Math.abs(ch.before))})`)] : []),
      ),
    ),
  );
}

function baselineCircuit(d: CircuitDiff): RootContent[] {
  const status =
    d.change === "added" ? "new circuit" : d.change === "removed" ? "removed" : d.statusBefore === d.statusAfter ? `still ${d.statusAfter}` : `${d.statusBefore} → ${d.statusAfter}`;
  const items = [
    ...figureItems("gain", d.gains),
    ...figureItems("supply current", d.supplies),
    ...figureItems("headroom", d.headroom),
    ...d.newFindings.map((f) => item(para(text(`new ${f.severity}: `), code(f.rule), text(" "), code(f.subject), text(" — "), utext(f.message)))),
    ...d.fixedFindings.map((f) => item(para(text("fixed: "), code(f.rule), text(" "), code(f.subject), text(" — "), utext(f.message)))),
  ];
  return [para(strong(...circuitLabel(d)), text(` — ${status}`)), ...(items.length ? [list(items)] : [])];
}

function baselineBlock(diff: BaselineDiff): RootContent[] {
  const out: RootContent[] = [heading(2, text("Changes against the baseline"))];
  if (diff.circuits.length === 0) out.push(para(text(`No changes in ${count(diff.unchanged, "circuit")}.`)));
  for (const d of diff.circuits) out.push(...baselineCircuit(d));
  if (diff.circuits.length > 0 && diff.unchanged > 0) out.push(para(text(`${count(diff.unchanged, "other circuit")} unchanged.`)));
  return out;
}

// ---- assembly under the size cap -------------------------------------------------------------

interface Section {
  /** Serialized only when it may still fit: at 2,000 circuits most sections are never rendered. */
  readonly render: () => string;
  /** What the reader loses when this section is cut ("findings of 3 circuits"). */
  readonly kind: "failing" | "summary" | "baseline" | "passing" | "figures";
}

const CUT_NOUNS: Readonly<Record<Section["kind"], (n: number) => string>> = {
  failing: (n) => `the findings of ${count(n, "circuit")} that did not pass`,
  summary: () => "the summary table",
  baseline: () => "the changes against the baseline",
  passing: (n) => `the warnings and notes of ${count(n, "passing circuit")}`,
  figures: (n) => `the operating points and gains of ${count(n, "circuit")}`,
};

function cutNote(cut: ReadonlyMap<Section["kind"], number>, maxChars: number): string {
  const parts = [...cut].map(([kind, n]) => CUT_NOUNS[kind](n));
  return serialize([
    {
      type: "blockquote",
      children: [
        para(
          text(`✂️ Cut to fit the ${maxChars.toLocaleString("en-US")}-character limit of a comment: ${parts.join("; ")}. `),
          text("The full results are in the JSON results document, the JUnit report and the SARIF upload."),
        ),
      ],
    },
  ]);
}

/** Below this much room no section fits: stop rendering and count the rest as cut. */
const SMALLEST_SECTION = 120;
/** After this many sections in a row that did not fit, stop trying smaller ones further down. */
const MAX_MISSES = 8;

/**
 * Joins the sections in order while they fit under `maxChars`; when one does not, the sections
 * are joined again with room kept for the note, each that does not fit left out whole and named
 * in the note.
 */
function assemble(head: string, sections: readonly Section[], maxChars: number): string {
  const rendered: (string | undefined)[] = [];
  const markdown = (i: number): string => (rendered[i] ??= sections[i]!.render());
  let full = head;
  let fits = true;
  for (let i = 0; i < sections.length && fits; i++) {
    full += `\n${markdown(i)}`;
    fits = full.length <= maxChars;
  }
  if (fits) return full;
  const cut = new Map<Section["kind"], number>();
  for (const s of sections) cut.set(s.kind, (cut.get(s.kind) ?? 0) + 1);
  // Room for the longest possible note (every kind cut, five-digit counts).
  const reserve = cutNote(new Map([...cut].map(([k]) => [k, 99_999])), maxChars).length + 2;
  let out = head;
  let misses = 0;
  for (let i = 0; i < sections.length; i++) {
    // Nearly full, or several sections in a row too large: the rest is cut without rendering it.
    if (maxChars - reserve - out.length < SMALLEST_SECTION || misses >= MAX_MISSES) break;
    const text = markdown(i);
    misses++;
    if (out.length + 1 + text.length + reserve <= maxChars) {
      misses = 0;
      out += `\n${text}`;
      const kind = sections[i]!.kind;
      const left = (cut.get(kind) ?? 1) - 1;
      if (left === 0) cut.delete(kind);
      else cut.set(kind, left);
    }
  }
  const note = cutNote(cut, maxChars);
  const result = `${out}\n${note}`;
  // A head alone larger than the cap (it is a few hundred characters) cannot happen in practice;
  // still never return more than asked for.
  return result.length <= maxChars ? result : result.slice(0, Math.max(0, maxChars - 1)).replace(/\n?[^\n]*$/, "\n");
}

export function renderMarkdown(doc: ReportDocument, options: MarkdownOptions = {}): string {
  const maxChars = options.maxChars ?? PR_COMMENT_MAX_CHARS;
  const head = serialize(verdictBlock(doc));
  const notPassing = doc.circuits.filter((c) => c.status !== "pass" && c.findings.length > 0).sort((a, b) => STATUS_ORDER[a.status] - STATUS_ORDER[b.status]);
  const passingWithFindings = doc.circuits.filter((c) => c.status === "pass" && c.findings.length > 0);
  const withFigures = doc.circuits.filter((c) => c.operatingPoint || c.gains.length > 0);
  const sections: Section[] = [];
  // One section per circuit; a group's heading travels with its first circuit.
  const group = <T>(kind: Section["kind"], title: string, items: readonly T[], build: (item: T) => RootContent[]): void =>
    items.forEach((x, i) => sections.push({ kind, render: () => serialize(i === 0 ? [heading(2, text(title)), ...build(x)] : build(x)) }));
  group("failing", "Findings that fail the gate", notPassing, circuitFindings);
  sections.push({ kind: "summary", render: () => serialize(summaryBlock(doc)) });
  const baseline = options.baseline;
  if (baseline) sections.push({ kind: "baseline", render: () => serialize(baselineBlock(baseline)) });
  group("passing", "Warnings and notes below the gate", passingWithFindings, circuitFindings);
  group("figures", "Operating points and gains", withFigures, figuresBlock);
  return assemble(head, sections, maxChars);
}

/**
 * Cuts finished markdown to `max` characters at a line end, closing an open <details>, with a
 * note (the step summary's byte budget, applied to a report already rendered).
 */
export function truncateMarkdown(markdown: string, max: number): string {
  if (markdown.length <= max) return markdown;
  const note = "\n\n> ✂️ This report was cut to fit. The full results are in the JSON results document and the SARIF upload.\n";
  const closer = "\n</details>\n";
  let kept = markdown.slice(0, Math.max(0, max - note.length - closer.length));
  const lastNewline = kept.lastIndexOf("\n");
  if (lastNewline > 0) kept = kept.slice(0, lastNewline);
  const open = (kept.match(/<details>/g) ?? []).length - (kept.match(/<\/details>/g) ?? []).length;
  return `${kept}${open > 0 ? closer : ""}${note}`;
}
