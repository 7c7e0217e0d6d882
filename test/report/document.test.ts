// The results document: assembly, verdict and exit code, canonical JSON, and its JSON Schema.
import { readFileSync } from "node:fs";
import { Ajv2020 } from "ajv/dist/2020.js";
import addFormats from "ajv-formats";
import { describe, expect, it } from "vitest";
import { buildDocument, exitCodeFor } from "../../src/report/build.js";
import { renderJson } from "../../src/report/json.js";
import { DocumentError, documentProblems, readDocument } from "../../src/report/validate.js";
import { schemaPath } from "../../src/paths.js";
import { BROKEN, FAILING, fixtureDocument, HOSTILE, OPTIONS, PASSING } from "./fixtures/documents.js";
import { expectGolden } from "./golden.js";

describe("buildDocument", () => {
  it("sorts circuits by file and counts the summary", () => {
    const doc = fixtureDocument();
    expect(doc.circuits.map((c) => c.file)).toEqual([
      "boards/odd, names/100%: probe.yaml",
      "boards/soil-probe/buffer.yaml",
      "boards/tide-gauge/preamp.yaml",
      "boards/wind-vane/driver.yaml",
    ]);
    expect(doc.summary).toEqual({
      circuits: 4,
      passed: 2,
      failed: 1,
      errors: 1,
      findings: { error: 2, warning: 3, note: 0 },
      failOn: "error",
      verdict: "error",
    });
    // The hostile circuit only has warnings: with failOn error it passes.
    expect(doc.circuits[0]!.status).toBe("pass");
  });

  it("gives exit code 2 for input errors, 1 for findings at failOn, 0 otherwise", () => {
    expect(exitCodeFor(fixtureDocument())).toBe(2);
    expect(exitCodeFor(buildDocument([FAILING, PASSING], OPTIONS))).toBe(1);
    expect(exitCodeFor(buildDocument([PASSING, HOSTILE], OPTIONS))).toBe(0);
    const strict = buildDocument([PASSING, HOSTILE], { ...OPTIONS, failOn: "warning" });
    expect(exitCodeFor(strict)).toBe(1);
    expect(strict.circuits.find((c) => c.file === HOSTILE.file)!.status).toBe("fail");
    expect(exitCodeFor(buildDocument([], OPTIONS))).toBe(0);
  });

  it("adds a timestamp only when asked", () => {
    expect(renderJson(fixtureDocument())).not.toContain("generatedAt");
    const stamped = buildDocument([PASSING], { ...OPTIONS, timestamp: "2026-12-01T20:00:00.000Z" });
    expect(renderJson(stamped)).toContain('"generatedAt": "2026-12-01T20:00:00.000Z"');
  });
});

describe("renderJson", () => {
  it("is byte-identical whatever order the circuits and keys came in", () => {
    const a = renderJson(buildDocument([BROKEN, PASSING, FAILING, HOSTILE], OPTIONS));
    const reordered = { ...PASSING, passed: [...PASSING.passed].reverse(), findings: [], name: PASSING.name, file: PASSING.file };
    const b = renderJson(buildDocument([HOSTILE, FAILING, reordered, BROKEN], { ...OPTIONS, rules: [...OPTIONS.rules].reverse() }));
    expect(b).toBe(a);
    expect(a.endsWith("}\n")).toBe(true);
    expect(a.split("\n")[1]).toBe('  "format": "opgate-results/1",');
  });

  it("writes non-finite numbers as null", () => {
    const parsed = JSON.parse(renderJson(fixtureDocument()));
    const buffer = parsed.circuits.find((c: { name: string }) => c.name === "soil-probe-buffer");
    expect(buffer.gains[0].inputImpedance).toBeNull();
    expect(buffer.operatingPoint.devices.Q1.outputResistance).toBeNull();
  });

  it("matches its golden file", () => {
    expectGolden("fixture.json", renderJson(fixtureDocument()));
  });
});

describe("results schema", () => {
  const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
  (addFormats as unknown as (a: Ajv2020) => void)(ajv);
  const validate = ajv.compile(JSON.parse(readFileSync(schemaPath("results"), "utf8")) as object);

  it("accepts the fixture document as written", () => {
    const value = JSON.parse(renderJson(fixtureDocument()));
    expect(validate(value), JSON.stringify(validate.errors)).toBe(true);
    expect(documentProblems(value)).toEqual([]);
  });

  it("accepts every single-circuit document and a sharded one", () => {
    for (const c of [PASSING, FAILING, BROKEN, HOSTILE]) {
      const value = JSON.parse(renderJson(buildDocument([c], { ...OPTIONS, shard: { index: 1, count: 2, total: 2, digest: `sha256:${"0".repeat(64)}`, files: [c.file] } })));
      expect(validate(value), JSON.stringify(validate.errors)).toBe(true);
    }
  });

  it("rejects documents with missing or misspelt fields", () => {
    const value = JSON.parse(renderJson(fixtureDocument()));
    delete value.summary;
    expect(validate(value)).toBe(false);
    const typo = JSON.parse(renderJson(fixtureDocument()));
    typo.circuits[0].findings[0].severty = "error";
    expect(validate(typo)).toBe(false);
    expect(() => readDocument("{", "base.json")).toThrow(DocumentError);
    expect(() => readDocument('{"format":"other"}', "base.json")).toThrow(/base\.json: not an opgate results document/);
  });
});
