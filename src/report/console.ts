// The default terminal output: one line per file with its status, then its findings
// (`file:line:col  severity  rule  subject  message (measured vs limit, margin)`), baseline changes,
// and a verdict line. Colour is decided by the caller (colourEnabled) so this stays pure.
import type { BaselineDiff, FigureChange } from "./baseline.js";
import type { CircuitResult, Finding, ResultsDocument } from "./document.js";
import { reaches } from "./build.js";
import { count, findingLocation, formatQuantity, measuredVsLimit } from "./format.js";

export interface ConsoleOptions {
  readonly color: boolean;
  /** Only failing circuits and the verdict line. */
  readonly quiet?: boolean;
  readonly baseline?: BaselineDiff;
}

const ANSI = { red: "31", yellow: "33", green: "32", cyan: "36", dim: "2", bold: "1" } as const;
type Colour = keyof typeof ANSI;

/** NO_COLOR (non-empty) always wins; FORCE_COLOR turns colour on off a TTY; otherwise only on a TTY. */
export function colourEnabled(env: Readonly<Record<string, string | undefined>>, isTTY: boolean): boolean {
  if (env.NO_COLOR !== undefined && env.NO_COLOR !== "") return false;
  const force = env.FORCE_COLOR;
  if (force !== undefined) return force !== "0" && force !== "false";
  return isTTY;
}

/** A line starting with `::` would be read by the CI runner as a command: break the pair. */
export function neutraliseCommands(line: string): string {
  return line.replace(/^(\s*):(?=:)/, "$1:\u200b");
}

function oneLine(text: string): string {
  return text.replace(/\r?\n|\r/g, " ");
}

const STATUS_WORD: Readonly<Record<CircuitResult["status"], [string, Colour]>> = {
  pass: ["ok   ", "green"],
  fail: ["fail ", "red"],
  error: ["error", "red"],
};
const SEVERITY_COLOUR: Readonly<Record<Finding["severity"], Colour>> = { error: "red", warning: "yellow", note: "cyan" };

function findingLine(f: Finding, paint: (t: string, c: Colour) => string): string {
  const numbers = measuredVsLimit(f);
  const hint = f.hint ? ` — ${oneLine(f.hint)}` : "";
  return (
    `  ${findingLocation(f)}  ${paint(f.severity.padEnd(7), SEVERITY_COLOUR[f.severity])} ${f.rule}  ${oneLine(f.subject)}  ` +
    `${oneLine(f.message)}${numbers ? ` (${numbers})` : ""}${hint}`
  );
}

function change(label: string, ch: FigureChange): string {
  return `    ${label} ${ch.subject}: ${formatQuantity(ch.before, ch.unit)} -> ${formatQuantity(ch.after, ch.unit)}`;
}

function baselineLines(diff: BaselineDiff): string[] {
  if (diff.circuits.length === 0) return [`Against the baseline: no changes in ${count(diff.unchanged, "circuit")}.`];
  const lines = ["Against the baseline:"];
  for (const d of diff.circuits) {
    const status = d.change !== "changed" ? d.change : d.statusBefore === d.statusAfter ? `still ${d.statusAfter}` : `${d.statusBefore} -> ${d.statusAfter}`;
    lines.push(`  ${d.file}: ${status}`);
    for (const ch of d.gains) lines.push(change("gain", ch));
    for (const ch of d.supplies) lines.push(change("supply current", ch));
    for (const ch of d.headroom) lines.push(change("headroom", ch));
    for (const f of d.newFindings) lines.push(`    new ${f.severity}: ${f.rule} ${oneLine(f.subject)}: ${oneLine(f.message)}`);
    for (const f of d.fixedFindings) lines.push(`    fixed: ${f.rule} ${oneLine(f.subject)}`);
  }
  if (diff.unchanged > 0) lines.push(`  ${count(diff.unchanged, "other circuit")} unchanged`);
  return lines;
}

export function verdictText(doc: ResultsDocument): string {
  const s = doc.summary;
  const f = s.findings;
  return (
    `opgate: ${s.verdict} — ${count(s.circuits, "circuit")}: ${s.passed} passed, ${s.failed} failed, ${s.errors} could not be checked; ` +
    `${count(f.error, "error")}, ${count(f.warning, "warning")}, ${count(f.note, "note")} (fails on ${s.failOn})`
  );
}

export function renderConsole(doc: ResultsDocument, options: ConsoleOptions): string {
  const paint = (text: string, c: Colour): string => (options.color ? `\u001b[${ANSI[c]}m${text}\u001b[0m` : text);
  const lines: string[] = [];
  for (const c of doc.circuits) {
    if (options.quiet && c.status === "pass") continue;
    const [word, colour] = STATUS_WORD[c.status];
    lines.push(`${paint(word, colour)} ${c.file}${c.name ? `  (${c.name})` : ""}`);
    for (const f of c.findings) {
      if (options.quiet && c.status !== "error" && !reaches(f.severity, doc.summary.failOn)) continue;
      lines.push(findingLine(f, paint));
    }
  }
  if (options.baseline && !options.quiet) lines.push("", ...baselineLines(options.baseline));
  if (lines.length > 0) lines.push("");
  const verdictColour: Colour = doc.summary.verdict === "pass" ? "green" : "red";
  lines.push(paint(verdictText(doc), verdictColour));
  return `${lines.map(neutraliseCommands).join("\n")}\n`;
}

/** One progress-bar frame for stderr: `[#####.....] 120/2000 files`. */
export function progressFrame(done: number, total: number, width = 30): string {
  const filled = total > 0 ? Math.round((done / total) * width) : width;
  return `\r[${"#".repeat(filled)}${".".repeat(width - filled)}] ${done}/${total} files`;
}
