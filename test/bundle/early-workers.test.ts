// `check --jobs N` starts its workers before it looks for files (src/cli/check.ts, src/run/lane.ts
// openLane). Whatever way the run ends before the pool takes them over, the process must still
// end: these run the bundled CLI as a process, where a forgotten worker would keep it alive.
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeRepo } from "../run/repo.js";

const BUNDLE = fileURLToPath(new URL("../../dist/bundle/bin.js", import.meta.url));

let repo: { dir: string; cleanup(): void };
beforeAll(() => {
  repo = makeRepo({ "broken/opgate.config.yaml": "format: opgate-config/1\nfailOn: [\n" });
});
afterAll(() => repo.cleanup());

function opgate(args: readonly string[], cwd = repo.dir): { status: number | null; stdout: string; stderr: string; signal: NodeJS.Signals | null } {
  const r = spawnSync(process.execPath, [BUNDLE, ...args], { cwd, encoding: "utf8", timeout: 30_000, env: { ...process.env, NO_COLOR: "1", CI: "true" } });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr, signal: r.signal };
}

describe("workers started ahead", () => {
  it("do not keep the process alive when the run ends before checking anything", () => {
    const nothing = opgate(["check", "no-such-folder", "--jobs", "2"]);
    expect(nothing.signal).toBeNull();
    expect(nothing.status).toBe(2);
    expect(nothing.stderr).toMatch(/no-such-folder/);
    const badConfig = opgate(["check", ".", "--jobs", "2"], `${repo.dir}/broken`);
    expect(badConfig.signal).toBeNull();
    expect(badConfig.status).toBe(2);
    expect(badConfig.stderr).toMatch(/opgate\.config\.yaml:\d+:\d+/);
  }, 60_000);

  it("give the same results as one lane, also for a run with fewer files than lanes", () => {
    const one = opgate(["check", "boards", "--jobs", "1", "--json", "one.json"]);
    const two = opgate(["check", "boards", "--jobs", "2", "--json", "two.json"]);
    expect(two.signal).toBeNull();
    expect(two.status).toBe(one.status);
    expect(two.stdout).toBe(one.stdout);
    expect(readFileSync(join(repo.dir, "two.json"), "utf8")).toBe(readFileSync(join(repo.dir, "one.json"), "utf8"));
    const single = opgate(["check", "boards/tide-gauge-preamp.yaml", "--jobs", "2"]);
    expect(single.signal).toBeNull();
    expect(single.status).toBe(opgate(["check", "boards/tide-gauge-preamp.yaml", "--jobs", "1"]).status);
  }, 60_000);
});
