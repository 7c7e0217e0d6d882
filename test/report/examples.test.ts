// Every report format on the real examples (default config, nominal run), against golden files
// regenerated only with UPDATE_GOLDEN=1; the JSON against its schema, the SARIF against the
// published schema, the JUnit XML parsed and counted.
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { Ajv } from "ajv";
import addFormats from "ajv-formats";
import { beforeAll, describe, expect, it } from "vitest";
import { renderAnnotations } from "../../src/report/annotations.js";
import { exitCodeFor } from "../../src/report/build.js";
import { renderConsole } from "../../src/report/console.js";
import type { ResultsDocument } from "../../src/report/document.js";
import { renderJson } from "../../src/report/json.js";
import { renderJunit } from "../../src/report/junit.js";
import { renderMarkdown } from "../../src/report/markdown.js";
import { renderSarif } from "../../src/report/sarif.js";
import { documentProblems } from "../../src/report/validate.js";
import { makeCheckContext } from "../../src/run/context.js";
import { discoverCircuitFiles } from "../../src/run/discover.js";
import { runCheckDocument } from "../../src/run/run-check.js";
import { expectGolden } from "./golden.js";
import { descendants, parseXml } from "./xml.js";

const ROOT = join(dirname(fileURLToPath(import.meta.url)), "..", "..");

/**
 * The examples' golden JSON guards the document's shape and content, not the solver's last
 * digits: numbers are kept to 6 significant digits and the Newton statistics are blanked, so a
 * solver refinement does not churn this file (the fixture golden is compared at full precision).
 */
const GOLDEN_DIGITS = 6;
function solverNeutral(json: string): string {
  const value = JSON.parse(json, (key, v: unknown) => {
    if (key === "iterations" || key === "residual") return 0;
    return typeof v === "number" && v !== 0 ? Number(v.toPrecision(GOLDEN_DIGITS)) : v;
  });
  return `${JSON.stringify(value, null, 2)}\n`;
}

let doc: ResultsDocument;
beforeAll(async () => {
  const ctx = await makeCheckContext({ cwd: ROOT });
  const files = await discoverCircuitFiles(["examples"], { cwd: ROOT, root: ROOT, include: ctx.config.include, exclude: ctx.config.exclude, circuitsOnly: true });
  doc = await runCheckDocument(files, { ctx, contextOptions: { cwd: ROOT }, jobs: 1 });
});

describe("reports of the examples", () => {
  it("has a failing and a broken example, so every path of the reporters is exercised", () => {
    expect(doc.summary.failed).toBeGreaterThanOrEqual(1);
    expect(doc.summary.errors).toBeGreaterThanOrEqual(1);
    expect(doc.summary.passed).toBeGreaterThanOrEqual(1);
    expect(exitCodeFor(doc)).toBe(2);
  });

  it("writes a schema-valid results document", () => {
    const json = renderJson(doc);
    expect(documentProblems(JSON.parse(json))).toEqual([]);
    expectGolden("examples/results.json", solverNeutral(json));
  });

  it("writes JUnit XML with a suite per file and a case per finding or passed check", () => {
    const xml = renderJunit(doc);
    const root = parseXml(xml);
    const suites = descendants(root, "testsuite");
    expect(suites).toHaveLength(doc.circuits.length);
    const expected = doc.circuits.reduce((n, c) => n + Math.max(1, c.findings.length + c.passed.length), 0);
    expect(descendants(root, "testcase")).toHaveLength(expected);
    expect(Number(root.attributes.errors)).toBe(doc.circuits.reduce((n, c) => n + c.findings.filter((f) => f.rule === "input").length, 0));
    expectGolden("examples/junit.xml", xml);
  });

  it("writes SARIF that validates against the published schema", () => {
    const text = renderSarif(doc);
    const schema = JSON.parse(readFileSync(new URL("./vendor/sarif-2.1.0-rtm.5.json", import.meta.url), "utf8")) as Record<string, unknown>;
    delete schema.$schema;
    delete schema.id;
    const ajv = new Ajv({ allErrors: true, strict: false, unicodeRegExp: false });
    (addFormats as unknown as (a: Ajv) => void)(ajv);
    const validate = ajv.compile(schema);
    expect(validate(JSON.parse(text)), JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);
    expectGolden("examples/opgate.sarif", solverNeutral(text));
  });

  it("writes markdown, console text and annotations", () => {
    expectGolden("examples/report.md", renderMarkdown(doc));
    expectGolden("examples/console.txt", renderConsole(doc, { color: false }));
    expectGolden("examples/annotations.txt", renderAnnotations(doc));
  });
});
