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
    expect(lines).toContain(
      "  boards/soil-probe/buffer.yaml:24:7  error   supply-budget  VCC  VCC delivers 6.8 mA, over its 6 mA budget (measured 6.8 mA vs limit 6 mA, margin -13.3%) — Raise R4 or lower the load current; or raise the budget in specs.supplies if the regulator allows it.",
    );
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
