// The rule engine: crash isolation, time limit, option validation, worst scenario, overrides,
// determinism. Hand-built analyses so every measured value is exact.
import { describe, expect, it } from "vitest";
import { marginOf, runRules, validateRuleOptions, type ConfiguredRule } from "../../src/review/engine.js";
import { ConfigError } from "../../src/review/errors.js";
import { defineRule, type Rule } from "../../src/review/rule.js";
import headroom from "../../rules/headroom.js";
import { analysis, at, bjt, bjtPoint, circuit, failure, op } from "./fixtures.js";

const builtin = (rule: Rule, options: Record<string, unknown> = {}, severity: ConfiguredRule["severity"] = "error"): ConfiguredRule => ({ rule, severity, options, source: "builtin" });

const threeStages = circuit({ components: [bjt("Q1", "npn", 10), bjt("Q2", "pnp", 12), bjt("Q3", "npn", 14)] });

describe("marginOf", () => {
  it("is (limit − measured)/|limit| for a maximum and (measured − limit)/|limit| for a minimum", () => {
    expect(marginOf(0.4, 0.5, "max")).toBeCloseTo(0.2, 12);
    expect(marginOf(0.6, 0.5, "max")).toBeCloseTo(-0.2, 12);
    expect(marginOf(0.45, 0.5, "min")).toBeCloseTo(-0.1, 12);
    expect(marginOf(-9.5, -9, "max")).toBeCloseTo(0.5 / 9, 12); // negative limits use |limit|
    expect(marginOf(0.1, 0, "max")).toBeCloseTo(-0.1, 12); // a zero limit gives an absolute margin
    expect(marginOf(undefined, 1, "max")).toBeNull();
  });
});

describe("crash isolation", () => {
  const thrower = defineRule({ id: "throws", description: "Throws", severity: "warning", docs: "d", check() { throw new RangeError("index 7 out of range"); } });
  const hangs = defineRule({ id: "hangs", description: "Never finishes", severity: "warning", docs: "d", check: () => new Promise<void>(() => {}) });
  const late = defineRule({
    id: "late",
    description: "Reports after its time is up",
    severity: "warning",
    docs: "d",
    check: (view, report) =>
      new Promise<void>((resolve) => {
        setTimeout(() => { report.fail({ subject: "Q1", message: "too late" }); resolve(); }, 120);
      }),
  });

  it("turns a throw and a runaway rule into error findings and still runs the others", async () => {
    const analyses = [analysis(threeStages, op({ Q1: bjtPoint("npn", { headroom: 0.2 }), Q2: bjtPoint("pnp"), Q3: bjtPoint("npn") }))];
    const rules: ConfiguredRule[] = [builtin(thrower, {}, "warning"), { ...builtin(hangs, {}, "note"), source: "team-rules/hangs.ts" }, builtin(headroom)];
    const { findings } = await runRules({ circuit: threeStages, analyses, rules, timeLimitMs: 50 });
    const byRule = Object.fromEntries(findings.map((f) => [f.rule, f]));
    expect(byRule.throws).toMatchObject({ severity: "error", subject: "tide-gauge-front-end", line: 1, scenario: "nominal" });
    expect(byRule.throws!.message).toContain("RangeError: index 7 out of range");
    expect(byRule.hangs).toMatchObject({ severity: "error", subject: "tide-gauge-front-end" });
    expect(byRule.hangs!.message).toContain("longer than 0.05 s");
    expect(byRule.hangs!.hint).toContain("team-rules/hangs.ts");
    expect(byRule.headroom).toMatchObject({ subject: "Q1", severity: "error", line: 10 });
  });

  it("stops a team rule stuck in a synchronous loop", async () => {
    const spins = defineRule({ id: "spins", description: "Loops forever without yielding", severity: "note", docs: "d", check() { for (;;) { /* never yields */ } } });
    const c = circuit({ components: [bjt("Q1", "npn", 10)] });
    const analyses = [analysis(c, op({ Q1: bjtPoint("npn", { headroom: 0.1 }) }))];
    const { findings } = await runRules({ circuit: c, analyses, rules: [{ ...builtin(spins), source: "team-rules/spins.mjs" }, builtin(headroom)], timeLimitMs: 100 });
    expect(findings.map((f) => [f.rule, f.subject, f.severity])).toEqual([["spins", "tide-gauge-front-end", "error"], ["headroom", "Q1", "error"]]);
    expect(findings[0]!.message).toContain("ran longer than 0.1 s without returning");
  });

  it("ignores what a rule reports after its time limit", async () => {
    const analyses = [analysis(threeStages, op({}))];
    const { findings } = await runRules({ circuit: threeStages, analyses, rules: [builtin(late)], timeLimitMs: 30 });
    expect(findings.map((f) => f.subject)).toEqual(["tide-gauge-front-end"]);
    await new Promise((r) => setTimeout(r, 150));
    expect(findings).toHaveLength(1);
  });

  it("skips rules set to off", async () => {
    const { findings, passed } = await runRules({ circuit: threeStages, analyses: [analysis(threeStages, op({}))], rules: [builtin(thrower, {}, "off")] });
    expect(findings).toEqual([]);
    expect(passed).toEqual([]);
  });
});

describe("option validation", () => {
  const origin = { file: "opgate.config.yaml", pos: { file: "opgate.config.yaml", line: 7, column: 5 }, keyPos: { bjt: { file: "opgate.config.yaml", line: 8, column: 7 } } };

  it("rejects an unknown option with the rule, key, did-you-mean and config line, before any rule runs", async () => {
    let ran = false;
    const spy = defineRule({ id: "spy", description: "Records that it ran", severity: "note", docs: "d", check() { ran = true; } });
    const run = runRules({ circuit: threeStages, analyses: [analysis(threeStages, op({}))], rules: [builtin(spy), { ...builtin(headroom, { bjtt: 0.7 }), origin }] });
    await expect(run).rejects.toBeInstanceOf(ConfigError);
    const err = (await run.catch((e: unknown) => e)) as ConfigError;
    expect(err.problems[0]).toMatchObject({ file: "opgate.config.yaml", line: 7, message: "unknown option `bjtt` for rule `headroom`", hint: "did you mean `bjt`?" });
    expect(ran).toBe(false);
  });

  it("rejects a value of the wrong type with the value received and the key's line", async () => {
    const err = (await runRules({ circuit: threeStages, analyses: [], rules: [{ ...builtin(headroom, { bjt: "half a volt", mos: -1 }), origin }] }).catch((e: unknown) => e)) as ConfigError;
    expect(err).toBeInstanceOf(ConfigError);
    expect(err.problems).toHaveLength(2);
    expect(err.problems[0]).toMatchObject({ line: 8, column: 7 });
    expect(err.problems[0]!.message).toBe('option `bjt` of rule `headroom` must be number, got "half a volt"');
    expect(err.problems[1]!.message).toBe("option `mos` of rule `headroom` must be >= 0, got -1");
    expect(err.message).toContain("opgate.config.yaml:8:7: error:");
  });

  it("validates a frozen rule list once, and a list that may still change every time", () => {
    const frozen = Object.freeze([Object.freeze(builtin(headroom, { bjt: 0.7 }))]);
    const first = validateRuleOptions(frozen);
    expect(validateRuleOptions(frozen)).toBe(first);
    expect(first[0]!.options).toMatchObject({ bjt: 0.7 });
    // An open list is checked again, so a later edit is still caught.
    const open = [builtin(headroom, { bjt: 0.7 })];
    validateRuleOptions(open);
    open[0] = builtin(headroom, { bjt: "half a volt" });
    expect(() => validateRuleOptions(open)).toThrow(ConfigError);
  });

  it("fills in defaults without touching the caller's object", async () => {
    const given = { bjt: 0.1 };
    const c = circuit({ components: [bjt("Q1", "npn", 10)] });
    const { passed } = await runRules({ circuit: c, analyses: [analysis(c, op({ Q1: bjtPoint("npn", { headroom: 0.2 }) }))], rules: [builtin(headroom, given)] });
    expect(passed[0]).toMatchObject({ subject: "Q1", limit: 0.1 });
    expect(given).toEqual({ bjt: 0.1 });
  });
});

describe("worst scenario", () => {
  const c = circuit({ components: [bjt("Q1", "npn", 10)] });
  const at = (id: string, headroomV: number) => analysis(c, op({ Q1: bjtPoint("npn", { headroom: headroomV }) }), id);

  it("keeps the failing scenario with the lowest margin", async () => {
    const { findings, passed } = await runRules({ circuit: c, analyses: [at("nominal", 1.2), at("corner-01", 0.3), at("corner-02", 0.1), at("corner-03", 0.4)], rules: [builtin(headroom)] });
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ subject: "Q1", scenario: "corner-02", measured: 0.1, limit: 0.5 });
    expect(findings[0]!.margin).toBeCloseTo(-0.8, 12);
    expect(passed).toEqual([]); // a failure anywhere beats the passes elsewhere
  });

  it("keeps the pass with the lowest margin when every scenario passes", async () => {
    const { findings, passed } = await runRules({ circuit: c, analyses: [at("nominal", 1.2), at("corner-01", 0.9), at("corner-02", 2)], rules: [builtin(headroom)] });
    expect(findings).toEqual([]);
    expect(passed).toEqual([{ rule: "headroom", subject: "Q1", measured: 0.9, limit: 0.5, unit: "V", margin: expect.closeTo(0.8, 12), scenario: "corner-01" }]);
  });

  it("skips scenarios whose solve failed for ordinary rules", async () => {
    const { findings } = await runRules({ circuit: c, analyses: [at("nominal", 1.2), analysis(c, failure("did not converge"), "corner-01")], rules: [builtin(headroom)] });
    expect(findings).toEqual([]);
  });
});

describe("circuit overrides", () => {
  const override = (options: Record<string, unknown>, rule = "headroom") => [{ rule, options, reason: "output stage swings little", pos: at(40, 5) }];
  const point = op({ Q1: bjtPoint("npn", { headroom: 0.3 }) });

  it("applies an option the rule lets circuits override", async () => {
    const c = circuit({ components: [bjt("Q1", "npn", 10)], overrides: override({ bjt: 0.25 }) });
    const { findings, passed } = await runRules({ circuit: c, analyses: [analysis(c, point)], rules: [builtin(headroom)] });
    expect(findings).toEqual([]);
    expect(passed[0]).toMatchObject({ limit: 0.25 });
  });

  it("reports an option the rule does not open to circuits at the override's line, and an unknown rule with did-you-mean", async () => {
    const c = circuit({ components: [bjt("Q1", "npn", 10)], overrides: [...override({ bjt: 0.25, severity: "off" }), ...override({ bjt: 0.1 }, "headrom")] });
    const { findings } = await runRules({ circuit: c, analyses: [analysis(c, point)], rules: [builtin(headroom)] });
    const input = findings.filter((f) => f.rule === "input");
    expect(input).toHaveLength(2);
    expect(input.every((f) => f.line === 40 && f.column === 5 && f.severity === "error")).toBe(true);
    expect(input.map((f) => f.message).join("\n")).toContain("does not allow a circuit file to override `severity`");
    expect(input.find((f) => f.subject === "headrom")!.hint).toBe("did you mean `headroom`?");
    // the refused override is not applied: Q1 is judged against the configured 0.5 V
    expect(findings.find((f) => f.rule === "headroom")).toMatchObject({ subject: "Q1", limit: 0.5 });
  });

  it("reports an override value the schema refuses", async () => {
    const c = circuit({ components: [bjt("Q1", "npn", 10)], overrides: override({ bjt: -2 }) });
    const { findings } = await runRules({ circuit: c, analyses: [analysis(c, point)], rules: [builtin(headroom)] });
    expect(findings.find((f) => f.rule === "input")!.message).toContain("must be >= 0, got -2");
  });
});

describe("determinism", () => {
  it("gives the same sorted findings whatever the rule and scenario order", async () => {
    const a = analysis(threeStages, op({ Q1: bjtPoint("npn", { headroom: 0.1 }), Q2: bjtPoint("pnp", { headroom: 0.2, region: "saturation" }), Q3: bjtPoint("npn", { region: "cutoff" }) }), "nominal");
    const b = analysis(threeStages, op({ Q1: bjtPoint("npn", { headroom: 0.1 }), Q2: bjtPoint("pnp", { headroom: 0.3 }), Q3: bjtPoint("npn", { region: "cutoff" }) }), "corner-01");
    const region = (await import("../../rules/region.js")).default;
    const one = await runRules({ circuit: threeStages, analyses: [a, b], rules: [builtin(headroom), builtin(region)] });
    const two = await runRules({ circuit: threeStages, analyses: [b, a], rules: [builtin(region), builtin(headroom)] });
    expect(two).toEqual(one);
    expect(one.findings.map((f) => `${f.line} ${f.rule} ${f.subject}`)).toEqual(["10 headroom Q1", "12 headroom Q2", "12 region Q2", "14 region Q3"]);
  });
});
