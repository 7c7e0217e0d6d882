// The team-rule kit's checker (verifyRule) itself: its verdict must catch a rule that mutates
// its input, a missing, extra or wrong finding, missing passes, a circuit that does not load and
// a badly shaped rule — as plain data that any test runner can assert on.
import { describe, expect, it } from "vitest";
import { defineRule } from "../../src/review/rule.js";
import { judgeCase, loadCaseCircuit, runRuleCase, verifyRule, type RuleTestCase } from "../../src/review/tester.js";
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

describe("verifyRule and judgeCase", () => {
  it("a case whose findings match, by subject, severity and message, has no problems", async () => {
    const c: RuleTestCase = { name: "all", circuit: npnStage(), expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject, severity: "note" as const, messageIncludes: "seen" })) };
    expect(judgeCase(flagsEveryResistor, c, await runRuleCase(flagsEveryResistor, c))).toEqual([]);
  });

  it("names a missing, an extra or a wrong finding, and a missing pass", async () => {
    const base = { name: "wrong", circuit: npnStage() };
    const result = await runRuleCase(flagsEveryResistor, { ...base, expect: [] });
    const judge = (c: Omit<RuleTestCase, "name" | "circuit">) => judgeCase(flagsEveryResistor, { ...base, ...c }, result);
    expect(judge({ expect: [] })).toHaveLength(5);
    expect(judge({ expect: [] })[0]).toMatch(/^unexpected finding: every-resistor on `R1` \(note, scenario nominal\): R1 seen$/);
    expect(judge({ expect: ["R1", "R2", "RC", "RE"].map((subject) => ({ subject })) })).toEqual([expect.stringMatching(/^unexpected finding: every-resistor on `RL`/)]);
    expect(judge({ expect: ["R1", "R2", "RC", "RE", "RL", "RX"].map((subject) => ({ subject })) })).toEqual(["missing finding: every-resistor on `RX`"]);
    const wrongSeverity = judge({ expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject, severity: "error" as const })) });
    expect(wrongSeverity.filter((p) => p.startsWith("missing finding"))).toHaveLength(5);
    expect(wrongSeverity[0]).toBe("missing finding: every-resistor on `R1`, severity error");
    expect(judge({ expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject })), passed: ["Q1"] })).toEqual([expect.stringMatching(/^`Q1` is not among the passed checks/)]);
  });

  it("catches a rule that mutates the analysis it was given", async () => {
    const c: RuleTestCase = { name: "mutation", circuit: npnStage(), expect: [] };
    const result = await runRuleCase(mutates, c);
    expect(result.mutated).toBe(true);
    expect(judgeCase(mutates, c, result)).toEqual(["rule mutates modified the circuit or analyses it was given"]);
  });

  it("returns a verdict per case; a case that does not load is a problem of that case, not a throw", async () => {
    const verdict = await verifyRule(flagsEveryResistor, [
      { name: "holds", circuit: npnStage(), expect: ["R1", "R2", "RC", "RE", "RL"].map((subject) => ({ subject })) },
      { name: "typo", circuit: "components:\n  - { id: R1, kind: resistor, pins: [a, gnd], vaule: 1k }\n", expect: [] },
    ]);
    expect(verdict.rule).toBe("every-resistor");
    expect(verdict.shapeProblems).toEqual([]);
    expect(verdict.ok).toBe(false);
    expect(verdict.cases.map((c) => [c.name, c.ok])).toEqual([["holds", true], ["typo", false]]);
    expect(verdict.cases[0]!.findings).toHaveLength(5);
    expect(verdict.cases[1]!.problems[0]).toMatch(/typo\.yaml:2:\d+: unknown key `vaule`/);
  });

  it("reports a badly shaped rule in shapeProblems", async () => {
    const bad = { ...flagsEveryResistor, id: "Not An Id" };
    const verdict = await verifyRule(bad, []);
    expect(verdict.ok).toBe(false);
    expect(verdict.shapeProblems.length).toBeGreaterThan(0);
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
  it("applies shared options to every case; a case's own options win", async () => {
    // npnStage has five resistors (R1, R2, RC, RE, RL).
    const verdict = await verifyRule(counts, [
      { name: "the table's max of 4 applies", circuit: npnStage(), expect: [{ subject: "the-table-s-max-of-4-applies", messageIncludes: "5 resistors" }] },
      { name: "a case's own options win", circuit: npnStage(), options: { max: 5 }, expect: [] },
    ], { options: { max: 4 } });
    expect(verdict.cases.map((c) => c.problems)).toEqual([[], []]);
    expect(verdict.ok).toBe(true);
  });
});
