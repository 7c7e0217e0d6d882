// Assembles the results document from per-file results: circuits sorted by file, each circuit's
// status recomputed against the run's failOn (so `--fail-on` and config agree everywhere),
// the summary and the verdict. Also the exit code a document implies.
import type { CircuitResult, CircuitStatus, Finding, ResultsDocument, RuleEntry, Severity, Summary } from "./document.js";
import type { DocumentHead } from "./outline.js";

export const RESULTS_FORMAT = "opgate-results/1" as const;

/** Findings of these rules mean the circuit could not be checked at all: status "error", exit 2. */
export const ERROR_RULES: ReadonlySet<string> = new Set(["input", "internal"]);

const SEVERITY_RANK: Readonly<Record<Severity, number>> = { note: 1, warning: 2, error: 3 };

export function severityRank(s: Severity): number {
  return SEVERITY_RANK[s];
}

/** True when a finding of severity `s` fails a run whose failOn is `failOn`. */
export function reaches(s: Severity, failOn: Severity): boolean {
  return SEVERITY_RANK[s] >= SEVERITY_RANK[failOn];
}

export interface BuildOptions {
  readonly rules: readonly RuleEntry[];
  readonly failOn: Severity;
  readonly variation: ResultsDocument["variation"];
  readonly shard?: ResultsDocument["shard"];
  readonly version: string;
  /** ISO time; only when the user asked for it (reports are reproducible otherwise). */
  readonly timestamp?: string;
}

/** Plain code-point order, the same on every machine and locale (shards depend on it). */
export function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

function compareFindings(a: Finding, b: Finding): number {
  return (
    a.line - b.line ||
    a.column - b.column ||
    SEVERITY_RANK[b.severity] - SEVERITY_RANK[a.severity] ||
    compareText(a.rule, b.rule) ||
    compareText(a.subject, b.subject) ||
    compareText(a.message, b.message)
  );
}

export function statusFor(c: Pick<CircuitResult, "status" | "findings">, failOn: Severity): CircuitStatus {
  if (c.status === "error" || c.findings.some((f) => ERROR_RULES.has(f.rule))) return "error";
  return c.findings.some((f) => reaches(f.severity, failOn)) ? "fail" : "pass";
}

/** A circuit as the document holds it: status against failOn, findings and passed checks in report order. */
export function normaliseCircuit(c: CircuitResult, failOn: Severity): CircuitResult {
  return {
    ...c,
    status: statusFor(c, failOn),
    findings: [...c.findings].sort(compareFindings),
    passed: [...c.passed].sort((a, b) => compareText(a.rule, b.rule) || compareText(a.subject, b.subject)),
  };
}

export function summarise(circuits: readonly Pick<CircuitResult, "status" | "findings">[], failOn: Severity): Summary {
  const findings = { error: 0, warning: 0, note: 0 };
  let passed = 0;
  let failed = 0;
  let errors = 0;
  for (const c of circuits) {
    if (c.status === "pass") passed++;
    else if (c.status === "fail") failed++;
    else errors++;
    for (const f of c.findings) findings[f.severity]++;
  }
  const verdict = errors > 0 ? "error" : failed > 0 ? "fail" : "pass";
  return { circuits: circuits.length, passed, failed, errors, findings, failOn, verdict };
}

/** The document without its circuits and summary: what a streamed run writes before the first result. */
export function documentHead(options: BuildOptions): DocumentHead {
  const rules = [...options.rules].sort((a, b) => compareText(a.id, b.id));
  return {
    format: RESULTS_FORMAT,
    tool: { name: "opgate", version: options.version },
    ...(options.shard ? { shard: { ...options.shard, files: [...options.shard.files].sort(compareText) } } : {}),
    variation: options.variation,
    rules,
    ...(options.timestamp ? { generatedAt: options.timestamp } : {}),
  };
}

export function buildDocument(circuits: readonly CircuitResult[], options: BuildOptions): ResultsDocument {
  const sorted = circuits
    .map((c) => normaliseCircuit(c, options.failOn))
    .sort((a, b) => compareText(a.file, b.file));
  const { generatedAt, ...head } = documentHead(options);
  return { ...head, circuits: sorted, summary: summarise(sorted, options.failOn), ...(generatedAt ? { generatedAt } : {}) };
}

/** 2 when any circuit could not be checked, 1 when a finding reaches failOn, else 0. */
export function exitCodeFor(doc: { readonly summary: Summary }): number {
  if (doc.summary.verdict === "error") return 2;
  return doc.summary.verdict === "fail" ? 1 : 0;
}
