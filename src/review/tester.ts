// The team-rule kit's checker: a rule's tests as a table of cases — circuit (YAML snippet,
// example file, or a hand-built circuit with its analyses) + options → expected findings.
// `verifyRule` runs every case through the real loader, solve and engine and returns a verdict
// per case (problems as plain sentences), so any test runner can assert on it; it also checks
// the rule's shape, that its option defaults validate, and that the rule does not modify its input.
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { loadCircuitText } from "../circuit/index.js";
import type { Circuit } from "../circuit/types.js";
import { analyseSmallSignal } from "../smallsignal/index.js";
import { solveOperatingPoint } from "../solve/index.js";
import { buildScenarios } from "../variation/index.js";
import type { ScenarioAnalysis } from "../pipeline/types.js";
import type { Finding, PassedCheck, Severity } from "../report/document.js";
import type { VariationSettings } from "../variation/types.js";
import { runRules } from "./engine.js";
import { defaultOptions } from "./options.js";
import { ruleShapeProblems, type Rule } from "./rule.js";

export interface ExpectedFinding {
  readonly subject: string;
  readonly severity?: Severity;
  readonly messageIncludes?: string;
  /** Defaults to the rule under test. */
  readonly rule?: string;
  readonly scenario?: string;
}

export interface RuleTestCase {
  readonly name: string;
  /** YAML/JSON circuit text, a path to a circuit file, or a hand-built Circuit (then give `analyses`). */
  readonly circuit: string | Circuit;
  /** Hand-built scenario analyses, for a hand-built circuit. */
  readonly analyses?: readonly ScenarioAnalysis[];
  readonly options?: Readonly<Record<string, unknown>>;
  /** Scenarios to build for a circuit text (default: nominal only). */
  readonly variation?: VariationSettings;
  /** Every finding the case must produce (an empty list: none at all). */
  readonly expect: readonly ExpectedFinding[];
  /** Subjects that must appear among the passed checks. */
  readonly passed?: readonly string[];
}

export interface RuleTestResult {
  readonly findings: Finding[];
  readonly passed: PassedCheck[];
}

/** What one case produced and what is wrong with it; `problems` is empty when the case holds. */
export interface CaseVerdict extends RuleTestResult {
  readonly name: string;
  readonly ok: boolean;
  readonly problems: readonly string[];
}

/** The verdict on a rule and its table: `ok` when the rule's shape and every case hold. */
export interface RuleVerdict {
  readonly rule: string;
  readonly ok: boolean;
  /** Problems with the rule itself (shape, option defaults); empty when it is well formed. */
  readonly shapeProblems: readonly string[];
  readonly cases: readonly CaseVerdict[];
}

/** Settings shared by every case of a table (a case's own value wins). */
export interface SharedCaseSettings {
  readonly options?: Readonly<Record<string, unknown>>;
  readonly variation?: VariationSettings;
}

const NOMINAL: VariationSettings = { mode: "nominal", samples: 1, seed: 1 };
const FILE_REFERENCE = /^[^\n]+\.(ya?ml|json)$/i;

/** A circuit name from a case name (names start with a letter). */
function slug(text: string): string {
  const s = text.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60);
  return /^[a-z]/.test(s) ? s : `case-${s}`;
}

/**
 * Loads a case's circuit through the real loader: a path to a circuit file (relative to the
 * working folder), or a snippet. A snippet may leave out `format:` and `name:`; they are added
 * after its last line.
 */
export function loadCaseCircuit(source: string, caseName: string): Circuit {
  let text: string;
  let file: string;
  if (FILE_REFERENCE.test(source.trim())) {
    file = source.trim();
    text = readFileSync(resolve(file), "utf8");
  } else {
    file = `${slug(caseName)}.yaml`;
    text = source;
    // Added at the end, so that line numbers in messages are the snippet's own.
    if (!/^format:/m.test(text)) text = `${text}\nformat: opgate-circuit/1`;
    if (!/^name:/m.test(text)) text = `${text}\nname: ${slug(caseName)}\n`;
  }
  const loaded = loadCircuitText(text, file);
  if (!loaded.ok) {
    const list = loaded.errors.map((e) => `  ${e.file}:${e.line ?? "?"}:${e.column ?? "?"}: ${e.message}${e.hint ? ` — ${e.hint}` : ""}`).join("\n");
    throw new Error(`case "${caseName}": the circuit does not load:\n${list}`);
  }
  return loaded.circuit;
}

/** The real pipeline from a loaded circuit: scenarios → bias solve → small-signal, per scenario. */
export function analyseCircuit(circuit: Circuit, variation: VariationSettings = NOMINAL): ScenarioAnalysis[] {
  return buildScenarios(circuit, variation).map((scenario) => {
    const solve = solveOperatingPoint(scenario.circuit);
    return { scenario, solve, smallSignal: solve.ok ? analyseSmallSignal(scenario.circuit, solve) : null };
  });
}

/** A serialisable picture of a value (Maps included) to detect mutation. */
function snapshot(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) => (v instanceof Map ? { map: [...v.entries()] } : typeof v === "number" && !Number.isFinite(v) ? String(v) : v));
}

/** Runs one case through the engine with the one rule; no judgement. */
export async function runRuleCase(rule: Rule, c: RuleTestCase): Promise<RuleTestResult & { mutated: boolean }> {
  let circuit: Circuit;
  let analyses: readonly ScenarioAnalysis[];
  if (typeof c.circuit === "string") {
    circuit = loadCaseCircuit(c.circuit, c.name);
    analyses = c.analyses ?? analyseCircuit(circuit, c.variation);
  } else {
    if (!c.analyses) throw new Error(`case "${c.name}": a hand-built circuit needs its analyses`);
    circuit = c.circuit;
    analyses = c.analyses;
  }
  const before = snapshot({ circuit, analyses });
  const result = await runRules({
    circuit,
    analyses,
    rules: [{ rule, severity: rule.severity === "off" ? "error" : rule.severity, options: c.options ?? {}, source: "builtin" }],
  });
  return { ...result, mutated: snapshot({ circuit, analyses }) !== before };
}

function matches(rule: Rule, e: ExpectedFinding, f: Finding): boolean {
  return (
    f.rule === (e.rule ?? rule.id) &&
    f.subject === e.subject &&
    (e.severity === undefined || f.severity === e.severity) &&
    (e.scenario === undefined || f.scenario === e.scenario) &&
    (e.messageIncludes === undefined || f.message.includes(e.messageIncludes))
  );
}

function describeExpected(rule: Rule, e: ExpectedFinding): string {
  const parts = [`${e.rule ?? rule.id} on \`${e.subject}\``];
  if (e.severity) parts.push(`severity ${e.severity}`);
  if (e.scenario) parts.push(`scenario ${e.scenario}`);
  if (e.messageIncludes) parts.push(`message containing "${e.messageIncludes}"`);
  return parts.join(", ");
}

function describeFinding(f: Finding): string {
  return `${f.rule} on \`${f.subject}\` (${f.severity}, scenario ${f.scenario}): ${f.message}`;
}

/**
 * Judges one case's result against its expectations: every expected finding matched by its own
 * finding (in any order), no finding left over, every `passed` subject among the passed
 * checks, nothing modified. Returns the problems as sentences; none = the case holds.
 */
export function judgeCase(rule: Rule, c: RuleTestCase, result: RuleTestResult & { mutated: boolean }): string[] {
  const problems: string[] = [];
  if (result.mutated) problems.push(`rule ${rule.id} modified the circuit or analyses it was given`);
  const left = [...result.findings];
  for (const e of c.expect) {
    const k = left.findIndex((f) => matches(rule, e, f));
    if (k >= 0) left.splice(k, 1);
    else problems.push(`missing finding: ${describeExpected(rule, e)}`);
  }
  for (const f of left) problems.push(`unexpected finding: ${describeFinding(f)}`);
  const passedSubjects = result.passed.map((p) => p.subject);
  for (const subject of c.passed ?? []) {
    if (!passedSubjects.includes(subject)) problems.push(`\`${subject}\` is not among the passed checks (${passedSubjects.join(", ") || "none"})`);
  }
  return problems;
}

/**
 * Verifies a rule against a table of cases. Never throws for a failing case: a case whose
 * circuit does not load, or whose rule run throws, gets that as its problem.
 */
export async function verifyRule(rule: Rule, cases: readonly RuleTestCase[], shared: SharedCaseSettings = {}): Promise<RuleVerdict> {
  const shapeProblems = [...ruleShapeProblems(rule)];
  try {
    defaultOptions(rule);
  } catch (err) {
    shapeProblems.push(`the option defaults do not validate: ${err instanceof Error ? err.message : String(err)}`);
  }
  const verdicts: CaseVerdict[] = [];
  for (const given of cases) {
    const c: RuleTestCase = {
      ...given,
      ...((given.options ?? shared.options) ? { options: { ...shared.options, ...given.options } } : {}),
      ...((given.variation ?? shared.variation) ? { variation: given.variation ?? shared.variation! } : {}),
    };
    try {
      const result = await runRuleCase(rule, c);
      const problems = judgeCase(rule, c, result);
      verdicts.push({ name: c.name, ok: problems.length === 0, problems, findings: result.findings, passed: result.passed });
    } catch (err) {
      verdicts.push({ name: c.name, ok: false, problems: [err instanceof Error ? err.message : String(err)], findings: [], passed: [] });
    }
  }
  return { rule: rule.id, ok: shapeProblems.length === 0 && verdicts.every((v) => v.ok), shapeProblems, cases: verdicts };
}
