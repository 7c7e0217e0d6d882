// Text that comes from a circuit file or a team rule (file names, ids, subjects, units, messages
// quoting values) is untrusted in every sink. These helpers neutralise it per sink:
// - terminal: no control character reaches the terminal or the CI log raw (ESC starts colour and
//   cursor sequences, BEL rings, CR/LF start a new line that the Actions runner would read as a
//   `::command`), and no bidirectional override reorders what the reader sees;
// - plain text for XML, SARIF and annotation messages: the same characters made visible.
// Markdown is neutralised by its serializer (src/report/markdown.ts), not here.

/**
 * C0 controls (including TAB, LF, CR), DEL, C1 controls, the line and paragraph separators, and the
 * bidirectional embedding/override/isolate controls (Unicode TR9; the "Trojan Source" class of
 * confusions, CVE-2021-42574).
 */
const UNSAFE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069\u061c]/g;

const NAMED: Readonly<Record<string, string>> = { "\n": "\\n", "\r": "\\r", "\t": "\\t", "\u001b": "\\e" };

function visible(ch: string): string {
  const named = NAMED[ch];
  if (named) return named;
  const code = ch.codePointAt(0)!;
  return code <= 0xff ? `\\x${code.toString(16).padStart(2, "0")}` : `\\u${code.toString(16).padStart(4, "0")}`;
}

/** One line of inert text: every control character and bidi control shown as an escape (`\e`, `\n`, `\x07`). */
export function inertText(text: string): string {
  return text.replace(UNSAFE, visible);
}

/** Like inertText, but line breaks (normalised to LF) and tabs stay: for multi-line docs in JSON or XML. */
export function inertLines(text: string): string {
  return text
    .replace(/\r\n?/g, "\n")
    .split("\n")
    .map((line) => line.split("\t").map(inertText).join("\t"))
    .join("\n");
}

/** A line that starts with `::` (after blanks) would be read by the Actions runner as a command: break the pair. */
export function breakCommand(line: string): string {
  return line.replace(/^(\s*):(?=:)/, "$1:\u200b");
}
