// Repository config: discovery, schema errors with lines, temperatures, plugins paths, flags,
// and rule options checked against the rules before anything runs.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { applyRuleFlags, loadConfig } from "../../src/review/config.js";
import { ConfigError } from "../../src/review/errors.js";
import { configuredRules } from "../../src/review/plugins.js";

let repo: string;
beforeEach(() => {
  repo = mkdtempSync(join(tmpdir(), "opgate-config-"));
});
afterEach(() => rmSync(repo, { recursive: true, force: true }));

function write(path: string, text: string): void {
  mkdirSync(join(repo, path, ".."), { recursive: true });
  writeFileSync(join(repo, path), text);
}

async function configError(p: Promise<unknown>): Promise<ConfigError> {
  const e = await p.then(() => undefined, (err: unknown) => err);
  expect(e).toBeInstanceOf(ConfigError);
  return e as ConfigError;
}

describe("loadConfig", () => {
  it("gives the defaults when there is no config file", async () => {
    const c = await loadConfig({ cwd: repo });
    expect(c).toMatchObject({ file: null, root: repo, failOn: "error", plugins: [], rules: {}, variation: { mode: "nominal", samples: 200, seed: 1 } });
    expect(c.exclude).toContain("**/node_modules/**");
  });

  it("finds the config by walking up from a subfolder and resolves paths against its folder", async () => {
    write("team-rules/stiff.ts", "export default {}\n");
    write(
      "opgate.config.yaml",
      `# Tidewater boards
include: ["boards/**/*.yaml"]
exclude: ["boards/scratch/**"]
failOn: warning
rules:
  band-flatness: note
  headroom:
    severity: warning
    options: { bjt: 0.7 }
plugins: ["team-rules/*.ts"]
variation:
  mode: corners
  temperature: { min: -20 °C, max: 333.15 }
outputs: { junit: reports/junit.xml }
`,
    );
    mkdirSync(join(repo, "boards", "tide-gauge"), { recursive: true });
    const c = await loadConfig({ cwd: join(repo, "boards", "tide-gauge") });
    expect(c.file).toBe(join(repo, "opgate.config.yaml"));
    expect(c.root).toBe(repo);
    expect(c.include).toEqual(["boards/**/*.yaml"]);
    expect(c.exclude).toContain("boards/scratch/**");
    expect(c.failOn).toBe("warning");
    expect(c.plugins).toEqual([join(repo, "team-rules", "stiff.ts")]);
    expect(c.rules["band-flatness"]).toMatchObject({ severity: "note" });
    expect(c.rules.headroom).toMatchObject({ severity: "warning", options: { bjt: 0.7 }, pos: { line: 7 }, optionsPos: { bjt: { line: 9 } } });
    // −20 °C = 253.15 K (SI: T/K = t/°C + 273.15); a bare number is kelvin.
    expect(c.variation.mode).toBe("corners");
    expect(c.variation.temperature!.min).toBeCloseTo(253.15, 9);
    expect(c.variation.temperature!.max).toBeCloseTo(333.15, 9);
    expect(c.outputs.junit).toBe(join(repo, "reports", "junit.xml"));
  });

  it("reads opgate.config.json", async () => {
    write("opgate.config.json", JSON.stringify({ failOn: "note", rules: { solve: "error" } }));
    const c = await loadConfig({ cwd: repo });
    expect(c).toMatchObject({ failOn: "note", rules: { solve: { severity: "error" } } });
  });

  it("reports an unknown key with its line and a did-you-mean", async () => {
    write("opgate.config.yaml", "failOn: error\nrule:\n  headroom: warning\n");
    const e = await configError(loadConfig({ cwd: repo }));
    expect(e.problems[0]).toMatchObject({ file: "opgate.config.yaml", line: 2, column: 1, hint: "did you mean `rules`?" });
    expect(e.message).toMatch(/^opgate\.config\.yaml:2:1: error: unknown key `rule`/);
  });

  it("reports a bad severity and a bad temperature at their lines", async () => {
    write("opgate.config.yaml", "rules:\n  headroom: fatal\n");
    expect((await configError(loadConfig({ cwd: repo }))).problems[0]).toMatchObject({ line: 2 });
    write("opgate.config.yaml", "variation:\n  mode: corners\n  temperature:\n    min: -20 C\n    max: 60 °C\n");
    const e = await configError(loadConfig({ cwd: repo }));
    expect(e.problems[0]).toMatchObject({ line: 4, column: 10 });
    expect(e.problems[0]!.hint).toContain("°C");
  });

  it("reports a min above max, and a negative bare number as kelvin below absolute zero", async () => {
    write("opgate.config.yaml", "variation:\n  temperature: { min: 60 °C, max: -20 °C }\n");
    expect((await configError(loadConfig({ cwd: repo }))).problems[0]!.message).toContain("min is above max");
    write("opgate.config.yaml", "variation:\n  temperature: { min: -20, max: 300 }\n");
    expect((await configError(loadConfig({ cwd: repo }))).problems[0]!.hint).toContain('write "-20 °C"');
  });

  it("reports a plugin path or glob that matches nothing, at its line", async () => {
    write("opgate.config.yaml", "plugins:\n  - team-rules/missing.ts\n  - 'team/*.mjs'\n");
    const e = await configError(loadConfig({ cwd: repo }));
    expect(e.problems.map((p) => [p.line, p.message.includes("does not exist") || p.message.includes("matches no files")])).toEqual([[2, true], [3, true]]);
  });

  it("refuses a plugin that is not a module, and two config files in one folder", async () => {
    write("rules.txt", "x");
    write("opgate.config.yaml", "plugins: [rules.txt]\n");
    expect((await configError(loadConfig({ cwd: repo }))).problems[0]!.message).toContain("not a JavaScript or TypeScript module");
    write("opgate.config.json", "{}");
    expect((await configError(loadConfig({ cwd: repo }))).problems[0]!.message).toContain("two config files");
  });

  it("takes --config, and says so when it does not exist", async () => {
    write("ci/strict.yaml", "failOn: note\n");
    expect((await loadConfig({ cwd: repo, configPath: "ci/strict.yaml" })).failOn).toBe("note");
    expect((await configError(loadConfig({ cwd: repo, configPath: "ci/none.yaml" }))).problems[0]!.message).toContain("file not found");
  });

  it("reports a YAML syntax error with its line", async () => {
    write("opgate.config.yaml", "rules:\n  headroom: [warning\n");
    const e = await configError(loadConfig({ cwd: repo }));
    expect(e.problems[0]!.line).toBeGreaterThanOrEqual(2);
  });
});

describe("rules named in the config", () => {
  it("reports an unknown rule id with its line and a did-you-mean", async () => {
    write("opgate.config.yaml", "failOn: error\nrules:\n  headrom: warning\n");
    const c = await loadConfig({ cwd: repo });
    const e = (() => {
      try {
        configuredRules(c, []);
      } catch (err) {
        return err as ConfigError;
      }
      throw new Error("expected a ConfigError");
    })();
    expect(e.problems[0]).toMatchObject({ file: "opgate.config.yaml", line: 3, hint: "did you mean `headroom`?" });
  });

  it("reports a bad option value at the option's line with the value received", async () => {
    write("opgate.config.yaml", "rules:\n  resistor-power:\n    options:\n      fraction: 1.5\n      fractoin: 0.4\n");
    const c = await loadConfig({ cwd: repo });
    let e: ConfigError | undefined;
    try {
      configuredRules(c, []);
    } catch (err) {
      e = err as ConfigError;
    }
    expect(e).toBeInstanceOf(ConfigError);
    const text = e!.message;
    expect(text).toContain("opgate.config.yaml:4:7: error: option `fraction` of rule `resistor-power` must be <= 1, got 1.5");
    expect(text).toContain("opgate.config.yaml:5:7: error: unknown option `fractoin` for rule `resistor-power` — did you mean `fraction`?");
  });

  it("gives each rule its configured severity and its options with defaults", async () => {
    write("opgate.config.yaml", "rules:\n  headroom: { severity: warning, options: { bjt: 0.8 } }\n  solve: off\n");
    const rules = configuredRules(await loadConfig({ cwd: repo }), []);
    const headroom = rules.find((r) => r.rule.id === "headroom")!;
    expect(headroom).toMatchObject({ severity: "warning", options: { bjt: 0.8, mos: 0.3 }, source: "builtin" });
    expect(rules.find((r) => r.rule.id === "solve")!.severity).toBe("off");
    expect(rules.find((r) => r.rule.id === "region")!.severity).toBe("error");
  });
});

describe("applyRuleFlags", () => {
  const ids = ["headroom", "region", "solve"];
  it("overrides severities, later flags winning", async () => {
    const c = applyRuleFlags(await loadConfig({ cwd: repo }), ["headroom=warning", "region=off", "headroom=note"], ids);
    expect(c.rules.headroom!.severity).toBe("note");
    expect(c.rules.region!.severity).toBe("off");
  });

  it("rejects an unknown id or severity with a did-you-mean, and a malformed flag", async () => {
    const c = await loadConfig({ cwd: repo });
    const e = (() => {
      try {
        applyRuleFlags(c, ["headrom=warning", "region=warn", "solve"], ids);
      } catch (err) {
        return err as ConfigError;
      }
      throw new Error("expected a ConfigError");
    })();
    expect(e.problems.map((p) => p.hint)).toEqual(["did you mean `headroom`?", "did you mean `warning`?", "for example --rule headroom=warning"]);
    expect(e.problems.every((p) => p.file === null)).toBe(true);
    expect(e.message).toContain("command line: error: --rule headrom=warning: unknown rule `headrom`");
  });
});
