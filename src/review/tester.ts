// The rule tester: a rule's tests as a table of cases — circuit (YAML snippet, example file, or
// a hand-built circuit with its analyses) + options → expected findings. It also checks the
// rule's shape, that its option defaults validate, and that the rule does not mutate its input.
// Import it in test files only (it uses vitest).
import { describe, expect, it } from "vitest";
import type { Circuit } from "../circuit/types.js";
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

export type CircuitAnalyser = (text: string, variation: VariationSettings | undefined) => Promise<{ circuit: Circuit; analyses: ScenarioAnalysis[] }>;

let analyser: CircuitAnalyser | undefined;

/** Registers how circuit texts are loaded and analysed (the real pipeline; see tester-pipeline.ts). */
export function setCircuitAnalyser(a: CircuitAnalyser): void {
  analyser = a;
}

/** A serialisable picture of a value (Maps included) to detect mutation. */
function snapshot(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) => (v instanceof Map ? { map: [...v.entries()] } : typeof v === "number" && !Number.isFinite(v) ? String(v) : v));
}

/** Runs one case through the engine with the one rule; no assertions. */
export async function runRuleCase(rule: Rule, c: RuleTestCase): Promise<RuleTestResult & { mutated: boolean }> {
  let circuit: Circuit;
  let analyses: readonly ScenarioAnalysis[];
  if (typeof c.circuit === "string") {
    if (!analyser) throw new Error("no circuit analyser registered: import src/review/tester-pipeline.js, or give a hand-built circuit with analyses");
    ({ circuit, analyses } = await analyser(c.circuit, c.variation));
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

function sortKey(x: { subject: string; message?: string }): string {
  return x.subject;
}

/** Asserts a case's findings against its expectations (vitest `expect`). */
export function assertCase(rule: Rule, c: RuleTestCase, result: RuleTestResult & { mutated: boolean }): void {
  expect(result.mutated, `rule ${rule.id} modified the circuit or analyses it was given`).toBe(false);
  const actual = [...result.findings].sort((a, b) => sortKey(a).localeCompare(sortKey(b)));
  const wanted = [...c.expect].sort((a, b) => sortKey(a).localeCompare(sortKey(b)));
  const shown = actual.map((f) => ({ rule: f.rule, subject: f.subject, severity: f.severity, scenario: f.scenario, message: f.message }));
  expect(shown, `findings of ${rule.id} in "${c.name}"`).toEqual(
    wanted.map((e) =>
      expect.objectContaining({
        rule: e.rule ?? rule.id,
        subject: e.subject,
        ...(e.severity ? { severity: e.severity } : {}),
        ...(e.scenario ? { scenario: e.scenario } : {}),
        ...(e.messageIncludes ? { message: expect.stringContaining(e.messageIncludes) } : {}),
      }),
    ),
  );
  for (const subject of c.passed ?? [])
    expect(result.passed.map((p) => p.subject), `passed checks of ${rule.id} in "${c.name}"`).toContain(subject);
}

/** `ruleTester(rule).run([...cases])` inside a vitest file: one `it` per case plus shape checks. */
export function ruleTester(rule: Rule): { run(cases: readonly RuleTestCase[]): void } {
  return {
    run(cases) {
      describe(`rule ${rule.id}`, () => {
        it("has the shape of a rule, and its option defaults validate", () => {
          expect(ruleShapeProblems(rule)).toEqual([]);
          expect(() => defaultOptions(rule)).not.toThrow();
        });
        for (const c of cases) {
          it(c.name, async () => {
            assertCase(rule, c, await runRuleCase(rule, c));
          });
        }
      });
    },
  };
}
