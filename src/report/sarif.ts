// SARIF 2.1.0 for code-scanning upload: one run, the rules with their docs, one result per
// finding on the circuit file and line of the offending component. Fingerprints hash the rule,
// file and subject (not the line), so moving a component does not reopen an alert.
import { createHash } from "node:crypto";
import type { Finding, RuleEntry, Severity } from "./document.js";
import type { CircuitOutline, ReportDocument } from "./outline.js";
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

/** Numbers JSON cannot hold (an unbounded margin) are written as null. */
function finiteOrNull(_k: string, v: unknown): unknown {
  return typeof v === "number" && !Number.isFinite(v) ? null : v;
}

/** Where the results go in the log's text: runs[0].results, as JSON.stringify indents it. */
const RESULTS_MARK = '\n      "results": []';
/** Indentation of one result inside runs[0].results. */
const RESULT_INDENT = "\n        ";

/**
 * The SARIF log as a stream of text: `start` (the tool and its rules, up to the results),
 * `results` per circuit in document order, `end`. Joined, they are renderSarif's text, so a run
 * can write the log from its outlines without holding every result object and the whole text.
 */
export interface SarifWriter {
  readonly start: string;
  /** The results of one circuit (empty when it has no findings); `first` when nothing was written before. */
  results(c: CircuitOutline, first: boolean): string;
  readonly end: string;
}

export function sarifWriter(doc: ReportDocument, options: SarifOptions = {}): SarifWriter {
  const base = options.rootFromRepository ?? "";
  const informationUri = options.informationUri ?? defaultInformationUri(doc.tool.version);
  const helpUri = (r: RuleEntry): string | undefined =>
    r.source === "builtin" ? informationUri : options.repositoryBlobUri && r.source !== "unknown" ? `${options.repositoryBlobUri.replace(/\/+$/, "")}/${fileUri(r.source, base)}` : undefined;
  const rules = [...doc.rules];
  for (const extra of ENGINE_RULES) if (!rules.some((r) => r.id === extra.id)) rules.push(extra);
  // Rules referenced by findings but unknown to the document (a plugin that went missing) still need an entry.
  const known = new Set(rules.map((r) => r.id));
  for (const c of doc.circuits) {
    for (const f of c.findings) {
      if (!known.has(f.rule)) {
        known.add(f.rule);
        rules.push({ id: f.rule, description: `Rule ${f.rule}.`, severity: f.severity, docs: "", source: "unknown" });
      }
    }
  }
  const index = new Map(rules.map((r, i) => [r.id, i]));
  const result = (c: CircuitOutline, f: Finding, seen: Map<string, number>) => {
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
  };
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
        results: [],
      },
    ],
  };
  const text = JSON.stringify(log, finiteOrNull, 2);
  const cut = text.indexOf(RESULTS_MARK) + RESULTS_MARK.length - 1;
  const tail = text.slice(cut);
  // Findings of one rule, file and subject are numbered for their fingerprints, across circuits
  // (a model library's mistake is reported at the library's file for every circuit that uses it).
  const seen = new Map<string, number>();
  return {
    start: text.slice(0, cut),
    results: (c, first) => {
      return c.findings.map((f, i) => `${first && i === 0 ? "" : ","}${RESULT_INDENT}${JSON.stringify(result(c, f, seen), finiteOrNull, 2).replace(/\n/g, RESULT_INDENT)}`).join("");
    },
    end: tail,
  };
}

/** The SARIF log as JSON text (2-space indent, trailing newline, stable for the same document). */
export function renderSarif(doc: ReportDocument, options: SarifOptions = {}): string {
  const w = sarifWriter(doc, options);
  let body = "";
  let written = false;
  for (const c of doc.circuits) {
    const part = w.results(c, !written);
    if (part) written = true;
    body += part;
  }
  return `${w.start}${body}${written ? "\n      " : ""}${w.end}\n`;
}
