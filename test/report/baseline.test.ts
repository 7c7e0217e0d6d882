// Baseline deltas between two results documents.
import { describe, expect, it } from "vitest";
import { CHANGE_TOLERANCE, diffDocuments } from "../../src/report/baseline.js";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { BROKEN, FAILING, OPTIONS, PASSING } from "./fixtures/documents.js";

function withQ1Headroom(c: CircuitResult, headroom: number): CircuitResult {
  const op = c.operatingPoint!;
  return { ...c, operatingPoint: { ...op, devices: { ...op.devices, Q1: { ...op.devices.Q1!, headroom } } } };
}

describe("diffDocuments", () => {
  it("reports changed gains, supply currents and headroom, and new and fixed findings", () => {
    const base = buildDocument([PASSING, FAILING], OPTIONS);
    const changedPreamp: CircuitResult = {
      ...withQ1Headroom(PASSING, 3.9),
      gains: [{ ...PASSING.gains[0]!, midband: -8.8 }],
      findings: [{ ...FAILING.findings[1]!, subject: "Q1", file: PASSING.file }],
    };
    const head = buildDocument([changedPreamp, { ...FAILING, findings: [FAILING.findings[1]!] }], OPTIONS);
    const diff = diffDocuments(base, head);
    expect(diff.unchanged).toBe(0);
    const [buffer, preamp] = diff.circuits;
    expect(buffer!.fixedFindings.map((f) => f.rule)).toEqual(["supply-budget"]);
    expect(buffer!.newFindings).toEqual([]);
    expect(buffer!.statusBefore).toBe("fail");
    expect(buffer!.statusAfter).toBe("pass");
    expect(preamp!.gains).toEqual([{ subject: "preamp", before: -9.62, after: -8.8, unit: "V/V" }]);
    expect(preamp!.headroom).toEqual([{ subject: "Q1", before: 4.44, after: 3.9, unit: "V" }]);
    expect(preamp!.supplies).toEqual([]);
    expect(preamp!.newFindings.map((f) => `${f.rule}:${f.subject}`)).toEqual(["headroom:Q1"]);
  });

  it("ignores changes below the tolerance and a finding that only moved line", () => {
    const base = buildDocument([PASSING, FAILING], OPTIONS);
    const head = buildDocument(
      [withQ1Headroom(PASSING, 4.44 * (1 + CHANGE_TOLERANCE / 10)), { ...FAILING, findings: FAILING.findings.map((f) => ({ ...f, line: f.line + 3 })) }],
      OPTIONS,
    );
    expect(diffDocuments(base, head)).toEqual({ circuits: [], unchanged: 2 });
  });

  it("marks added and removed circuits", () => {
    const diff = diffDocuments(buildDocument([PASSING], OPTIONS), buildDocument([BROKEN], OPTIONS));
    expect(diff.circuits.map((d) => [d.file, d.change])).toEqual([
      [PASSING.file, "removed"],
      [BROKEN.file, "added"],
    ]);
    expect(diff.circuits[1]!.newFindings).toHaveLength(1);
    // A source that only appears now counts as a supply change; a 0 A signal input does not.
    expect(diff.circuits[0]!.supplies.map((s) => s.subject)).toEqual(["VCC"]);
  });
});
