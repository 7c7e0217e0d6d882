// Per-component waivers (`waive: { <rule>: <reason> }` on a component): that rule's finding on
// that component becomes a note carrying the reason; other components and rules are untouched;
// a waiver naming a rule that is not loaded is an input error at the component.
import { expect, it } from "vitest";
import { runRuleCase } from "../../src/review/tester.js";
import headroom from "../../rules/headroom.js";
import { npnStage } from "./circuits.js";

const Q1 = "pins: { collector: col, base: base, emitter: emit } }";
const waived = (rule: string) => npnStage({ rc: "8k7" }).replace(Q1, `pins: { collector: col, base: base, emitter: emit }, waive: { ${rule}: "signal is 5 mV peak at most; bias chosen for noise" } }`);

it("a waived rule's finding on that component is a note with the reason", async () => {
  const plain = await runRuleCase(headroom, { name: "plain", circuit: npnStage({ rc: "8k7" }), expect: [] });
  expect(plain.findings.map((f) => f.severity)).toEqual(["error"]);
  const r = await runRuleCase(headroom, { name: "waived", circuit: waived("headroom"), expect: [] });
  expect(r.findings).toHaveLength(1);
  expect(r.findings[0]).toMatchObject({ rule: "headroom", subject: "Q1", severity: "note", measured: plain.findings[0]!.measured });
  expect(r.findings[0]!.message).toMatch(/waived for Q1: signal is 5 mV peak at most; bias chosen for noise$/);
});

it("a waiver for another rule leaves this one alone", async () => {
  const r = await runRuleCase(headroom, { name: "other", circuit: waived("region"), expect: [] });
  expect(r.findings.filter((f) => f.rule === "headroom").map((f) => f.severity)).toEqual(["error"]);
});

it("a waiver naming an unknown rule is an input error at the component", async () => {
  const r = await runRuleCase(headroom, { name: "unknown", circuit: waived("headrom"), expect: [] });
  const input = r.findings.find((f) => f.rule === "input")!;
  expect(input).toMatchObject({ severity: "error", subject: "Q1" });
  expect(input.message).toMatch(/waives rule `headrom`, which is not loaded/);
  expect(input.hint).toMatch(/headroom/);
});
