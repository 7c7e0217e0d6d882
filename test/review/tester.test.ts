// The rule tester itself: it must catch a rule that mutates its input, a wrong expectation,
// missing passes, and a circuit snippet that does not load.
import { describe, expect, it } from "vitest";
import { defineRule } from "../../src/review/rule.js";
import { assertCase, loadCaseCircuit, ruleTester, runRuleCase, type RuleTestCase } from "../../src/review/tester.js";
import { npnStage } from "./circuits.js";

const flagsEveryResistor = defineRule({
  id: "every-resistor",
  description: "Checks nothing; reports every resistor",
  severity: "note",
  docs: "A test rule.",
  check({ circuit }, report) {
    for (const c of circuit.components) if (c.kind === "resistor") report.fail({ subject: c.id, message: `${c.id} seen` });
  },
});

const mutates = defineRule({
  id: "mutates",
  description: "Changes the operating point it was given",
  severity: "note",
  docs: "A test rule that breaks the read-only contract.",
  check({ op }) {
    (op.nodes as Record<string, number>)["col"] = 0;
  },
});

describe("rule tester", () => {
  it("passes a case whose findings match, by subject, severity and message", async () => {
    const c: RuleTestCase = { name: "all", circuit: npnStage(), expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject, severity: "note" as const, messageIncludes: "seen" })) };
    assertCase(flagsEveryResistor, c, await runRuleCase(flagsEveryResistor, c));
  });

  it("fails a case with a missing, an extra or a wrong finding", async () => {
    const base = { name: "wrong", circuit: npnStage() };
    const result = await runRuleCase(flagsEveryResistor, { ...base, expect: [] });
    expect(() => assertCase(flagsEveryResistor, { ...base, expect: [] }, result)).toThrow(/findings of every-resistor/);
    expect(() => assertCase(flagsEveryResistor, { ...base, expect: ["R1", "R2", "RC", "RE"].map((subject) => ({ subject })) }, result)).toThrow();
    expect(() => assertCase(flagsEveryResistor, { ...base, expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject, severity: "error" as const })) }, result)).toThrow();
    expect(() => assertCase(flagsEveryResistor, { ...base, expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject })), passed: ["Q1"] }, result)).toThrow(/passed checks/);
  });

  it("catches a rule that mutates the analysis it was given", async () => {
    const c: RuleTestCase = { name: "mutation", circuit: npnStage(), expect: [] };
    const result = await runRuleCase(mutates, c);
    expect(result.mutated).toBe(true);
    expect(() => assertCase(mutates, c, result)).toThrow(/modified the circuit or analyses/);
  });

  it("names the line of a snippet that does not load", () => {
    expect(() => loadCaseCircuit("components:\n  - { id: R1, kind: resistor, pins: [a, gnd], vaule: 1k }\n", "typo")).toThrow(/typo\.yaml:2:\d+: unknown key `vaule`/);
  });

  it("loads an example file by path", () => {
    expect(loadCaseCircuit("examples/tide-gauge-preamp.yaml", "example").name).toBe("tide-gauge-preamp");
  });
});

describe("table defaults", () => {
  const counts = defineRule({
    id: "resistor-count",
    description: "Checks the number of resistors",
    severity: "warning",
    options: { type: "object", additionalProperties: false, properties: { max: { type: "integer", default: 10 } } },
    docs: "A test rule.",
    check({ circuit, options }, report) {
      const n = circuit.components.filter((c) => c.kind === "resistor").length;
      if (n > options.max) report.fail({ subject: circuit.name, message: `${n} resistors`, measured: n, limit: options.max, bound: "max" });
    },
  });
  // npnStage has five resistors (R1, R2, RC, RE, RL).
  ruleTester(counts, { options: { max: 4 } }).run([
    { name: "the table's max of 4 applies", circuit: npnStage(), expect: [{ subject: "the-table-s-max-of-4-applies", messageIncludes: "5 resistors" }] },
    { name: "a case's own options win", circuit: npnStage(), options: { max: 5 }, expect: [] },
  ]);
});
