// The reusable action (action.yml at the root) and the example gating workflow, read as the runner
// reads them (YAML) and, for the action, run: its check step's script is executed with bash the
// way a composite step runs it (inputs arrive as environment variables, GITHUB_OUTPUT collects
// the outputs). GitHub's own rules used here (common practice, from the Actions documentation):
// composite steps need `shell`; `${{ }}` pasted into a script is a script injection risk.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parse } from "yaml";
import { PACKAGE_ROOT } from "../../src/paths.js";
import { makeRepo } from "../run/repo.js";

interface Step {
  name?: string;
  id?: string;
  uses?: string;
  run?: string;
  shell?: string;
  if?: string;
  env?: Record<string, string>;
  with?: Record<string, string>;
  "continue-on-error"?: boolean;
}

const action = parse(readFileSync(join(PACKAGE_ROOT, "action.yml"), "utf8")) as {
  inputs: Record<string, { default?: string }>;
  outputs: Record<string, { value: string }>;
  runs: { using: string; steps: Step[] };
};
const actionText = readFileSync(join(PACKAGE_ROOT, "action.yml"), "utf8");

describe("action.yml", () => {
  it("is a composite action whose steps declare a shell and take inputs only through the environment", () => {
    expect(action.runs.using).toBe("composite");
    for (const step of action.runs.steps) {
      if (step.run) expect(step.shell, step.name).toBe("bash");
      if (step.run) expect(step.run, step.name).not.toContain("${{");
    }
    // Every input the action refers to is declared.
    for (const [, name] of actionText.matchAll(/inputs\.([a-z-]+)/g)) expect(Object.keys(action.inputs)).toContain(name);
    expect(action.outputs["exit-code"]!.value).toBe("${{ steps.check.outputs.exit-code }}");
  });

  describe("its check step, run", () => {
    let repo: { dir: string; cleanup(): void };
    let out: string;
    beforeAll(() => {
      repo = makeRepo();
      out = mkdtempSync(join(tmpdir(), "opgate-action-"));
    });
    afterAll(() => {
      repo.cleanup();
      rmSync(out, { recursive: true, force: true });
    });

    function runStep(inputs: Record<string, string>) {
      const step = action.runs.steps.find((s) => s.id === "check")!;
      const env: Record<string, string> = { ...(process.env as Record<string, string>), GITHUB_ACTION_PATH: PACKAGE_ROOT, GITHUB_OUTPUT: join(out, "output") };
      // The step's env block, with each `${{ inputs.x }}` replaced by the input (or its default).
      for (const [key, value] of Object.entries(step.env ?? {})) {
        env[key] = value.replace(/\$\{\{\s*inputs\.([a-z-]+)\s*\}\}/g, (_m, name: string) => inputs[name] ?? action.inputs[name]?.default ?? "");
      }
      writeFileSync(join(out, "output"), "");
      const r = spawnSync("bash", ["-e", "-c", step.run!], { cwd: repo.dir, env, encoding: "utf8", timeout: 120_000 });
      return { ...r, output: readFileSync(join(out, "output"), "utf8") };
    }

    it("checks, writes the reports, and ends with the gate's exit code", () => {
      if (!existsSync(join(PACKAGE_ROOT, "dist", "bundle", "bin.js"))) throw new Error("build first (npm run build)");
      const failing = runStep({ paths: "boards/tide-gauge-preamp-rev-b.yaml boards/tide-gauge-preamp.yaml" });
      expect(failing.status, failing.stderr).toBe(1);
      expect(failing.output).toBe("exit-code=1\n");
      for (const f of ["opgate-results.json", "opgate.sarif", "opgate-report.md", "opgate-junit.xml"]) expect(existsSync(join(repo.dir, f)), f).toBe(true);
      const passing = runStep({ paths: "boards/tide-gauge-preamp.yaml", sarif: "", markdown: "", junit: "", json: "out/r.json", args: "--fail-on error" });
      expect(passing.status, passing.stderr).toBe(0);
      expect(passing.output).toBe("exit-code=0\n");
      const usage = runStep({ "fail-on": "warn" });
      expect(usage.status).toBe(2);
      expect(usage.output).toBe("exit-code=2\n");
    });

    it("passes text inputs as arguments, never as shell code", () => {
      const r = runStep({ paths: "boards/tide-gauge-preamp.yaml", config: "$(touch pwned)" });
      expect(r.status).toBe(2);
      expect(r.stderr).toContain("--config $(touch pwned): file not found");
      expect(existsSync(join(repo.dir, "pwned"))).toBe(false);
    });
  });
});

describe("the example gating workflow", () => {
  const workflow = parse(readFileSync(join(PACKAGE_ROOT, ".github", "workflows", "gate-example.yml"), "utf8")) as {
    on: { pull_request: { paths: string[] } };
    env: Record<string, string>;
    jobs: Record<string, { steps: Step[] }>;
  };

  it("re-runs when circuits, the policy, team rules or the package files change", () => {
    const paths = workflow.on.pull_request.paths;
    for (const p of ["**/opgate.config.yaml", "team-rules/**", "examples/team-rules/**", "package.json", "package-lock.json"]) expect(paths).toContain(p);
  });

  it("checks under its policy file, which exists", () => {
    expect(existsSync(join(PACKAGE_ROOT, workflow.env.OPGATE_CONFIG!))).toBe(true);
    const check = workflow.jobs.check!.steps.find((s) => s.id === "check")!;
    expect(check.run).toContain('--config "$OPGATE_CONFIG"');
    // It runs the CLI that the package's bin names.
    const bin = (JSON.parse(readFileSync(join(PACKAGE_ROOT, "package.json"), "utf8")) as { bin: { opgate: string } }).bin.opgate;
    expect(workflow.env.OPGATE).toBe(`node ${bin}`);
  });

  it("does not fail a fork's pull request when code scanning refuses the SARIF upload", () => {
    const upload = workflow.jobs.merge!.steps.find((s) => s.uses?.startsWith("github/codeql-action/upload-sarif"))!;
    expect(upload.if).toContain("github.event.pull_request.head.repo.full_name == github.repository");
    expect(upload["continue-on-error"]).toBe(true);
  });
});
