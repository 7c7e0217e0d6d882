// One circuit file through every stage: load → (streamed) scenarios → bias solve → small-signal → rules,
// gathered into the file's entry of the results document. Never throws for a bad file.
import type { CircuitResult, Finding, RuleEntry, Severity } from "../report/document.js";
import type { ResolvedConfig } from "../review/config-types.js";
import type { ConfiguredRule } from "../review/engine.js";
import { quantityKey, RuleSession } from "../review/engine.js";
import { sensitivityHint } from "../review/hints.js";
import { sensitivityEntries } from "../variation/sensitivity.js";
import { firstOrderExplains } from "../variation/first-order.js";
import { BUDGET_RULE, runVariation } from "./variation.js";
import { loadCircuitFile } from "../circuit/index.js";
import type { Circuit, InputError, LibraryUse } from "../circuit/types.js";
import { relative, sep } from "node:path";
import { gainEntries, operatingPointEntry } from "./entries.js";
import { withGainExtras } from "./gain-extras.js";

/** Everything a check needs besides the file; built once per process (or worker). */
export interface CheckContext {
  readonly config: ResolvedConfig;
  /** Metadata of every rule in play (built-in and plugins), for the results document. */
  readonly rules: readonly RuleEntry[];
  /** The rules with their configured severity and validated options. */
  readonly configured: readonly ConfiguredRule[];
  /** Paths in results are relative to this folder (forward slashes). */
  readonly root: string;
}

/** How a process (or worker thread) builds its CheckContext: plain data, so it crosses threads. */
export interface CheckContextOptions {
  readonly cwd: string;
  readonly configPath?: string;
  /** `--rule id=severity` flags. */
  readonly ruleFlags?: readonly string[];
  /** `--fail-on` flag. */
  readonly failOn?: Severity;
}

const SEVERITY_RANK: Readonly<Record<Severity, number>> = { note: 0, warning: 1, error: 2 };

export function reachesFailOn(severity: Severity, failOn: Severity): boolean {
  return SEVERITY_RANK[severity] >= SEVERITY_RANK[failOn];
}

export function inputErrorFindings(errors: readonly InputError[], file: string): Finding[] {
  return errors.map((e) => ({
    rule: "input",
    severity: "error" as const,
    subject: e.parts?.[0] ?? e.nodes?.[0] ?? "file",
    message: e.message,
    measured: null,
    limit: null,
    unit: null,
    margin: null,
    scenario: "nominal",
    // An error inside a model library is reported at the library's own file.
    file: e.file || file,
    line: e.line ?? 1,
    column: e.column ?? 1,
    ...(e.hint ? { hint: e.hint } : {}),
  }));
}

/** Findings for the loader's non-fatal remarks (Circuit.warnings): readable, but worth a look. */
export function fileWarningFindings(warnings: readonly InputError[], file: string): Finding[] {
  return inputErrorFindings(warnings, file).map((f) => ({ ...f, rule: FILE_WARNING_RULE, severity: "warning" as const }));
}

export const FILE_WARNING_RULE = "file-warning";

function errorResult(file: string, name: string | null, findings: Finding[], libraries?: readonly LibraryUse[]): CircuitResult {
  return { file, name, status: "error", operatingPoint: null, gains: [], scenarios: [], findings, passed: [], ...librariesEntry(libraries) };
}

/** The results document's record of the model libraries a circuit used (absent when none). */
function librariesEntry(libraries: readonly LibraryUse[] | undefined): { libraries?: LibraryUse[] } {
  return libraries?.length ? { libraries: libraries.map((l) => ({ file: l.file, sha256: l.sha256 })) } : {};
}

/** The config's libraries as a circuit load takes them: absolute path and the repository-relative name. */
export function configLibraries(ctx: CheckContext): { path: string; shown: string }[] {
  return (ctx.config.libraries ?? []).map((path) => ({ path, shown: relative(ctx.root, path).split(sep).join("/") }));
}

/** The word a hint uses for a rule's quantity. */
function quantityWord(rule: string, unit: string | null): string {
  switch (rule) {
    case "headroom":
      return "headroom";
    case "region":
      return "region margin";
    case "device-power":
    case "resistor-power":
      return "dissipation";
    case "device-current":
      return "current";
    case "supply-budget":
      return unit === "W" ? "supply power" : "supply current";
    case "capacitor-voltage":
      return "voltage";
    case "gain-window":
      return "gain";
    default:
      return unit === "dB" ? "deviation" : "value";
  }
}

/** The most sensitivities a finding carries (largest effect first). */
const FINDING_SENSITIVITIES = 12;

/** Checks an already loaded circuit (also used by tests and the rule tester). */
export async function checkCircuit(circuit: Circuit, ctx: CheckContext, displayPath: string): Promise<CircuitResult> {
  const session = new RuleSession({ circuit, rules: ctx.configured });
  const failOn = ctx.config.failOn;
  const v = await runVariation(circuit, ctx.config.variation, session, SEVERITY_RANK[failOn]);
  const { findings, passed } = session.finish();
  const bands = new Map(v.parameters.map((p) => [p.key, p]));
  const corners = v.cornersOf(findings.map((f) => ({ scenario: f.scenario, quantity: f.measured === null ? null : quantityKey(f.rule, f.subject, f.unit) })));
  const decorated = findings.map((f, n): Finding => {
    const corner = corners[n];
    const key = quantityKey(f.rule, f.subject, f.unit);
    // Sensitivities at nominal name parts only where they explain the finding's worst scenario
    // (src/variation/first-order.ts); an MC sample without a parameter set is taken as explained.
    const explained = v.table !== null && f.measured !== null && (corner === undefined || firstOrderExplains(v.table, key, corner.parameters, f.measured));
    const entries = v.table && explained ? sensitivityEntries(v.table, key) : [];
    let hint = f.hint;
    if (entries.length && f.measured !== null && f.limit !== null) hint = sensitivityHint({ measured: f.measured, limit: f.limit, unit: f.unit, quantity: quantityWord(f.rule, f.unit), entries, bands }) ?? hint;
    return {
      ...f,
      file: displayPath,
      ...(hint ? { hint } : {}),
      ...(corner ? { corner } : {}),
      ...(entries.length ? { sensitivities: entries.slice(0, FINDING_SENSITIVITIES) } : {}),
    };
  });
  const budget = v.budget.map(
    (b): Finding => ({ rule: BUDGET_RULE, severity: ctx.config.variation.overBudget ?? "warning", subject: circuit.name, message: b.message, measured: null, limit: null, unit: null, margin: null, scenario: "nominal", file: displayPath, line: circuit.pos.line, column: circuit.pos.column, hint: b.hint }),
  );
  const located = [...fileWarningFindings(circuit.warnings, displayPath), ...budget, ...decorated];
  const nominal = v.nominal;
  const status = !nominal.solve.ok
    ? "error"
    : located.some((f) => reachesFailOn(f.severity, failOn))
      ? "fail"
      : "pass";
  return {
    file: displayPath,
    name: circuit.name,
    status,
    operatingPoint: nominal.solve.ok ? operatingPointEntry(nominal.solve) : null,
    gains: nominal.smallSignal && nominal.solve.ok ? withGainExtras(gainEntries(circuit, nominal.smallSignal), circuit, nominal.solve) : [],
    scenarios: v.scenarios,
    findings: located,
    passed,
    ...(v.summary ? { variation: v.summary } : {}),
    ...(v.monteCarlo ? { monteCarlo: v.monteCarlo } : {}),
    ...librariesEntry(circuit.libraries),
  };
}

export async function checkFile(absPath: string, ctx: CheckContext, displayPath: string): Promise<CircuitResult> {
  const loaded = await loadCircuitFile(absPath, { displayPath, root: ctx.root, libraries: configLibraries(ctx) });
  if (!loaded.ok) return errorResult(displayPath, null, inputErrorFindings(loaded.errors, displayPath), loaded.libraries);
  try {
    return await checkCircuit(loaded.circuit, ctx, displayPath);
  } catch (err) {
    // The engine isolates rules; anything reaching here is a defect of ours. Keep the run going.
    const message = `internal error: ${err instanceof Error ? err.message : String(err)}; please report it with this file`;
    return errorResult(displayPath, loaded.circuit.name, inputErrorFindings([{ file: displayPath, message }], displayPath));
  }
}
