// One circuit file through every stage: load → scenarios → bias solve → small-signal → rules,
// gathered into the file's entry of the results document. Never throws for a bad file.
import type { CircuitResult, Finding, RuleEntry, Severity } from "../report/document.js";
import type { ResolvedConfig } from "../review/config-types.js";
import type { ConfiguredRule } from "../review/engine.js";
import { runRules } from "../review/engine.js";
import { loadCircuitFile } from "../circuit/index.js";
import type { Circuit, InputError, LibraryUse } from "../circuit/types.js";
import { relative, sep } from "node:path";
import { solveOperatingPoint } from "../solve/index.js";
import { analyseSmallSignal } from "../smallsignal/index.js";
import { buildScenarios } from "../variation/index.js";
import type { ScenarioAnalysis } from "./types.js";
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

/** Solves and linearises one scenario; a throw inside a stage becomes a solve failure, not a crash. */
function analyse(scenario: ScenarioAnalysis["scenario"]): ScenarioAnalysis {
  try {
    const solve = solveOperatingPoint(scenario.circuit);
    const smallSignal = solve.ok ? analyseSmallSignal(scenario.circuit, solve) : null;
    return { scenario, solve, smallSignal };
  } catch (err) {
    const reason = `internal error while solving: ${err instanceof Error ? err.message : String(err)}`;
    return {
      scenario,
      solve: { ok: false, reason, parts: [], nodes: [], stats: { iterations: 0, residual: NaN, aid: "none" } },
      smallSignal: null,
    };
  }
}

/** Checks an already loaded circuit (also used by tests and the rule tester). */
export async function checkCircuit(circuit: Circuit, ctx: CheckContext, displayPath: string): Promise<CircuitResult> {
  const scenarios = buildScenarios(circuit, ctx.config.variation);
  const analyses = scenarios.map(analyse);
  const { findings, passed } = await runRules({ circuit, analyses, rules: ctx.configured });
  const located = [...fileWarningFindings(circuit.warnings, displayPath), ...findings.map((f) => ({ ...f, file: displayPath }))];
  const nominal = analyses[0]!;
  const failOn = ctx.config.failOn;
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
    scenarios: analyses.map((a) => ({ id: a.scenario.id, label: a.scenario.label, converged: a.solve.ok })),
    findings: located,
    passed,
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
