// Usage errors: the usage of the command and the problem on stderr, nothing run, nothing written,
// exit 2 (CONVENTIONS: exit codes as linters use them; yargs' own default would be exit 1 and, with
// exitProcess(false), yargs 18 goes on to run the command — each case below did before).
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { cli, EXAMPLES } from "../run/repo.js";

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), "opgate-usage-"));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

const CASES: readonly [string, string[], RegExp, RegExp][] = [
  ["a value outside the choices", ["check", "--fail-on", "warn", EXAMPLES, "--json", "y.json"], /^opgate check/m, /Argument: fail-on, Given: "warn"/],
  ["a misspelt option of check", ["check", EXAMPLES, "--jsn", "x.json"], /^opgate check/m, /Unknown argument: jsn/],
  ["a misspelt option of init", ["init", "--forse"], /^opgate init/m, /Unknown argument: forse/],
  ["an unknown schema", ["schema", "foo"], /^opgate schema/m, /Argument: which, Given: "foo"/],
  ["a misspelt command", ["chek", EXAMPLES], /^Commands:/m, /opgate: unknown command "chek". Did you mean check\?/],
  ["no command", [], /^Commands:/m, /Name a command/],
];

describe("usage errors", () => {
  it.each(CASES)("%s: usage and the problem, nothing run or written, exit 2", async (_name, argv, usage, problem) => {
    const r = await cli(argv, dir);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(usage);
    expect(r.stderr).toMatch(problem);
    // The problem comes last, where the eye lands, and no verdict was printed: nothing ran.
    expect(r.stderr.trimEnd().split("\n").at(-1)).not.toBe("");
    expect(r.stderr).not.toMatch(/opgate: (pass|fail|error) —/);
    expect(r.stderr).not.toContain("internal error");
    expect(readdirSync(dir)).toEqual([]);
  });

  it("still prints help and the version with exit 0", async () => {
    expect((await cli(["--help"], dir)).code).toBe(0);
    expect((await cli(["schema", "--help"], dir)).stdout).toContain("opgate schema");
    expect((await cli(["schema", "config"], dir)).stdout).toContain('"$schema"');
  });
});
