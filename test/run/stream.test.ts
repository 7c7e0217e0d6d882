// Reports written while results arrive (src/cli/stream-reports.ts, src/run/run-check.ts): the
// streamed JSON is the document an in-memory run builds (same bytes; parsed, deep-equal and
// valid against schemas/results.schema.json), the streamed JUnit parses as XML and carries the
// same suites, cases, failures and errors as junit-report-builder's own document of the whole
// run, and a file whose worker dies mid-run is still in every report (no lost result).
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openReportWriters } from "../../src/cli/stream-reports.js";
import { buildDocument } from "../../src/report/build.js";
import type { ResultsDocument } from "../../src/report/document.js";
import { jsonCircuit, jsonEnd, jsonStart, renderJson } from "../../src/report/json.js";
import { renderJunit } from "../../src/report/junit.js";
import { outlineOf } from "../../src/report/outline.js";
import { renderMarkdown } from "../../src/report/markdown.js";
import { renderSarif } from "../../src/report/sarif.js";
import { documentProblems } from "../../src/report/validate.js";
import { makeCheckContext } from "../../src/run/context.js";
import { discoverCircuitFiles } from "../../src/run/discover.js";
import { runCheck, runCheckDocument } from "../../src/run/run-check.js";
import { OPTIONS as FIXTURE_OPTIONS, fixtureDocument } from "../report/fixtures/documents.js";
import { descendants, parseXml } from "../report/xml.js";
import { cli, makeRepo } from "./repo.js";

let repo: { dir: string; cleanup(): void };
beforeAll(() => {
  repo = makeRepo();
});
afterAll(() => repo.cleanup());

const read = (rel: string): string => readFileSync(join(repo.dir, rel), "utf8");

/** Cases of a JUnit document: suite, case name, and what it holds (failure/error type, or pass). */
function cases(xml: string): string[] {
  const root = parseXml(xml);
  return descendants(root, "testcase").map((tc) => {
    const failure = tc.children.find((c) => c.name === "failure" || c.name === "error");
    return `${tc.attributes.classname} | ${tc.attributes.name} | ${failure ? `${failure.name}:${failure.attributes.type}` : "pass"}`;
  });
}

describe("streamed reports", () => {
  it("the JSON pieces joined are renderJson, for the fixture and for a run with no circuits", () => {
    const doc = fixtureDocument();
    const { circuits, summary, ...head } = doc;
    const joined = jsonStart(head) + circuits.map((c, i) => `${i > 0 ? "," : ""}${jsonCircuit(c, true)}`).join("") + jsonEnd(head, summary, circuits.length);
    expect(joined).toBe(renderJson(doc));
    // JSON.stringify's own layout of the whole document (the writer before streaming): same bytes.
    const empty = buildDocument([], FIXTURE_OPTIONS);
    const { circuits: none, summary: s0, ...h0 } = empty;
    expect(jsonStart(h0) + jsonEnd(h0, s0, none.length)).toBe(renderJson(empty));
    expect(JSON.parse(renderJson(empty)).circuits).toEqual([]);
  });

  it("the whole-run reports give the same text from outlines as from whole results", () => {
    const doc = fixtureDocument();
    const outlined = { ...doc, circuits: doc.circuits.map(outlineOf) };
    expect(renderMarkdown(outlined)).toBe(renderMarkdown(doc));
    expect(renderSarif(outlined)).toBe(renderSarif(doc));
  });

  it("check writes the document an in-memory run builds, and JUnit with the same cases as the library's whole document", async () => {
    const r = await cli(["check", "boards", "-q", "--json", "out/s.json", "--junit", "out/s.xml", "--markdown", "out/s.md", "--sarif", "out/s.sarif"], repo.dir);
    expect([1, 2]).toContain(r.code);
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const files = await discoverCircuitFiles(["boards"], { cwd: repo.dir, root: repo.dir, include: ctx.config.include, exclude: ctx.config.exclude, circuitsOnly: true });
    const whole = (await runCheckDocument(files, { ctx, contextOptions: { cwd: repo.dir }, jobs: 1 })) as ResultsDocument;
    const streamed = read("out/s.json");
    expect(streamed).toBe(renderJson(whole));
    const parsed = JSON.parse(streamed) as ResultsDocument;
    expect(documentProblems(parsed)).toEqual([]);
    expect(parsed).toEqual(JSON.parse(renderJson(whole)));
    // JUnit: parses, and holds the cases, failures and errors of the whole-document rendering.
    const xml = read("out/s.xml");
    const reference = renderJunit(whole);
    expect(xml).toBe(reference);
    const root = parseXml(xml);
    expect(root.name).toBe("testsuites");
    expect(descendants(root, "testsuite")).toHaveLength(files.length);
    expect(cases(xml)).toEqual(cases(reference));
    const failures = cases(xml).filter((c) => c.includes("failure:")).length;
    const errors = cases(xml).filter((c) => c.includes("error:")).length;
    expect(failures + errors).toBeGreaterThan(0);
    expect(Number(root.attributes.failures)).toBe(failures);
    expect(Number(root.attributes.errors)).toBe(errors);
    expect(Number(root.attributes.tests)).toBe(cases(xml).length);
    expect(read("out/s.md")).toBe(renderMarkdown(whole));
    expect(read("out/s.sarif")).toBe(renderSarif(whole));
  }, 120_000);

  it("a run whose outlines go to a temporary file gives the same whole-run reports as one that keeps them in memory, on one lane and on workers", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const files = await discoverCircuitFiles(["boards"], { cwd: repo.dir, root: repo.dir, include: ctx.config.include, exclude: ctx.config.exclude, circuitsOnly: true });
    const base = { ctx, contextOptions: { cwd: repo.dir } };
    const inMemory = await runCheck(files, { ...base, jobs: 1 });
    // Every outline goes to the file (none fits in 1 byte), on one lane and then on workers.
    const spilled = await runCheck(files, { ...base, jobs: 1, spillOutlinesAfter: 1 });
    const workers = await runCheck(files, { ...base, jobs: 2, minFilesPerWorker: 1, mainThreadLane: false, spillOutlinesAfter: 0 });
    expect(files.length).toBeGreaterThan(2);
    for (const doc of [spilled, workers]) {
      expect(renderMarkdown(doc)).toBe(renderMarkdown(inMemory));
      expect(renderSarif(doc)).toBe(renderSarif(inMemory));
      expect(doc.summary).toEqual(inMemory.summary);
      expect(doc.circuits.map((c) => [c.file, c.status, c.findings, c.scenarios, c.operatingPoint, c.gains])).toEqual(
        inMemory.circuits.map((c) => [c.file, c.status, c.findings, c.scenarios, c.operatingPoint, c.gains]),
      );
    }
  }, 120_000);

  it("reports a file whose worker dies mid-run in every streamed report, and the files after it", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const files = await discoverCircuitFiles(["boards"], { cwd: repo.dir, root: repo.dir, include: ctx.config.include, exclude: ctx.config.exclude, circuitsOnly: true });
    const victim = files[2]!.display;
    const io = { cwd: repo.dir, env: {}, isTTY: false, stdout: () => undefined, stderr: () => undefined };
    const writers = openReportWriters({ json: "out/crash.json", junit: "out/crash.xml" }, io);
    let doc;
    try {
      doc = await runCheck(files, { ctx, contextOptions: { cwd: repo.dir }, jobs: 2, minFilesPerWorker: 1, mainThreadLane: false, crashOn: victim }, writers);
      writers.finish(doc, {});
    } finally {
      writers.abort();
    }
    expect(doc.circuits.map((c) => c.file)).toEqual(files.map((f) => f.display));
    const json = JSON.parse(read("out/crash.json")) as ResultsDocument;
    expect(documentProblems(json)).toEqual([]);
    expect(json.circuits.map((c) => c.file)).toEqual(files.map((f) => f.display));
    const dead = json.circuits.find((c) => c.file === victim)!;
    expect(dead.status).toBe("error");
    expect(dead.findings[0]!.rule).toBe("internal");
    expect(json.summary.errors).toBeGreaterThanOrEqual(1);
    const suites = descendants(parseXml(read("out/crash.xml")), "testsuite");
    expect(suites.map((s) => s.attributes.name)).toEqual(files.map((f) => f.display));
    expect(cases(read("out/crash.xml")).some((c) => c.includes("internal: file | error:internal"))).toBe(true);
  }, 120_000);

  it("leaves no report and no temporary file behind when the run fails", async () => {
    // A report folder that cannot be created: the JSON writer fails before any circuit is written.
    const r = await cli(["check", "boards", "-q", "--json", "boards/lib/tidewater-parts.yaml/x.json"], repo.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/cannot write the json report to boards\/lib\/tidewater-parts\.yaml\/x\.json/);
    // A report that fails after the run has begun: its folder is fine, a second report's is not.
    const before = readdirSync(join(repo.dir, "boards"));
    const late = await cli(["check", "boards", "-q", "--junit", "boards/partial.xml", "--sarif", "boards/lib/tidewater-parts.yaml/x.sarif"], repo.dir);
    expect(late.code).toBe(2);
    expect(readdirSync(join(repo.dir, "boards"))).toEqual(before);
  });
});
