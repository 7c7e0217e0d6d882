// The markdown report for a pull-request comment or the CI step summary: verdict first, a summary
// table, a findings table per failing circuit (measured vs limit, margin, worst scenario, hint),
// baseline changes, and each circuit's operating point and gains in a collapsed section.
import type { BaselineDiff, CircuitDiff, FigureChange } from "./baseline.js";
import type { CircuitResult, DeviceEntry, Finding, ResultsDocument } from "./document.js";
import { count, formatMargin, formatNumber, formatQuantity } from "./format.js";

/** A pull-request comment holds at most 65,536 characters. */
export const PR_COMMENT_MAX_CHARS = 65_536;

/** Beyond this many circuits the summary table lists only those that did not pass. */
export const SUMMARY_ROWS_MAX = 50;

export const CAUTION =
  "opgate checks a model of each circuit, not the board. Mains-connected, high-voltage and battery-powered " +
  "designs still need review under local codes and by a qualified engineer.";

const STATUS_MARK: Readonly<Record<CircuitResult["status"], string>> = { pass: "✅ pass", fail: "❌ fail", error: "⚠️ error" };

export interface MarkdownOptions {
  readonly baseline?: BaselineDiff;
  /** Size cap in characters; default PR_COMMENT_MAX_CHARS. */
  readonly maxChars?: number;
}

/** Text from circuit files is untrusted: no HTML, no table breaks, one line per cell. */
export function cell(text: string): string {
  return text
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/\|/g, "\\|")
    .replace(/\r?\n|\r/g, " ");
}

function code(text: string): string {
  return `\`${text.replace(/`/g, "'").replace(/\r?\n|\r/g, " ")}\``;
}

function circuitTitle(c: { name: string | null; file: string }): string {
  return c.name ? `${cell(c.name)} (${code(c.file)})` : code(c.file);
}

function verdictLine(doc: ResultsDocument): string {
  const s = doc.summary;
  const head = s.verdict === "pass" ? "✅ **opgate: pass**" : s.verdict === "fail" ? "❌ **opgate: fail**" : "⚠️ **opgate: error**";
  const f = s.findings;
  return (
    `${head} — ${count(s.circuits, "circuit")}: ${s.passed} passed, ${s.failed} failed, ${s.errors} could not be checked; ` +
    `findings: ${count(f.error, "error")}, ${count(f.warning, "warning")}, ${count(f.note, "note")} (the gate fails on ${s.failOn} and above)`
  );
}

function bySeverity(c: CircuitResult): { error: number; warning: number; note: number } {
  const n = { error: 0, warning: 0, note: 0 };
  for (const f of c.findings) n[f.severity]++;
  return n;
}

const STATUS_ORDER: Readonly<Record<CircuitResult["status"], number>> = { error: 0, fail: 1, pass: 2 };

function summaryTable(doc: ResultsDocument): string[] {
  const rows = doc.circuits.length > SUMMARY_ROWS_MAX ? doc.circuits.filter((c) => c.status !== "pass") : [...doc.circuits];
  rows.sort((a, b) => STATUS_ORDER[a.status] - STATUS_ORDER[b.status]);
  const lines = ["| Circuit | Status | Errors | Warnings | Notes |", "|---|---|---:|---:|---:|"];
  for (const c of rows) {
    const n = bySeverity(c);
    lines.push(`| ${circuitTitle(c)} | ${STATUS_MARK[c.status]} | ${n.error} | ${n.warning} | ${n.note} |`);
  }
  const hidden = doc.circuits.length - rows.length;
  if (hidden > 0) lines.push("", `…and ${count(hidden, "more circuit")} that passed.`);
  if (doc.circuits.length === 0) lines.push("| (no circuit files) | | | | |");
  return lines;
}

function scenarioLabel(c: CircuitResult, id: string): string {
  const s = c.scenarios.find((x) => x.id === id);
  return s && s.label && s.label !== id ? `${id} (${s.label})` : id;
}

function findingsTable(c: CircuitResult): string[] {
  const lines = [
    `### ${c.status === "error" ? "⚠️" : c.status === "fail" ? "❌" : "✅"} ${circuitTitle(c)}${c.status === "pass" ? " — passes the gate" : ""}`,
    "",
    "| Severity | Rule | Subject | Measured | Limit | Margin | Worst scenario | Line | What is wrong | How to fix |",
    "|---|---|---|---:|---:|---:|---|---:|---|---|",
  ];
  for (const f of c.findings) lines.push(findingRow(c, f));
  return lines;
}

function findingRow(c: CircuitResult, f: Finding): string {
  return (
    `| ${f.severity} | ${code(f.rule)} | ${cell(f.subject)} | ${formatQuantity(f.measured, f.unit)} | ` +
    `${formatQuantity(f.limit, f.unit)} | ${formatMargin(f.margin)} | ${cell(scenarioLabel(c, f.scenario))} | ` +
    `${f.line}:${f.column} | ${cell(f.message)} | ${f.hint ? cell(f.hint) : "—"} |`
  );
}

function num(d: DeviceEntry, key: string): number | null {
  const v = d[key];
  return typeof v === "number" ? v : null;
}

const TRANSISTOR_KINDS = new Set(["npn", "pnp", "nmos", "pmos"]);

function detailsSection(c: CircuitResult): string[] {
  const op = c.operatingPoint;
  if (!op && c.gains.length === 0) return [];
  const lines = [`<details><summary>Operating point and gains — ${cell(c.name ?? c.file)}</summary>`, ""];
  if (op) {
    const nodes = Object.keys(op.nodes).sort();
    lines.push("| Node | Voltage |", "|---|---:|");
    for (const n of nodes) lines.push(`| ${cell(n)} | ${formatQuantity(op.nodes[n]!, "V")} |`);
    lines.push("");
    const sources = Object.keys(op.sources).sort();
    if (sources.length > 0) {
      lines.push("| Source | Voltage | Current delivered | Power delivered |", "|---|---:|---:|---:|");
      for (const id of sources) {
        const s = op.sources[id]!;
        lines.push(`| ${cell(id)} | ${formatQuantity(s.voltage, "V")} | ${formatQuantity(s.current, "A")} | ${formatQuantity(s.power, "W")} |`);
      }
      lines.push("");
    }
    const transistors = Object.keys(op.devices)
      .sort()
      .filter((id) => TRANSISTOR_KINDS.has(op.devices[id]!.kind));
    if (transistors.length > 0) {
      lines.push("| Transistor | Kind | Region | IC / ID | VCE / VDS | Headroom | gm | Power |", "|---|---|---|---:|---:|---:|---:|---:|");
      for (const id of transistors) {
        const d = op.devices[id]!;
        const bjt = d.kind === "npn" || d.kind === "pnp";
        const current = num(d, bjt ? "collectorCurrent" : "drainCurrent");
        const voltage = num(d, bjt ? "collectorEmitterVoltage" : "drainSourceVoltage");
        lines.push(
          `| ${cell(id)} | ${d.kind} | ${cell(String(d.region ?? "—"))} | ${formatQuantity(current, "A")} | ${formatQuantity(voltage, "V")} | ` +
            `${formatQuantity(num(d, "headroom"), "V")} | ${formatQuantity(num(d, "transconductance"), "S")} | ${formatQuantity(num(d, "power"), "W")} |`,
        );
      }
      lines.push("");
    }
    // A convergence aid means the bias point was hard to find: worth a reviewer's second look.
    if (op.solve.aid !== "none") lines.push(`The bias point needed a convergence aid (${cell(op.solve.aid)}).`, "");
  }
  if (c.gains.length > 0) {
    lines.push("| Gain | Midband | dB | Target | Window | Input impedance | Output impedance |", "|---|---:|---:|---:|---|---:|---:|");
    for (const g of c.gains) {
      lines.push(
        `| ${cell(g.name)} | ${formatNumber(g.midband)} V/V | ${formatNumber(g.db)} dB | ${formatNumber(g.target)} V/V | ` +
          `${formatNumber(g.window.min)} … ${formatNumber(g.window.max)} V/V | ${formatQuantity(g.inputImpedance, "Ω")} | ${formatQuantity(g.outputImpedance, "Ω")} |`,
      );
    }
    lines.push("");
  }
  lines.push("</details>", "");
  return lines;
}

function figureLines(title: string, changes: readonly FigureChange[]): string[] {
  return changes.map(
    (ch) =>
      `- ${title} ${cell(ch.subject)}: ${formatQuantity(ch.before, ch.unit)} → ${formatQuantity(ch.after, ch.unit)}` +
      (ch.before !== null && ch.after !== null && ch.before !== 0 ? ` (${formatMargin((ch.after - ch.before) / Math.abs(ch.before))})` : ""),
  );
}

function baselineCircuit(d: CircuitDiff): string[] {
  const status =
    d.change === "added"
      ? "new circuit"
      : d.change === "removed"
        ? "removed"
        : d.statusBefore === d.statusAfter
          ? `still ${d.statusAfter}`
          : `${d.statusBefore} → ${d.statusAfter}`;
  const lines = [`**${circuitTitle(d)}** — ${status}`, ""];
  lines.push(...figureLines("gain", d.gains), ...figureLines("supply current", d.supplies), ...figureLines("headroom", d.headroom));
  for (const f of d.newFindings) lines.push(`- new ${f.severity}: ${code(f.rule)} ${cell(f.subject)} — ${cell(f.message)}`);
  for (const f of d.fixedFindings) lines.push(`- fixed: ${code(f.rule)} ${cell(f.subject)} — ${cell(f.message)}`);
  lines.push("");
  return lines;
}

function baselineSection(diff: BaselineDiff): string[] {
  const lines = ["## Changes against the baseline", ""];
  if (diff.circuits.length === 0) lines.push(`No changes in ${count(diff.unchanged, "circuit")}.`, "");
  for (const d of diff.circuits) lines.push(...baselineCircuit(d));
  if (diff.circuits.length > 0 && diff.unchanged > 0) lines.push(`${count(diff.unchanged, "other circuit")} unchanged.`, "");
  return lines;
}

/** Cuts `text` to `max` characters at a line end, closing an open <details>, with a note saying so. */
export function truncateMarkdown(text: string, max: number): string {
  if (text.length <= max) return text;
  const note =
    "\n\n> ✂️ This report was cut to fit the size a comment allows. The full results are in the JSON results document and the SARIF upload.\n";
  const closer = "\n</details>";
  let kept = text.slice(0, Math.max(0, max - note.length - closer.length));
  const lastNewline = kept.lastIndexOf("\n");
  if (lastNewline > 0) kept = kept.slice(0, lastNewline);
  const open = (kept.match(/<details>/g) ?? []).length - (kept.match(/<\/details>/g) ?? []).length;
  return `${kept}${open > 0 ? closer : ""}${note}`;
}

export function renderMarkdown(doc: ResultsDocument, options: MarkdownOptions = {}): string {
  const lines = [verdictLine(doc), "", `> ${CAUTION}`, ""];
  if (doc.shard) lines.push(`This report covers shard ${doc.shard.index} of ${doc.shard.count}.`, "");
  lines.push(...summaryTable(doc), "");
  if (options.baseline) lines.push(...baselineSection(options.baseline));
  // Failing circuits first; then those that pass the gate but still have warnings or notes.
  const withFindings = doc.circuits.filter((c) => c.findings.length > 0).sort((a, b) => STATUS_ORDER[a.status] - STATUS_ORDER[b.status]);
  if (withFindings.length > 0) {
    lines.push("## Findings", "");
    for (const c of withFindings) lines.push(...findingsTable(c), "");
  }
  const withFigures = doc.circuits.filter((c) => c.operatingPoint || c.gains.length > 0);
  if (withFigures.length > 0) {
    lines.push("## Operating points and gains", "");
    for (const c of withFigures) lines.push(...detailsSection(c));
  }
  const text = `${lines.join("\n").replace(/\n{3,}/g, "\n\n").trimEnd()}\n`;
  return truncateMarkdown(text, options.maxChars ?? PR_COMMENT_MAX_CHARS);
}
