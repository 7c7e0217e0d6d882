// GitHub Actions workflow commands that put findings on the circuit file and line in the pull
// request: `::error file=…,line=…,col=…,title=…::message`, `::warning`, `::notice`. At most 10 are
// shown per level and step, so past that the last slot becomes a summary pointing at the rest.
import type { Finding, Severity } from "./document.js";
import type { ReportDocument } from "./outline.js";
import { count, measuredVsLimit } from "./format.js";
import { breakCommand, inertText } from "./untrusted.js";

/** The runner shows at most this many annotations of each level per step. */
export const ANNOTATIONS_PER_LEVEL = 10;

const COMMAND: Readonly<Record<Severity, string>> = { error: "error", warning: "warning", note: "notice" };

/** Escapes command data (the message): `%` first, then CR and LF. */
export function escapeData(text: string): string {
  return text.replace(/%/g, "%25").replace(/\r/g, "%0D").replace(/\n/g, "%0A");
}

/** Escapes a property value (file, title): as data, plus `:` and `,`. */
export function escapeProperty(text: string): string {
  return escapeData(text).replace(/:/g, "%3A").replace(/,/g, "%2C");
}

/**
 * Text from a circuit file or team rule: control characters (ESC, BEL, CR, LF…) shown as escapes
 * (inertText), so nothing reaches the runner's log raw, and a leading `::` broken up. The line
 * break between message and fix is ours, added after this.
 */
function neutralise(text: string): string {
  return breakCommand(inertText(text));
}

function annotation(f: Finding): string {
  const numbers = measuredVsLimit(f);
  const message = `${neutralise(`${f.message}${numbers ? ` (${numbers}; scenario ${f.scenario})` : ""}`)}${f.hint ? `\n${neutralise(f.hint)}` : ""}`;
  const props = [
    `file=${escapeProperty(inertText(f.file))}`,
    `line=${f.line}`,
    `col=${f.column}`,
    `title=${escapeProperty(inertText(`opgate ${f.rule}: ${f.subject}`))}`,
  ];
  return `::${COMMAND[f.severity]} ${props.join(",")}::${escapeData(message)}`;
}

/** The annotation lines for a document (empty string when there are no findings). */
export function renderAnnotations(doc: ReportDocument): string {
  const lines: string[] = [];
  for (const severity of ["error", "warning", "note"] as const) {
    // Worst first: non-numeric findings (input errors, crashes), then by how far past the limit.
    const all = doc.circuits
      .flatMap((c) => c.findings.filter((f) => f.severity === severity))
      .map((f, order) => ({ f, order }))
      .sort((a, b) => (a.f.margin ?? -Infinity) - (b.f.margin ?? -Infinity) || a.order - b.order)
      .map((x) => x.f);
    const shown = all.length > ANNOTATIONS_PER_LEVEL ? all.slice(0, ANNOTATIONS_PER_LEVEL - 1) : all;
    for (const f of shown) lines.push(annotation(f));
    const rest = all.length - shown.length;
    if (rest > 0) {
      const noun = severity === "note" ? "note" : severity;
      lines.push(
        `::${COMMAND[severity]} title=${escapeProperty("opgate: more findings")}::` +
          escapeData(`${count(rest, `more ${noun}`)} not annotated here: see the job summary and the code-scanning (SARIF) results.`),
      );
    }
  }
  return lines.length > 0 ? `${lines.join("\n")}\n` : "";
}
