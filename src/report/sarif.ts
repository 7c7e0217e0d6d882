// SARIF 2.1.0 for code-scanning upload: one run, the rules with their docs, one result per
// finding on the circuit file and line of the offending component. Fingerprints hash the rule,
// file and subject (not the line), so moving a component does not reopen an alert.
import { createHash } from "node:crypto";
import type { Finding, RuleEntry, Severity } from "./document.js";
import type { ReportDocument } from "./outline.js";
import { measuredVsLimit } from "./format.js";
import { inertLines, inertText } from "./untrusted.js";

export interface SarifOptions {
  /**
   * The results document's root as a path from the repository root ("" when they are the same,
   * "hardware" when the config sits in hardware/): code scanning resolves URIs from the repository
   * root, whatever folder the check ran in.
   */
  readonly rootFromRepository?: string;
  /** Where opgate's documentation is (the tool's informationUri and each built-in rule's helpUri). */
  readonly informationUri?: string;
  /**
   * The repository's files on the web at this commit (`https://host/owner/repo/blob/<sha>`, from the
   * CI environment): a team rule's helpUri points at its source there.
   */
  readonly repositoryBlobUri?: string;
}

/** opgate's documentation: the package's page (its README, with every built-in rule) for this version. */
export function defaultInformationUri(version: string): string {
  return `https://www.npmjs.com/package/opgate/v/${encodeURIComponent(version)}`;
}

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
function fileUri(path: string, base = ""): string {
  const full = base ? `${base.replace(/\/+$/, "")}/${path}` : path;
  return full
    .split("/")
    .filter((s) => s !== "" && s !== ".")
    .map(encodeURIComponent)
    .join("/");
}

function firstParagraph(text: string): string {
  return text.trim().split(/\n\s*\n/)[0]?.replace(/\s+/g, " ") ?? "";
}

/** The SARIF log as JSON text (2-space indent, trailing newline, stable for the same document). */
export function renderSarif(doc: ReportDocument, options: SarifOptions = {}): string {
  const base = options.rootFromRepository ?? "";
  const informationUri = options.informationUri ?? defaultInformationUri(doc.tool.version);
  const helpUri = (r: RuleEntry): string | undefined =>
    r.source === "builtin" ? informationUri : options.repositoryBlobUri && r.source !== "unknown" ? `${options.repositoryBlobUri.replace(/\/+$/, "")}/${fileUri(r.source, base)}` : undefined;
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
        ruleId: inertText(f.rule),
        ruleIndex: index.get(f.rule)!,
        level: level(f.severity),
        message: { text: inertText(`${f.subject}: ${f.message}${numbers ? ` (${numbers}; worst scenario ${f.scenario}${f.corner ? `: ${f.corner.label}` : ""})` : ""}${f.hint ? ` ${f.hint}` : ""}`) },
        locations: [
          {
            physicalLocation: {
              artifactLocation: { uri: fileUri(f.file, base) },
              region: { startLine: f.line, startColumn: f.column },
            },
          },
        ],
        partialFingerprints: { [FINGERPRINT_KEY]: fingerprint(f, occurrence) },
        properties: {
          circuit: inertText(c.name ?? c.file),
          subject: inertText(f.subject),
          measured: f.measured,
          limit: f.limit,
          unit: f.unit === null ? null : inertText(f.unit),
          margin: f.margin,
          scenario: inertText(f.scenario),
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
            informationUri,
            rules: rules.map((r) => {
              const uri = helpUri(r);
              return {
                id: inertText(r.id),
                shortDescription: { text: inertText(r.description) },
                fullDescription: { text: inertText(firstParagraph(r.docs) || r.description) },
                // The rule's own docs, and what to look for when it fires.
                help: { text: inertLines(r.docs.trim() || r.description) },
                ...(uri ? { helpUri: uri } : {}),
                defaultConfiguration: { level: level(r.severity) },
                properties: { source: inertText(r.source) },
              };
            }),
          },
        },
        results,
      },
    ],
  };
  return `${JSON.stringify(log, (_k, v: unknown) => (typeof v === "number" && !Number.isFinite(v) ? null : v), 2)}\n`;
}
