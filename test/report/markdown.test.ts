// Markdown for pull-request comments and the step summary.
import { describe, expect, it } from "vitest";
import { diffDocuments } from "../../src/report/baseline.js";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { CAUTION, PR_COMMENT_MAX_CHARS, renderMarkdown } from "../../src/report/markdown.js";
import { FAILING, fixtureDocument, HOSTILE, OPTIONS, PASSING } from "./fixtures/documents.js";
import { fromMarkdown } from "mdast-util-from-markdown";
import { gfmFromMarkdown } from "mdast-util-gfm";
import { gfm } from "micromark-extension-gfm";

/** The report parsed back by a CommonMark + GFM parser (micromark), as a renderer sees it. */
function parse(md: string) {
  return fromMarkdown(md, { extensions: [gfm()], mdastExtensions: [gfmFromMarkdown()] });
}
type Node = { type: string; value?: string; children?: Node[] };
function all(node: Node, type: string): Node[] {
  return [...(node.type === type ? [node] : []), ...(node.children ?? []).flatMap((c) => all(c, type))];
}
/** The visible text of a node (line breaks as \n). */
function plain(node: Node): string {
  if (node.type === "break") return "\n";
  if (node.value !== undefined && node.type !== "html") return node.value;
  return (node.children ?? []).map(plain).join(node.type === "root" ? "\n" : "");
}
import { expectGolden } from "./golden.js";

describe("renderMarkdown", () => {
  const md = renderMarkdown(fixtureDocument());

  it("puts the verdict first, in one line, then the caution, then the failing findings, then the summary", () => {
    const lines = md.split("\n");
    expect(lines[0]).toMatch(/^⚠️ \*\*opgate: error\*\* — 4 circuits: 2 passed, 1 failed, 1 could not be checked; findings: 2 errors, 3 warnings, 0 notes/);
    expect(md).toContain(CAUTION);
    expect(md.indexOf(CAUTION)).toBeLessThan(md.indexOf("## Findings that fail the gate"));
    expect(md.indexOf("## Findings that fail the gate")).toBeLessThan(md.indexOf("| Circuit |"));
  });

  it("tables each failing circuit's findings compactly, with message, worst scenario and fix below", () => {
    expect(md).toContain("| Severity | Rule | Subject | Measured vs limit | Margin |");
    expect(md).toContain("| error | `supply-budget` | `VCC` | 6.8 mA vs limit 6 mA | -800 µA |");
    expect(md).toContain("| error | `input` | `R3` | — | — |");
    const tree = parse(md);
    const items = all(tree, "listItem").map((n) => plain(n));
    expect(items).toContain(
      "error supply-budget VCC (line 24): VCC delivers 6.8 mA, over its 6 mA budget\nWorst scenario: corner-03 (VCC max, R1 min, Q1 beta max)\nFix: Raise R4 or lower the load current; or raise the budget in specs.supplies if the regulator allows it.",
    );
    // A message's backticks stay text: no code span opens inside it.
    expect(items.some((t) => t.includes("unknown key `vaule` in component R3"))).toBe(true);
    // A passing circuit gets no findings table among the failing ones.
    expect(md).not.toContain("### ✅ tide-gauge-preamp");
  });

  it("collapses operating point and gain figures per circuit", () => {
    expect(md).toContain("**soil-probe-buffer `boards/soil-probe/buffer.yaml`**\n\n<details><summary>Operating point and gains</summary>");
    expect(md).toContain("| `Q1` npn | active | 6.5 mA | 5.55 V | 5.25 V | 252 mS | 36.1 mW |");
    expect(md).toContain("| `M2` pmos | triode | 220 µA | -350 mV | -250 mV | 730 µS | 77 µW |");
    expect(md).toContain("| `preamp` | -9.62 V/V | -10 (-10.5 … -9.5) V/V | 19.7 dB | 8.2 kΩ | 4.6 kΩ |");
    expect((md.match(/<details>/g) ?? []).length).toBe((md.match(/<\/details>/g) ?? []).length);
  });

  it("keeps text from circuit files as text: no HTML, no broken table, no link, image or mention", () => {
    const tree = parse(md);
    expect(all(tree, "html").every((n) => /^<\/?details>|^<details><summary>[^<]*<\/summary>$/.test((n as { value: string }).value))).toBe(true);
    // Every table row has as many cells as its header.
    for (const t of all(tree, "table")) {
      const rows = (t as { children: { children: unknown[] }[] }).children;
      for (const r of rows) expect(r.children.length).toBe(rows[0]!.children.length);
    }
    expect(plain(tree)).toContain("probe|<b>odd</b>");
  });

  it("neutralises hostile text from a file or team rule in every place it appears", () => {
    const evil = "x`y` [a](https://e.example/) ![i](https://e.example/i.png) @octocat <img src=x> | pipe https://e.example \u001b[31m\u0007";
    const c = { ...HOSTILE, file: `boards/a|b\`c.yaml`, name: evil };
    const f = { ...HOSTILE.findings[0]!, file: c.file, rule: `team/${evil}`, subject: evil, unit: evil, message: evil, hint: evil, scenario: evil };
    const doc = buildDocument([{ ...c, findings: [f], scenarios: [...c.scenarios, { id: evil, label: evil, converged: true }] }], OPTIONS);
    const text = renderMarkdown(doc);
    const tree = parse(text);
    expect(all(tree, "link")).toEqual([]);
    expect(all(tree, "image")).toEqual([]);
    expect(all(tree, "html").every((n) => /^<\/?details>|^<details><summary>[^<]*<\/summary>$/.test((n as { value: string }).value))).toBe(true);
    for (const t of all(tree, "table")) {
      const rows = (t as { children: { children: unknown[] }[] }).children;
      for (const r of rows) expect(r.children.length).toBe(rows[0]!.children.length);
    }
    // Code spans hold the whole identifier (the backticks inside did not close them).
    expect(all(tree, "inlineCode").map((n) => (n as { value: string }).value)).toContain("boards/a|b`c.yaml");
    // No raw control characters; an @name is not a mention (a word joiner follows the @).
    expect(text).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f]/);
    const texts = all(tree, "text").map((n) => n.value!).join(" ");
    expect(texts).not.toMatch(/@octocat/);
    expect(texts).toContain("@\u2060octocat");
  });

  it("keeps the failing findings first at scale, then the summary, and says what was cut", () => {
    const many: CircuitResult[] = [];
    for (let i = 0; i < 2000; i++) many.push({ ...(i % 10 === 0 ? FAILING : PASSING), file: `boards/gen/f${String(i).padStart(4, "0")}.yaml`, name: `gen-${i}` });
    const big = renderMarkdown(buildDocument(many, OPTIONS));
    expect(big.length).toBeLessThanOrEqual(PR_COMMENT_MAX_CHARS);
    expect(big.split("\n")[0]).toContain("2000 circuits: 1800 passed, 200 failed");
    expect(big).toContain("## Findings that fail the gate");
    expect(big).toMatch(/✂️ Cut to fit the 65,536-character limit of a comment: the findings of \d+ circuits that did not pass; .*the operating points and gains of \d+ circuits/);
    expect((big.match(/<details>/g) ?? []).length).toBe((big.match(/<\/details>/g) ?? []).length);
    // With fewer failing circuits the summary follows them in full.
    const some = renderMarkdown(buildDocument(many.filter((_, i) => i % 10 !== 0 || i < 100), OPTIONS));
    expect(some.indexOf("### ❌")).toBeGreaterThan(0);
    expect(some.indexOf("### ❌")).toBeLessThan(some.indexOf("## Summary"));
    expect(some).toContain("…and 1800 more circuits that passed.");
    const small = renderMarkdown(buildDocument(many, OPTIONS), { maxChars: 4000 });
    expect(small.length).toBeLessThanOrEqual(4000);
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
    expect(text).toContain("- supply current `VCC`: 6.8 mA → 5.2 mA (-23.5%)");
    expect(text).toContain("- fixed: `supply-budget` `VCC` — VCC delivers 6.8 mA, over its 6 mA budget");
    expect(text).toContain("fail → pass");
  });

  it("matches its golden file", () => {
    expectGolden("fixture.md", md);
  });
});
