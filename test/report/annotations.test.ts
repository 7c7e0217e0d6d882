// GitHub Actions annotations: escaping per the runner's workflow-command rules, and the cap.
import { describe, expect, it } from "vitest";
import { ANNOTATIONS_PER_LEVEL, escapeData, escapeProperty, renderAnnotations } from "../../src/report/annotations.js";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { FAILING, fixtureDocument, HOSTILE, OPTIONS } from "./fixtures/documents.js";
import { expectGolden } from "./golden.js";

describe("escaping", () => {
  it("escapes data: % first, then CR and LF", () => {
    expect(escapeData("100% done\r\nnext")).toBe("100%25 done%0D%0Anext");
    expect(escapeData("%0A")).toBe("%250A");
  });
  it("escapes properties: also : and ,", () => {
    expect(escapeProperty("boards/odd, names/100%: probe.yaml")).toBe("boards/odd%2C names/100%25%3A probe.yaml");
    expect(escapeProperty("a\nb")).toBe("a%0Ab");
  });
});

describe("renderAnnotations", () => {
  const text = renderAnnotations(fixtureDocument());
  const lines = text.trimEnd().split("\n");

  it("emits one command per finding at its file, line and column", () => {
    expect(lines).toHaveLength(5);
    expect(lines).toContain(
      "::error file=boards/soil-probe/buffer.yaml,line=24,col=7,title=opgate supply-budget%3A VCC::VCC delivers 6.8 mA, over its 6 mA budget (measured 6.8 mA vs limit 6 mA, margin -800 µA; scenario corner-03)%0ARaise R4 or lower the load current; or raise the budget in specs.supplies if the regulator allows it.",
    );
    expect(lines.filter((l) => l.startsWith("::warning "))).toHaveLength(3);
  });

  it("keeps hostile text inside one command", () => {
    const hostile = lines.find((l) => l.includes("set-output"))!;
    expect(hostile.startsWith("::warning file=boards/odd%2C names/100%25%3A probe.yaml,line=3,col=1,title=opgate resistor-power%3A R%3A1%2C2::")).toBe(true);
    // The message's own leading "::" is broken up, and no CR/LF survives.
    expect(hostile).toContain("::\u200b:set-output");
    expect(hostile).not.toMatch(/[\r\n]/);
    // A file's line breaks are shown as escapes; only our own break (message, then fix) is encoded.
    expect(hostile).toContain("100%25 over\\r\\nsecond line");
  });

  it("lets no control character or command through from a file or team rule", () => {
    const evil = "x\u001b]0;title\u0007\n::error::pwned\r\n\u202e";
    const f = { ...HOSTILE.findings[0]!, file: `boards/${evil}.yaml`, rule: `team/${evil}`, subject: evil, message: evil, hint: evil, unit: evil };
    const out = renderAnnotations(buildDocument([{ ...HOSTILE, file: f.file, findings: [f] }], OPTIONS));
    const commands = out.trimEnd().split("\n");
    expect(commands).toHaveLength(1);
    expect(out).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f\u202e]/);
    expect(commands[0]!.match(/::/g)!.length).toBeGreaterThanOrEqual(2);
    expect(commands[0]).toMatch(/^::warning file=boards\/x\\e\]0;title\\x07\\n%3A%3Aerror%3A%3Apwned/);
  });

  it("caps each level and points at the summary for the rest", () => {
    const many: CircuitResult[] = [];
    for (let i = 0; i < 25; i++) many.push({ ...FAILING, file: `b/${i}.yaml`, findings: FAILING.findings.map((f) => ({ ...f, file: `b/${i}.yaml` })) });
    const out = renderAnnotations(buildDocument([...many, HOSTILE], OPTIONS)).trimEnd().split("\n");
    const errors = out.filter((l) => l.startsWith("::error "));
    const warnings = out.filter((l) => l.startsWith("::warning "));
    expect(errors).toHaveLength(ANNOTATIONS_PER_LEVEL);
    expect(warnings).toHaveLength(ANNOTATIONS_PER_LEVEL);
    expect(errors[ANNOTATIONS_PER_LEVEL - 1]).toBe(
      "::error title=opgate%3A more findings::16 more errors not annotated here: see the job summary and the code-scanning (SARIF) results.",
    );
    // Worst first: the non-numeric warning, then margin -400% (hostile) before the -225% ones.
    expect(warnings[0]).toContain("a second finding");
    expect(warnings[1]).toContain("set-output");
  });

  it("is empty without findings, and matches its golden file", () => {
    expect(renderAnnotations(buildDocument([], OPTIONS))).toBe("");
    expectGolden("fixture.annotations.txt", text);
  });
});
