// JUnit XML: well-formed, a suite per circuit, a case per rule × subject with unique names,
// failures at failOn, errors for circuits that could not be checked, never zero cases.
import { describe, expect, it } from "vitest";
import { buildDocument } from "../../src/report/build.js";
import { renderJunit } from "../../src/report/junit.js";
import { FAILING, fixtureDocument, HOSTILE, OPTIONS, PASSING } from "./fixtures/documents.js";
import { expectGolden } from "./golden.js";
import { descendants, parseXml } from "./xml.js";

describe("renderJunit", () => {
  const xml = renderJunit(fixtureDocument());
  const root = parseXml(xml);

  it("parses and has the expected counts", () => {
    expect(root.name).toBe("testsuites");
    const suites = descendants(root, "testsuite");
    expect(suites.map((s) => s.attributes.name)).toEqual([
      "boards/odd, names/100%: probe.yaml",
      "boards/soil-probe/buffer.yaml",
      "boards/tide-gauge/preamp.yaml",
      "boards/wind-vane/driver.yaml",
    ]);
    // hostile: 2 warnings (passing cases); buffer: 2 findings + 1 passed; preamp: 3 passed; driver: 1 input error.
    expect(suites.map((s) => s.attributes.tests)).toEqual(["2", "3", "3", "1"]);
    expect(root.attributes.tests).toBe("9");
    expect(root.attributes.failures).toBe("1");
    expect(root.attributes.errors).toBe("1");
    expect(descendants(root, "failure")).toHaveLength(1);
    expect(descendants(root, "error")).toHaveLength(1);
  });

  it("names cases rule: subject, uniquely, with classname and file", () => {
    for (const suite of descendants(root, "testsuite")) {
      const names = descendants(suite, "testcase").map((c) => c.attributes.name);
      expect(new Set(names).size).toBe(names.length);
      for (const c of descendants(suite, "testcase")) {
        expect(c.attributes.classname).toBeTruthy();
        expect(c.attributes.file).toBe(suite.attributes.name);
      }
    }
    const hostile = descendants(root, "testsuite")[0]!;
    expect(descendants(hostile, "testcase").map((c) => c.attributes.name)).toEqual(["resistor-power: R:1,2", "resistor-power: R:1,2 (2)"]);
  });

  it("carries measured, limit, margin, scenario and file:line in the failure message", () => {
    const failure = descendants(root, "failure")[0]!;
    expect(failure.attributes.type).toBe("error");
    expect(failure.attributes.message).toBe(
      "boards/soil-probe/buffer.yaml:24:7: error: VCC delivers 6.8 mA, over its 6 mA budget — measured 6.8 mA vs limit 6 mA, margin -800 µA; worst scenario corner-03 (VCC max, R1 min, Q1 beta max)",
    );
    expect(failure.text).toContain("How to fix: Raise R4");
    const error = descendants(root, "error")[0]!;
    expect(error.attributes.type).toBe("input");
    expect(error.attributes.message).toContain("boards/wind-vane/driver.yaml:12:9: error: unknown key `vaule`");
  });

  it("makes warnings failures when the gate fails on warnings", () => {
    const strict = parseXml(renderJunit(buildDocument([...fixtureDocument().circuits], { ...OPTIONS, failOn: "warning" })));
    expect(descendants(strict, "failure").map((f) => f.attributes.type)).toEqual(["warning", "warning", "warning", "error"]);
  });

  it("reports a circuit without an operating point as an error", () => {
    const unsolved = {
      ...PASSING,
      status: "error" as const,
      operatingPoint: null,
      passed: [],
      findings: [{ ...FAILING.findings[0]!, rule: "solve", subject: PASSING.name!, message: "no operating point: Newton did not converge", file: PASSING.file }],
    };
    const root = parseXml(renderJunit(buildDocument([unsolved], OPTIONS)));
    expect(descendants(root, "error").map((e) => e.attributes.type)).toEqual(["solve"]);
    expect(descendants(root, "failure")).toHaveLength(0);
  });

  it("never writes a report without cases", () => {
    const empty = parseXml(renderJunit(buildDocument([], OPTIONS)));
    expect(descendants(empty, "testcase")).toHaveLength(1);
    const bare = parseXml(renderJunit(buildDocument([{ ...PASSING, passed: [] }], OPTIONS)));
    expect(descendants(bare, "testcase")).toHaveLength(1);
  });

  it("stays well-formed XML 1.0 with control characters and CDATA ends in file and rule text", () => {
    const evil = "x\u001b[2J\u0007]]>\u0000<y>&\u202e";
    const f = { ...HOSTILE.findings[0]!, rule: `team/${evil}`, subject: evil, message: evil, hint: evil, unit: evil, scenario: evil };
    const out = renderJunit(buildDocument([{ ...HOSTILE, file: `boards/${evil}.yaml`, name: evil, findings: [f, { ...f, rule: "input" }] }], OPTIONS));
    // XML 1.0 allows TAB, LF and CR among the controls, nothing else.
    expect(out).not.toMatch(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f\u202e]/);
    const parsed = parseXml(out);
    expect(descendants(parsed, "testcase").length).toBe(2);
  });

  it("matches its golden file", () => {
    expectGolden("fixture.junit.xml", xml);
  });
});
