// SARIF 2.1.0 for code-scanning upload: one run, the rules with their docs, one result per
// finding on the circuit file and line of the offending component. Fingerprints hash the rule,
// file and subject (not the line), so moving a component does not reopen an alert.
import { createHash } from "node:crypto";
import type { Finding, ResultsDocument, RuleEntry, Severity } from "./document.js";
import { measuredVsLimit } from "./format.js";

export const SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";
export const FINGERPRINT_KEY = "opgateFinding/v1";

/** Findings the engine itself raises; they are not in the rule registry but need a SARIF rule. */
const ENGINE_RULES: readonly RuleEntry[] = [
  {
    id: "input",
    description: "The circuit file can be read, validated and resolved.",
    severity: "error",
    docs: "Reports a circuit file that cannot be parsed, does not match the circuit schema, or has a value, expression or topology error. The message names the line and column and what to change.",
    source: "builtin",
  },
  {
    id: "internal",
    description: "The check of a circuit file ran to the end.",
    severity: "error",
    docs: "Reports a circuit whose check stopped unexpectedly (a crashed worker, an internal failure). Re-run; if it persists, report it with the file.",
    source: "builtin",
  },
];

type Level = "error" | "warning" | "note" | "none";

function level(s: Severity | "off"): Level {
  return s === "off" ? "none" : s;
}

function fingerprint(f: Finding, occurrence: number): string {
  const hash = createHash("sha256").update(`${f.rule}\u0000${f.file}\u0000${f.subject}`).digest("hex").slice(0, 32);
  return occurrence > 1 ? `${hash}:${occurrence}` : hash;
}

/** A relative URI reference for a repository path: each segment percent-encoded (`#`, `?`, spaces…). */
function fileUri(path: string): string {
  return path.split("/").map(encodeURIComponent).join("/");
}

function firstParagraph(text: string): string {
  return text.trim().split(/\n\s*\n/)[0]?.replace(/\s+/g, " ") ?? "";
}

/** The SARIF log as JSON text (2-space indent, trailing newline, stable for the same document). */
export function renderSarif(doc: ResultsDocument, options: { informationUri?: string } = {}): string {
  const rules = [...doc.rules];
  for (const extra of ENGINE_RULES) if (!rules.some((r) => r.id === extra.id)) rules.push(extra);
  // Rules referenced by findings but unknown to the document (a plugin that went missing) still need an entry.
  for (const c of doc.circuits) {
    for (const f of c.findings) {
      if (!rules.some((r) => r.id === f.rule)) {
        rules.push({ id: f.rule, description: `Rule ${f.rule}.`, severity: f.severity, docs: "", source: "unknown" });
      }
    }
  }
  const index = new Map(rules.map((r, i) => [r.id, i]));
  const seen = new Map<string, number>();
  const results = doc.circuits.flatMap((c) =>
    c.findings.map((f) => {
      const key = `${f.rule}\u0000${f.file}\u0000${f.subject}`;
      const occurrence = (seen.get(key) ?? 0) + 1;
      seen.set(key, occurrence);
      const numbers = measuredVsLimit(f);
      return {
        ruleId: f.rule,
        ruleIndex: index.get(f.rule)!,
        level: level(f.severity),
        message: { text: `${f.subject}: ${f.message}${numbers ? ` (${numbers}; worst scenario ${f.scenario})` : ""}${f.hint ? ` ${f.hint}` : ""}` },
        locations: [
          {
            physicalLocation: {
              artifactLocation: { uri: fileUri(f.file) },
              region: { startLine: f.line, startColumn: f.column },
            },
          },
        ],
        partialFingerprints: { [FINGERPRINT_KEY]: fingerprint(f, occurrence) },
        properties: {
          circuit: c.name ?? c.file,
          subject: f.subject,
          measured: f.measured,
          limit: f.limit,
          unit: f.unit,
          margin: f.margin,
          scenario: f.scenario,
        },
      };
    }),
  );
  const log = {
    $schema: SARIF_SCHEMA,
    version: "2.1.0",
    runs: [
      {
        tool: {
          driver: {
            name: "opgate",
            version: doc.tool.version,
            ...(options.informationUri ? { informationUri: options.informationUri } : {}),
            rules: rules.map((r) => ({
              id: r.id,
              shortDescription: { text: r.description },
              fullDescription: { text: firstParagraph(r.docs) || r.description },
              help: { text: r.docs.trim() || r.description },
              defaultConfiguration: { level: level(r.severity) },
              properties: { source: r.source },
            })),
          },
        },
        results,
      },
    ],
  };
  return `${JSON.stringify(log, (_k, v: unknown) => (typeof v === "number" && !Number.isFinite(v) ? null : v), 2)}\n`;
}
