// Console output: colour decisions, quiet mode, the finding line format, baseline lines.
import { describe, expect, it } from "vitest";
import { diffDocuments } from "../../src/report/baseline.js";
import { buildDocument } from "../../src/report/build.js";
import { colourEnabled, neutraliseCommands, progressFrame, renderConsole } from "../../src/report/console.js";
import { FAILING, fixtureDocument, OPTIONS } from "./fixtures/documents.js";
import { expectGolden } from "./golden.js";

describe("colourEnabled", () => {
  it("follows TTY, NO_COLOR and FORCE_COLOR", () => {
    expect(colourEnabled({}, true)).toBe(true);
    expect(colourEnabled({}, false)).toBe(false);
    expect(colourEnabled({ NO_COLOR: "1" }, true)).toBe(false);
    expect(colourEnabled({ NO_COLOR: "" }, true)).toBe(true);
    expect(colourEnabled({ FORCE_COLOR: "1" }, false)).toBe(true);
    expect(colourEnabled({ FORCE_COLOR: "0" }, true)).toBe(false);
    expect(colourEnabled({ FORCE_COLOR: "1", NO_COLOR: "1" }, true)).toBe(false);
  });
});

describe("renderConsole", () => {
  const plain = renderConsole(fixtureDocument(), { color: false });

  it("prints a line per file, then its findings, then the verdict", () => {
    const lines = plain.trimEnd().split("\n");
    expect(lines).toContain("fail  boards/soil-probe/buffer.yaml  (soil-probe-buffer)");
    expect(lines).toContain("ok    boards/tide-gauge/preamp.yaml  (tide-gauge-preamp)");
    expect(lines).toContain("error boards/wind-vane/driver.yaml");
    // One short line: where, severity, rule, subject, each number once in its unit, the margin in
    // that unit (6 mA − 6.8 mA = −0.8 mA); then the fix and the worst scenario, indented.
    const at = lines.indexOf("  boards/soil-probe/buffer.yaml:24:7  error   supply-budget  VCC  6.8 mA vs limit 6 mA, margin -800 µA");
    expect(at).toBeGreaterThan(0);
    expect(lines[at + 1]).toBe(
      "      fix: Raise R4 or lower the load current; or raise the budget in specs.supplies if the regulator allows it; worst: corner-03 (VCC max, R1 min, Q1 beta max)",
    );
    for (const line of lines.filter((l) => /^  \S/.test(l))) {
      expect(line.length, line).toBeLessThanOrEqual(120);
      expect(line).not.toMatch(/%$/); // no margin as a percentage of volts or dB
    }
    expect(lines.at(-1)).toBe("opgate: error — 4 circuits: 2 passed, 1 failed, 1 could not be checked; 2 errors, 3 warnings, 0 notes (fails on error)");
    expect(plain).not.toContain("\u001b[");
    expect(plain).not.toMatch(/^::/m);
  });

  it("colours only when asked", () => {
    expect(renderConsole(fixtureDocument(), { color: true })).toContain("\u001b[31mfail \u001b[0m");
  });

  it("prints only failures and the verdict when quiet", () => {
    const quiet = renderConsole(fixtureDocument(), { color: false, quiet: true });
    expect(quiet).not.toContain("preamp.yaml");
    expect(quiet).not.toContain("headroom");
    expect(quiet).not.toContain("odd, names");
    expect(quiet).toContain("supply-budget");
    expect(quiet).toContain("unknown key `vaule`");
  });

  it("shows baseline changes", () => {
    const head = buildDocument([{ ...FAILING, gains: [{ ...FAILING.gains[0]!, midband: 0.97 }] }], OPTIONS);
    const text = renderConsole(head, { color: false, baseline: diffDocuments(buildDocument([FAILING], OPTIONS), head) });
    expect(text).toContain("  boards/soil-probe/buffer.yaml: still fail\n    gain buffer: 0.962 V/V -> 0.97 V/V");
  });

  it("prints text from files and team rules inert: no ESC, BEL, line break or bidi control", () => {
    const doc = fixtureDocument();
    const evil = "a\u001b[2J\u0007b\n::error::pwned\r\u202eX\u0085";
    const c = doc.circuits[0]!;
    const tampered = {
      ...doc,
      circuits: [
        {
          ...c,
          file: `boards/x\n::warning::file.yaml`,
          name: evil,
          findings: c.findings.map((f) => ({ ...f, file: "boards/x\n::warning::file.yaml", rule: `team/${evil}`, subject: evil, unit: evil, message: evil, hint: evil })),
        },
      ],
    };
    const text = renderConsole(tampered, { color: false });
    // Only the line breaks we put there, and no control characters at all.
    expect(text).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u202e]/);
    for (const line of text.split("\n")) expect(line).not.toMatch(/^\s*::/);
    expect(text).toContain("a\\e[2J\\x07b\\n::error::pwned\\r\\u202eX\\x85");
  });

  it("neutralises lines that would read as CI commands", () => {
    expect(neutraliseCommands("::error::x")).toBe(":\u200b:error::x");
    expect(neutraliseCommands("  ::x")).toBe("  :\u200b:x");
    expect(neutraliseCommands("ok ::x")).toBe("ok ::x");
  });

  it("draws a progress frame", () => {
    expect(progressFrame(5, 10, 10)).toBe("\r[#####.....] 5/10 files");
  });

  it("matches its golden file", () => {
    expectGolden("fixture.console.txt", plain);
  });
});
