// The bundled CLI (dist/bundle/, written by `npm run build`) against the CLI from source: the
// same arguments in the same repository must give the same exit code and the same bytes on
// stdout and stderr, for every command, each report format, usage errors, help, a TypeScript
// team rule, and worker lanes (--jobs 2 runs the bundled lane).
import { cpSync, existsSync, mkdirSync, readFileSync, symlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { CliIo } from "../../src/cli/io.js";
import { run as runSource } from "../../src/cli/main.js";
import { EXAMPLES, makeRepo } from "../run/repo.js";

const BUNDLE = fileURLToPath(new URL("../../dist/bundle/bin.js", import.meta.url));
type Run = (argv: readonly string[], io: CliIo) => Promise<number>;

let repo: { dir: string; cleanup(): void };
let runBundle: Run;
beforeAll(async () => {
  expect(existsSync(BUNDLE), "npm run build writes dist/bundle/").toBe(true);
  runBundle = ((await import(pathToFileURL(BUNDLE).href)) as { run: Run }).run;
  repo = makeRepo();
  cpSync(join(EXAMPLES, "team-rules"), join(repo.dir, "team-rules"), { recursive: true });
  writeFileSync(join(repo.dir, "opgate.config.yaml"), readFileSync(join(EXAMPLES, "opgate.config.yaml"), "utf8"));
  mkdirSync(join(repo.dir, "node_modules"));
  symlinkSync(join(EXAMPLES, ".."), join(repo.dir, "node_modules", "opgate"), "dir");
});
afterAll(() => repo?.cleanup());

async function outcome(run: Run, argv: readonly string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = "";
  let stderr = "";
  const code = await run(argv, { cwd: repo.dir, env: { NO_COLOR: "1" }, isTTY: false, stderrIsTTY: false, stdout: (t) => void (stdout += t), stderr: (t) => void (stderr += t) });
  return { code, stdout, stderr };
}

const CASES: readonly (readonly string[])[] = [
  ["--version"],
  ["--help"],
  ["check", "--help"],
  ["frobnicate"],
  ["check", "--jobs", "zero"],
  ["check", "boards/missing.yaml"],
  ["check", "boards", "--rule", "no-such-rule=off"],
  ["check", "boards"],
  ["check", "boards", "-q", "--json=-"],
  ["check", "boards", "-q", "--junit=-"],
  ["check", "boards", "-q", "--markdown=-"],
  ["check", "boards", "-q", "--sarif=-"],
  ["check", "boards", "-q", "--jobs", "2", "--json=-"],
  ["rules"],
  ["inspect", "boards/tide-gauge-preamp.yaml"],
  ["schema"],
];

describe("the bundled CLI behaves exactly like the CLI from source", () => {
  for (const argv of CASES) {
    it(`opgate ${argv.join(" ")}`, async () => {
      const source = await outcome(runSource, argv);
      const bundled = await outcome(runBundle, argv);
      expect(bundled).toEqual(source);
      // The runs did check the circuits (a config or plugin error would also be "the same").
      if (argv.includes("--json=-")) expect(JSON.parse(source.stdout).circuits.length).toBeGreaterThan(5);
    }, 120_000);
  }
});

describe("the bundled binary", () => {
  it("runs as a process: --version, and a check with its exit code and report", async () => {
    const { spawnSync } = await import("node:child_process");
    const version = spawnSync(process.execPath, [BUNDLE, "--version"], { encoding: "utf8" });
    expect(version.status).toBe(0);
    expect(version.stdout).toBe((await outcome(runSource, ["--version"])).stdout);
    const check = spawnSync(process.execPath, [BUNDLE, "check", "boards", "-q", "--json=-"], { cwd: repo.dir, encoding: "utf8", env: { ...process.env, NO_COLOR: "1", CI: "", GITHUB_ACTIONS: "" } });
    const source = await outcome(runSource, ["check", "boards", "-q", "--json=-"]);
    expect(check.status).toBe(source.code);
    expect(check.stdout).toBe(source.stdout);
  }, 120_000);
});
