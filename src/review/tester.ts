// The rule tester: a rule's tests as a table of cases — circuit (YAML snippet, example file, or
// a hand-built circuit with its analyses) + options → expected findings. It also checks the
// rule's shape, that its option defaults validate, and that the rule does not mutate its input.
// Import it in test files only (it uses vitest).
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { loadCircuitText } from "../circuit/index.js";
import type { Circuit } from "../circuit/types.js";
import { analyseSmallSignal } from "../smallsignal/index.js";
import { solveOperatingPoint } from "../solve/index.js";
import { buildScenarios } from "../variation/index.js";
import type { ScenarioAnalysis } from "../pipeline/types.js";
import type { Finding, PassedCheck, Severity } from "../report/document.js";
import type { VariationSettings } from "../variation/types.js";
import { runRules, RuleSession } from "./engine.js";
import { runVariation } from "../pipeline/variation.js";
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
  /** Id and label of every judged scenario (corners carry their parameter set as the label). */
  readonly scenarios?: readonly { readonly id: string; readonly label: string }[];
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

/**
 * The real pipeline from a loaded circuit: scenarios → bias solve → small-signal, per scenario;
 * nominal or Monte Carlo (worst-case corners follow from the rules' readings, so runRuleCase
 * runs them through the engine instead).
 */
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

/** Runs one case through the engine with the one rule; no assertions. */
export async function runRuleCase(rule: Rule, c: RuleTestCase): Promise<RuleTestResult & { mutated: boolean }> {
  let circuit: Circuit;
  let analyses: readonly ScenarioAnalysis[];
  const configured = [{ rule, severity: rule.severity === "off" ? ("error" as const) : rule.severity, options: c.options ?? {}, source: "builtin" }];
  if (typeof c.circuit === "string") {
    circuit = loadCaseCircuit(c.circuit, c.name);
    if (!c.analyses && c.variation && c.variation.mode !== "nominal") {
      // The real variation pipeline: worst-case corners follow from the rule's own readings.
      const session = new RuleSession({ circuit, rules: configured });
      const before = snapshot(circuit);
      const v = await runVariation(circuit, c.variation, session, 2);
      return { ...session.finish(), scenarios: v.scenarios, mutated: snapshot(circuit) !== before };
    }
    analyses = c.analyses ?? analyseCircuit(circuit, c.variation);
  } else {
    if (!c.analyses) throw new Error(`case "${c.name}": a hand-built circuit needs its analyses`);
    circuit = c.circuit;
    analyses = c.analyses;
  }
  const before = snapshot({ circuit, analyses });
  const result = await runRules({ circuit, analyses, rules: configured });
  return { ...result, scenarios: analyses.map((a) => ({ id: a.scenario.id, label: a.scenario.label })), mutated: snapshot({ circuit, analyses }) !== before };
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

/** Settings shared by every case of a table (a case's own value wins). */
export interface RuleTesterDefaults {
  readonly options?: Readonly<Record<string, unknown>>;
  readonly variation?: VariationSettings;
}

/**
 * `ruleTester(rule).run([...cases])` inside a vitest file: one `it` per case, plus a check of
 * the rule's shape and option defaults. Options or variation shared by a table go in `defaults`.
 */
export function ruleTester(rule: Rule, defaults: RuleTesterDefaults = {}): { run(cases: readonly RuleTestCase[]): void } {
  return {
    run(cases) {
      describe(`rule ${rule.id}`, () => {
        it("has the shape of a rule, and its option defaults validate", () => {
          expect(ruleShapeProblems(rule)).toEqual([]);
          expect(() => defaultOptions(rule)).not.toThrow();
        });
        for (const given of cases) {
          const c: RuleTestCase = {
            ...given,
            ...((given.options ?? defaults.options) ? { options: { ...defaults.options, ...given.options } } : {}),
            ...((given.variation ?? defaults.variation) ? { variation: given.variation ?? defaults.variation! } : {}),
          };
          it(c.name, async () => {
            assertCase(rule, c, await runRuleCase(rule, c));
          });
        }
      });
    },
  };
}
