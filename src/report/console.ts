// The default terminal output: one line per file with its status, then per finding one short
// line (`file:line:col  severity  rule  subject  measured vs limit, margin` — each number once, in
// its own unit) and an indented second line with the fix and the worst scenario; baseline changes;
// a verdict line. Colour is decided by the caller (colourEnabled) so this stays pure.
// Every text from a circuit file or a team rule goes through inertText: no control character, no
// line break (a line the Actions runner would execute as `::command`), no bidi override.
import type { BaselineDiff, FigureChange } from "./baseline.js";
import type { CircuitStatus, Finding } from "./document.js";
import type { CircuitOutline, ReportDocument } from "./outline.js";
import { reaches } from "./build.js";
import { count, formatQuantity, measuredLimitMargin } from "./format.js";
import { breakCommand, inertText } from "./untrusted.js";

/** Text from a file or rule, made safe for a terminal line. */
export const terminalText = inertText;
const t = inertText;

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
export const neutraliseCommands = breakCommand;

const STATUS_WORD: Readonly<Record<CircuitStatus, [string, Colour]>> = {
  pass: ["ok   ", "green"],
  fail: ["fail ", "red"],
  error: ["error", "red"],
};
const SEVERITY_COLOUR: Readonly<Record<Finding["severity"], Colour>> = { error: "red", warning: "yellow", note: "cyan" };

function scenarioText(scenarios: CircuitOutline["scenarios"], id: string): string {
  const s = scenarios.find((x) => x.id === id);
  return t(s && s.label && s.label !== id ? `${id} (${s.label})` : id);
}

/**
 * Line 1: where, how bad, which rule, what, and the numbers once (the message when the finding has
 * no numbers). Line 2 (indented): the fix and the worst scenario, when there are any.
 */
function findingLines(scenarios: () => CircuitOutline["scenarios"], f: Finding, paint: (t: string, c: Colour) => string): string[] {
  const numbers = measuredLimitMargin(f);
  const head = `  ${t(f.file)}:${f.line}:${f.column}  ${paint(f.severity.padEnd(7), SEVERITY_COLOUR[f.severity])} ${t(f.rule)}  ${t(f.subject)}  ${numbers ? t(numbers) : t(f.message)}`;
  const detail: string[] = [];
  if (f.hint) detail.push(`fix: ${t(f.hint.trim().replace(/[.;]$/, ""))}`);
  // A worst scenario says something only when scenarios were compared.
  if (f.scenario && (f.scenario !== "nominal" || scenarios().length > 1)) {
    const where = scenarioText(scenarios(), f.scenario);
    // A Monte Carlo sample's label says only its number: its parameter set follows.
    const set = f.corner ? t(f.corner.label) : "";
    detail.push(`worst: ${where}${set && !where.includes(set) ? `: ${set}` : ""}`);
  }
  return detail.length > 0 ? [head, `      ${detail.join("; ")}`] : [head];
}

function change(label: string, ch: FigureChange): string {
  return `    ${label} ${t(ch.subject)}: ${t(formatQuantity(ch.before, ch.unit))} -> ${t(formatQuantity(ch.after, ch.unit))}`;
}

function baselineLines(diff: BaselineDiff): string[] {
  if (diff.circuits.length === 0) return [`Against the baseline: no changes in ${count(diff.unchanged, "circuit")}.`];
  const lines = ["Against the baseline:"];
  for (const d of diff.circuits) {
    const status = d.change !== "changed" ? d.change : d.statusBefore === d.statusAfter ? `still ${d.statusAfter}` : `${d.statusBefore} -> ${d.statusAfter}`;
    lines.push(`  ${t(d.file)}: ${status}`);
    for (const ch of d.gains) lines.push(change("gain", ch));
    for (const ch of d.supplies) lines.push(change("supply current", ch));
    for (const ch of d.headroom) lines.push(change("headroom", ch));
    for (const f of d.newFindings) lines.push(`    new ${f.severity}: ${t(f.rule)} ${t(f.subject)}: ${t(f.message)}`);
    for (const f of d.fixedFindings) lines.push(`    fixed: ${t(f.rule)} ${t(f.subject)}`);
  }
  if (diff.unchanged > 0) lines.push(`  ${count(diff.unchanged, "other circuit")} unchanged`);
  return lines;
}

export function verdictText(doc: ReportDocument): string {
  const s = doc.summary;
  const f = s.findings;
  return (
    `opgate: ${s.verdict} — ${count(s.circuits, "circuit")}: ${s.passed} passed, ${s.failed} failed, ${s.errors} could not be checked; ` +
    `${count(f.error, "error")}, ${count(f.warning, "warning")}, ${count(f.note, "note")} (fails on ${s.failOn})`
  );
}

export function renderConsole(doc: ReportDocument, options: ConsoleOptions): string {
  const paint = (text: string, c: Colour): string => (options.color ? `\u001b[${ANSI[c]}m${text}\u001b[0m` : text);
  const lines: string[] = [];
  for (const c of doc.circuits) {
    if (options.quiet && c.status === "pass") continue;
    const [word, colour] = STATUS_WORD[c.status];
    lines.push(`${paint(word, colour)} ${t(c.file)}${c.name ? `  (${t(c.name)})` : ""}`);
    // An outline parses its fields afresh on every read: each is read once per circuit here.
    let scenarios: CircuitOutline["scenarios"] | undefined;
    const scenariosOnce = (): CircuitOutline["scenarios"] => (scenarios ??= c.scenarios);
    for (const f of c.findings) {
      if (options.quiet && c.status !== "error" && !reaches(f.severity, doc.summary.failOn)) continue;
      lines.push(...findingLines(scenariosOnce, f, paint));
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
