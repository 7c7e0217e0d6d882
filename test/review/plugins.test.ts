// Team plugins loaded from a temporary repository through the real CLI in-process:
// a TypeScript rule (no build step) and a JavaScript module exporting two plain rule objects;
// broken plugins give config errors (exit 2) naming the plugin and the reason.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { run } from "../../src/cli/main.js";
import type { CliIo } from "../../src/cli/io.js";
import { loadCircuitText } from "../../src/circuit/index.js";
import { runRules } from "../../src/review/engine.js";
import { loadConfig } from "../../src/review/config.js";
import { configuredRules, loadPlugins } from "../../src/review/plugins.js";
import { analyseCircuit } from "../../src/review/tester.js";
import { npnStage } from "./circuits.js";

function fakeIo(cwd: string): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { cwd, env: {}, isTTY: false, out, err, stdout: (t) => out.push(t), stderr: (t) => err.push(t) };
}

// TypeScript syntax (types, `as const`, `satisfies`) that only loads if the file is compiled.
const TS_RULE = `import type { RuleView, Reporter } from "opgate";

interface Options { readonly maxCollectorVolts: number }

const rule = {
  id: "tidewater/collector-ceiling",
  description: "Checks that no collector sits above a set voltage",
  severity: "warning" as const,
  options: { type: "object", additionalProperties: false, properties: { maxCollectorVolts: { type: "number", default: 6 } } } as const,
  docs: "Collectors above the ceiling leave no room for the output swing.",
  check({ circuit, op, options }: RuleView<Options>, report: Reporter): void {
    for (const c of circuit.components) {
      if (c.kind !== "npn") continue;
      const v: number = op.nodes[c.pins.collector] ?? 0;
      if (v > options.maxCollectorVolts) report.fail({ subject: c.id, message: \`collector at \${v.toFixed(2)} V\`, measured: v, limit: options.maxCollectorVolts, unit: "V", bound: "max" });
      else report.pass(c.id, { measured: v, limit: options.maxCollectorVolts, unit: "V", bound: "max" });
    }
  },
};
export default rule;
`;

const JS_RULES = `// Two house rules as plain objects: no import needed.
export default [
  {
    id: "tidewater/no-bare-capacitors",
    description: "Checks that every capacitor gives a voltage rating",
    severity: "note",
    docs: "Ratings let capacitor-voltage do its job.",
    check({ circuit }, report) {
      for (const c of circuit.components) if (c.kind === "capacitor" && c.voltageRating === undefined) report.fail({ subject: c.id, message: c.id + " has no voltageRating" });
    },
  },
  {
    id: "tidewater/resistor-count",
    description: "Checks that a stage uses at most a set number of resistors",
    severity: "note",
    options: { type: "object", additionalProperties: false, properties: { max: { type: "integer", minimum: 1, default: 12 } } },
    docs: "Small stages are easier to review.",
    check({ circuit, options }, report) {
      const n = circuit.components.filter((c) => c.kind === "resistor").length;
      if (n > options.max) report.fail({ subject: circuit.name, message: n + " resistors", measured: n, limit: options.max, bound: "max" });
    },
  },
];
`;

let repo: string;

function write(path: string, text: string): void {
  mkdirSync(join(repo, path, ".."), { recursive: true });
  writeFileSync(join(repo, path), text);
}

function newRepo(config: string, files: Record<string, string>): string {
  repo = mkdtempSync(join(tmpdir(), "opgate-plugins-"));
  write("package.json", JSON.stringify({ name: "tidewater-boards", private: true, type: "module" }));
  write("opgate.config.yaml", config);
  for (const [p, t] of Object.entries(files)) write(p, t);
  return repo;
}

const repos: string[] = [];
afterAll(() => {
  for (const r of repos) rmSync(r, { recursive: true, force: true });
});

describe("plugins in a repository", () => {
  beforeAll(() => {
    repos.push(newRepo("plugins:\n  - team-rules/*.ts\n  - team-rules/legacy.js\nrules:\n  tidewater/collector-ceiling: { options: { maxCollectorVolts: 5 } }\n", { "team-rules/collector-ceiling.ts": TS_RULE, "team-rules/legacy.js": JS_RULES }));
  });

  it("lists built-in and plugin rules with sources, severities and option defaults (opgate rules --json)", async () => {
    const io = fakeIo(join(repo, "team-rules"));
    const code = await run(["rules", "--json"], io);
    expect(io.err.join("")).toBe("");
    expect(code).toBe(0);
    const listing = JSON.parse(io.out.join("")) as { id: string; source: string; severity: string; options: Record<string, { value: unknown; default: unknown }> }[];
    expect(listing.map((r) => r.id)).toEqual([
      "band-edges", "band-flatness", "capacitor-polarity", "capacitor-voltage", "coil-drive", "device-current", "device-power", "device-ratings", "gain-window", "headroom", "impedance-window", "node-level", "region", "resistor-power", "signal-swing", "solve", "supply-budget",
      "tidewater/collector-ceiling", "tidewater/no-bare-capacitors", "tidewater/resistor-count",
    ]);
    const ceiling = listing.find((r) => r.id === "tidewater/collector-ceiling")!;
    expect(ceiling).toMatchObject({ source: "team-rules/collector-ceiling.ts", severity: "warning", options: { maxCollectorVolts: { value: 5, default: 6 } } });
    expect(listing.find((r) => r.id === "tidewater/resistor-count")).toMatchObject({ source: "team-rules/legacy.js", options: { max: { value: 12, default: 12 } } });
    expect(listing.find((r) => r.id === "resistor-power")!.options).toMatchObject({ fraction: { default: 0.5 }, fullRatingUpToC: { default: 70 } });
  });

  it("prints the docs in text form and applies --rule", async () => {
    const io = fakeIo(repo);
    expect(await run(["rules", "tidewater/collector-ceiling", "--rule", "tidewater/collector-ceiling=error"], io)).toBe(0);
    const text = io.out.join("");
    expect(text).toContain("tidewater/collector-ceiling  [error (default warning)]  team-rules/collector-ceiling.ts");
    expect(text).toContain("maxCollectorVolts: 5 (default 6)");
    expect(text).toContain("Collectors above the ceiling");
  });

  it("runs the plugin rules on a real circuit next to the built-ins", async () => {
    const config = await loadConfig({ cwd: repo });
    const rules = configuredRules(config, await loadPlugins(config));
    const loaded = loadCircuitText(`format: opgate-circuit/1\nname: tide-gauge-stage\n${npnStage({ parts: "  - { id: CB, kind: capacitor, pins: [vcc, gnd], value: 100n }" })}`, "boards/stage.yaml");
    if (!loaded.ok) throw new Error(JSON.stringify(loaded.errors));
    const { findings } = await runRules({ circuit: loaded.circuit, analyses: analyseCircuit(loaded.circuit), rules });
    const team = findings.filter((f) => f.rule.startsWith("tidewater/"));
    // The stage's collector sits near 6.4 V (12 V − 1.17 mA·4.7 kΩ), above the configured 5 V.
    expect(team.map((f) => [f.rule, f.subject, f.severity])).toEqual([
      ["tidewater/collector-ceiling", "Q1", "warning"],
      ["tidewater/no-bare-capacitors", "CB", "note"],
    ]);
    expect(team[0]!.file).toBe("boards/stage.yaml");
    expect(team[0]!.measured).toBeGreaterThan(6);
  });
});

describe("broken plugins are config errors naming the plugin", () => {
  const cases: [string, Record<string, string>, RegExp][] = [
    ["a TypeScript syntax error", { "team-rules/bad.ts": "export default { id: 'x', check( {\n" }, /plugin team-rules\/bad\.ts failed to load/],
    ["a module that throws on import", { "team-rules/bad.mjs": "throw new Error('no ratings table');\n" }, /plugin team-rules\/bad\.mjs failed to load: no ratings table/],
    ["no default export", { "team-rules/bad.mjs": "export const rule = 1;\n" }, /plugin team-rules\/bad\.mjs has no default export/],
    ["an export that is not a rule", { "team-rules/bad.mjs": "export default { id: 'Bad Id', description: 'x', severity: 'fatal', docs: 'd' };\n" }, /exports something that is not a rule: `id` must be lower-case.*`severity` must be one of.*`check` must be a function/],
    ["a rule id that is already built in", { "team-rules/bad.mjs": "export default { id: 'headroom', description: 'Checks x', severity: 'note', docs: 'd', check() {} };\n" }, /defines rule `headroom`, which the built-in rules already define/],
    ["a bad option schema default", { "team-rules/bad.mjs": "export default { id: 'team/x', description: 'Checks x', severity: 'note', docs: 'd', options: { type: 'object', properties: { n: { type: 'number', default: 'many' } } }, check() {} };\n" }, /team-rules\/bad.mjs: error: rule `team\/x` has a default for option `n` that its own schema refuses: must be number/],
  ];
  for (const [what, files, message] of cases) {
    it(what, async () => {
      const name = Object.keys(files)[0]!;
      repos.push(newRepo(`plugins: [${name.replace("team-rules/", "team-rules/")}]\n`, files));
      const io = fakeIo(repo);
      expect(await run(["rules"], io)).toBe(2);
      const err = io.err.join("");
      expect(err).toMatch(message);
      expect(err).not.toMatch(/\n\s+at /); // no stack trace
    });
  }

  it("two plugins defining the same id", async () => {
    const one = "export default { id: 'team/same', description: 'Checks x', severity: 'note', docs: 'd', check() {} };\n";
    repos.push(newRepo("plugins: ['team-rules/*.mjs']\n", { "team-rules/a.mjs": one, "team-rules/b.mjs": one }));
    const io = fakeIo(repo);
    expect(await run(["rules"], io)).toBe(2);
    expect(io.err.join("")).toContain("plugin team-rules/b.mjs defines rule `team/same`, which plugin team-rules/a.mjs already defines");
  });
});
