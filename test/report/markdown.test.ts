// Markdown for pull-request comments and the step summary.
import { describe, expect, it } from "vitest";
import { diffDocuments } from "../../src/report/baseline.js";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { CAUTION, PR_COMMENT_MAX_CHARS, renderMarkdown } from "../../src/report/markdown.js";
import { FAILING, fixtureDocument, OPTIONS, PASSING } from "./fixtures/documents.js";
import { expectGolden } from "./golden.js";

describe("renderMarkdown", () => {
  const md = renderMarkdown(fixtureDocument());

  it("puts the verdict first, in one line, then the caution", () => {
    const lines = md.split("\n");
    expect(lines[0]).toMatch(/^⚠️ \*\*opgate: error\*\* — 4 circuits: 2 passed, 1 failed, 1 could not be checked; findings: 2 errors, 3 warnings, 0 notes/);
    expect(md).toContain(CAUTION);
    expect(md.indexOf(CAUTION)).toBeLessThan(md.indexOf("| Circuit |"));
  });

  it("tables each failing circuit's findings with measured vs limit, margin, scenario and hint", () => {
    expect(md).toContain(
      "| error | `supply-budget` | VCC | 6.8 mA | 6 mA | -13.3% | corner-03 (VCC max, R1 min, Q1 beta max) | 24:7 | VCC delivers 6.8 mA, over its 6 mA budget | Raise R4 or lower the load current; or raise the budget in specs.supplies if the regulator allows it. |",
    );
    expect(md).toContain("| error | `input` | R3 | — | — | — | nominal | 12:9 | unknown key `vaule` in component R3 | did you mean `value`? |");
    // A passing circuit gets no findings table.
    expect(md).not.toContain("### ❌ tide-gauge-preamp");
  });

  it("collapses operating point and gain figures per circuit", () => {
    expect(md).toContain("<details><summary>Operating point and gains — soil-probe-buffer</summary>");
    expect(md).toContain("| Q1 | npn | active | 6.5 mA | 5.55 V | 5.25 V | 252 mS | 36.1 mW |");
    expect(md).toContain("| M2 | pmos | triode | 220 µA | -350 mV | -250 mV | 730 µS | 77 µW |");
    expect(md).toContain("| preamp | -9.62 V/V | 19.7 dB | -10 V/V | -10.5 … -9.5 V/V | 8.2 kΩ | 4.6 kΩ |");
    expect((md.match(/<details>/g) ?? []).length).toBe((md.match(/<\/details>/g) ?? []).length);
  });

  it("escapes text from circuit files", () => {
    expect(md).toContain("probe\\|&lt;b&gt;odd&lt;/b&gt;");
    expect(md).not.toContain("<b>");
  });

  it("cuts to the comment size with a note, closing open sections", () => {
    const many: CircuitResult[] = [];
    for (let i = 0; i < 400; i++) many.push({ ...FAILING, file: `boards/gen/f${String(i).padStart(4, "0")}.yaml`, name: `gen-${i}` });
    const big = renderMarkdown(buildDocument(many, OPTIONS));
    expect(big.length).toBeLessThanOrEqual(PR_COMMENT_MAX_CHARS);
    expect(big).toContain("This report was cut to fit");
    expect(big.split("\n")[0]).toContain("400 circuits: 0 passed, 400 failed");
    expect((big.match(/<details>/g) ?? []).length).toBe((big.match(/<\/details>/g) ?? []).length);
    const small = renderMarkdown(buildDocument(many, OPTIONS), { maxChars: 2000 });
    expect(small.length).toBeLessThanOrEqual(2000);
  });

  it("lists only circuits that did not pass when there are many", () => {
    const many: CircuitResult[] = [FAILING];
    for (let i = 0; i < 60; i++) many.push({ ...PASSING, file: `boards/gen/p${String(i).padStart(3, "0")}.yaml` });
    const text = renderMarkdown(buildDocument(many, OPTIONS));
    expect(text).toContain("…and 60 more circuits that passed.");
  });

  it("shows baseline changes", () => {
    const head = buildDocument([{ ...FAILING, operatingPoint: { ...FAILING.operatingPoint!, sources: { VCC: { current: 5.2e-3, power: 62.4e-3, voltage: 12 } } }, findings: FAILING.findings.slice(1) }], OPTIONS);
    const base = buildDocument([FAILING], OPTIONS);
    const text = renderMarkdown(head, { baseline: diffDocuments(base, head) });
    expect(text).toContain("## Changes against the baseline");
    expect(text).toContain("- supply current VCC: 6.8 mA → 5.2 mA (-23.5%)");
    expect(text).toContain("- fixed: `supply-budget` VCC — VCC delivers 6.8 mA, over its 6 mA budget");
    expect(text).toContain("fail → pass");
  });

  it("matches its golden file", () => {
    expectGolden("fixture.md", md);
  });
});
