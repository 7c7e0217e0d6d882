// The team-rule guide (examples/team-rules/README.md) must not lie: its example rule is loaded
// from a temporary repository with opgate installed, listed by `opgate rules`, and run.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, expect, it } from "vitest";
import { run } from "../../src/cli/main.js";
import { loadCircuitText } from "../../src/circuit/index.js";
import { loadConfig } from "../../src/review/config.js";
import { runRules } from "../../src/review/engine.js";
import { configuredRules, loadPlugins } from "../../src/review/plugins.js";
import { analyseCircuit } from "../../src/review/tester.js";
import { npnStage } from "./circuits.js";

const PACKAGE = resolve(import.meta.dirname, "..", "..");
const guide = readFileSync(join(PACKAGE, "examples", "team-rules", "README.md"), "utf8");
const example = /```ts\n([\s\S]*?)```/.exec(guide)![1]!;
const repo = mkdtempSync(join(tmpdir(), "opgate-guide-"));
afterAll(() => rmSync(repo, { recursive: true, force: true }));

it("the guide's example rule loads, lists and finds what it says", async () => {
  writeFileSync(join(repo, "package.json"), JSON.stringify({ name: "boards", private: true, type: "module" }));
  mkdirSync(join(repo, "team-rules"));
  writeFileSync(join(repo, "team-rules", "collector-ceiling.ts"), example);
  writeFileSync(join(repo, "opgate.config.yaml"), "plugins: [team-rules/collector-ceiling.ts]\nrules:\n  team/collector-ceiling: { options: { volts: 5 } }\n");
  mkdirSync(join(repo, "node_modules"));
  symlinkSync(PACKAGE, join(repo, "node_modules", "opgate"), "dir"); // as after npm install

  const out: string[] = [];
  const err: string[] = [];
  const code = await run(["rules", "team/collector-ceiling", "--json"], { cwd: repo, env: {}, isTTY: false, stdout: (t) => out.push(t), stderr: (t) => err.push(t) });
  expect(err.join("")).toBe("");
  expect(code).toBe(0);
  expect(JSON.parse(out.join(""))[0]).toMatchObject({ id: "team/collector-ceiling", severity: "warning", options: { volts: { value: 5, default: 6, circuitOverride: true } } });

  const config = await loadConfig({ cwd: repo });
  const loaded = loadCircuitText(`format: opgate-circuit/1\nname: preamp\n${npnStage()}`, "boards/preamp.yaml");
  if (!loaded.ok) throw new Error(JSON.stringify(loaded.errors));
  const { findings } = await runRules({ circuit: loaded.circuit, analyses: analyseCircuit(loaded.circuit), rules: configuredRules(config, await loadPlugins(config)) });
  // The collector sits near 6.4 V (12 V − 1.17 mA·4.7 kΩ), above the configured 5 V.
  expect(findings.filter((f) => f.rule === "team/collector-ceiling").map((f) => [f.subject, f.severity, f.limit])).toEqual([["Q1", "warning", 5]]);
});
