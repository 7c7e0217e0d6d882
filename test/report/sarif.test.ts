// SARIF 2.1.0: validated against the published schema (vendored, see vendor/README.md) and the
// fields code scanning needs; fingerprints stay put when a component moves to another line.
import { readFileSync } from "node:fs";
import { Ajv } from "ajv";
import addFormats from "ajv-formats";
import { describe, expect, it } from "vitest";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { FINGERPRINT_KEY, renderSarif } from "../../src/report/sarif.js";
import { sarifOptionsFor } from "../../src/cli/check.js";
import { FAILING, fixtureDocument, HOSTILE, OPTIONS } from "./fixtures/documents.js";
import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { expectGolden } from "./golden.js";

function sarifValidator() {
  const schema = JSON.parse(readFileSync(new URL("./vendor/sarif-2.1.0-rtm.5.json", import.meta.url), "utf8")) as Record<string, unknown>;
  delete schema.$schema;
  delete schema.id;
  // unicodeRegExp off: one pattern in the published file (language tags) is not valid with the u flag.
  const ajv = new Ajv({ allErrors: true, strict: false, unicodeRegExp: false });
  (addFormats as unknown as (a: Ajv) => void)(ajv);
  return ajv.compile(schema);
}

describe("renderSarif", () => {
  const text = renderSarif(fixtureDocument());
  const log = JSON.parse(text);

  it("validates against the published SARIF 2.1.0 schema", () => {
    const validate = sarifValidator();
    expect(validate(log), JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);
    // The validator is not a pushover: a wrong level is caught.
    const bad = JSON.parse(text);
    bad.runs[0].results[0].level = "fatal";
    expect(validate(bad)).toBe(false);
  });

  it("has the fields code scanning needs", () => {
    expect(log.$schema).toMatch(/sarif-schema-2\.1\.0\.json$/);
    expect(log.version).toBe("2.1.0");
    expect(log.runs).toHaveLength(1);
    const driver = log.runs[0].tool.driver;
    expect(driver.name).toBe("opgate");
    expect(driver.version).toBe("0.1.0");
    for (const r of driver.rules) {
      expect(r.id).toBeTruthy();
      expect(r.shortDescription.text).toBeTruthy();
      expect(r.fullDescription.text).toBeTruthy();
      expect(r.help.text).toBeTruthy();
    }
    expect(driver.rules.map((r: { id: string }) => r.id)).toContain("input");
    const results = log.runs[0].results;
    expect(results).toHaveLength(5);
    for (const res of results) {
      expect(driver.rules[res.ruleIndex].id).toBe(res.ruleId);
      expect(["error", "warning", "note", "none"]).toContain(res.level);
      expect(res.message.text).toBeTruthy();
      const loc = res.locations[0].physicalLocation;
      expect(loc.artifactLocation.uri).not.toMatch(/^\/|^[a-z]+:/i);
      expect(loc.region.startLine).toBeGreaterThanOrEqual(1);
      expect(loc.region.startColumn).toBeGreaterThanOrEqual(1);
    }
    expect(results.map((r: { locations: { physicalLocation: { artifactLocation: { uri: string } } }[] }) => r.locations[0]!.physicalLocation.artifactLocation.uri)).toContain(
      "boards/odd%2C%20names/100%25%3A%20probe.yaml",
    );
  });

  it("keeps fingerprints when a line moves, distinct per subject", () => {
    const moved: CircuitResult = { ...FAILING, findings: FAILING.findings.map((f) => ({ ...f, line: f.line + 10 })) };
    const a = JSON.parse(renderSarif(buildDocument([FAILING], OPTIONS))).runs[0].results;
    const b = JSON.parse(renderSarif(buildDocument([moved], OPTIONS))).runs[0].results;
    const prints = (rs: { partialFingerprints: Record<string, string> }[]) => rs.map((r) => r.partialFingerprints[FINGERPRINT_KEY]);
    expect(prints(b)).toEqual(prints(a));
    expect(new Set(prints(log.runs[0].results)).size).toBe(5);
  });

  it("gives every rule help text and a help URI, and the tool an information URI", () => {
    const driver = log.runs[0].tool.driver;
    expect(driver.informationUri).toMatch(/^https:\/\//);
    for (const r of driver.rules) {
      expect(r.help.text, r.id).toBeTruthy();
      expect(r.helpUri, r.id).toMatch(/^https:\/\//);
    }
    // A team rule's help points at its source in the repository at this commit, when CI names it.
    const doc = buildDocument([FAILING], { ...OPTIONS, rules: [...OPTIONS.rules, { id: "team/x", description: "Team rule.", severity: "warning", docs: "Docs.", source: "team-rules/x.ts" }] });
    const team = JSON.parse(renderSarif(doc, { rootFromRepository: "hw", repositoryBlobUri: "https://git.example/o/r/blob/abc" })).runs[0].tool.driver.rules.find((r: { id: string }) => r.id === "team/x");
    expect(team.helpUri).toBe("https://git.example/o/r/blob/abc/hw/team-rules/x.ts");
  });

  it("locates results from the repository root, wherever the check ran", () => {
    const moved = JSON.parse(renderSarif(fixtureDocument(), { rootFromRepository: "hardware/boards-v2" }));
    const uris = moved.runs[0].results.map((r: { locations: { physicalLocation: { artifactLocation: { uri: string } } }[] }) => r.locations[0]!.physicalLocation.artifactLocation.uri);
    expect(uris).toContain("hardware/boards-v2/boards/soil-probe/buffer.yaml");
    expect(uris).toContain("hardware/boards-v2/boards/odd%2C%20names/100%25%3A%20probe.yaml");
    // The root's path from the repository: from git's top level, or GITHUB_WORKSPACE under Actions.
    const repo = mkdtempSync(join(tmpdir(), "opgate-sarif-"));
    try {
      execFileSync("git", ["init", "-q", repo]);
      mkdirSync(join(repo, "hardware", "boards-v2"), { recursive: true });
      expect(sarifOptionsFor(join(repo, "hardware", "boards-v2"), {}).rootFromRepository).toBe("hardware/boards-v2");
      expect(sarifOptionsFor(repo, {}).rootFromRepository).toBe("");
      expect(sarifOptionsFor(join(repo, "hardware", "boards-v2"), { GITHUB_WORKSPACE: join(repo, "hardware") }).rootFromRepository).toBe("boards-v2");
      expect(sarifOptionsFor(repo, { GITHUB_SERVER_URL: "https://git.example", GITHUB_REPOSITORY: "o/r", GITHUB_SHA: "abc" }).repositoryBlobUri).toBe("https://git.example/o/r/blob/abc");
    } finally {
      rmSync(repo, { recursive: true, force: true });
    }
  });

  it("carries no control character from a file or team rule", () => {
    const evil = "x\u001b[2J\u0007\n::error::y\u202e";
    const f = { ...HOSTILE.findings[0]!, rule: `team/${evil}`, subject: evil, message: evil, hint: evil, unit: evil, scenario: evil };
    const doc = buildDocument([{ ...HOSTILE, name: evil, findings: [f] }], { ...OPTIONS, rules: [...OPTIONS.rules, { id: `team/${evil}`, description: evil, severity: "warning", docs: evil, source: evil }] });
    const out = JSON.parse(renderSarif(doc));
    const strings: string[] = [];
    const walk = (v: unknown): void => {
      if (typeof v === "string") strings.push(v);
      else if (v && typeof v === "object") for (const x of Object.values(v)) walk(x);
    };
    walk(out);
    for (const str of strings) expect(str).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f\u202e]/);
    expect(sarifValidator()(out)).toBe(true);
  });

  it("matches its golden file", () => {
    expectGolden("fixture.sarif", text);
  });
});
