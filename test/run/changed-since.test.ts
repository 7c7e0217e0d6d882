// check --changed-since REF on a temporary git repository: commits that touch, rename and delete
// circuit files and change a model library, each followed by the set of files the check takes
// (read from the results document) — and the baseline comparison restricted to that set.
import { spawnSync } from "node:child_process";
import { mkdirSync, readFileSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cli, makeRepo } from "./repo.js";

const LIB = (beta: number) => `format: opgate-library/1
models:
  own-npn: { kind: npn, beta: { min: 100, typ: ${beta}, max: 400 }, saturationCurrent: 1e-14 A }
`;
const follower = (name: string, model = "", extra = "") => `format: opgate-circuit/1
name: ${name}
${extra}${model ? "" : "models:\n  q: { kind: npn, beta: { min: 100, typ: 200, max: 300 }, saturationCurrent: 1e-14 A }\n"}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: RB, kind: resistor, pins: [vcc, b], value: 100k }
  - { id: RB2, kind: resistor, pins: [b, gnd], value: 47k }
  - { id: Q1, kind: npn, model: ${model || "q"}, pins: { collector: vcc, base: b, emitter: out } }
  - { id: RE, kind: resistor, pins: [out, gnd], value: 1k }
`;

let repo: { dir: string; cleanup(): void };
const sh = (...args: string[]): string => {
  const r = spawnSync("git", args, { cwd: repo.dir, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`git ${args.join(" ")}: ${r.stderr}`);
  return r.stdout.trim();
};
const write = (rel: string, text: string): void => {
  mkdirSync(dirname(join(repo.dir, rel)), { recursive: true });
  writeFileSync(join(repo.dir, rel), text);
};
const commit = (message: string): string => {
  sh("add", "-A");
  sh("commit", "-q", "-m", message);
  return sh("rev-parse", "HEAD");
};

/** The files a --changed-since run checked (from its results document), its exit code and its stderr. */
async function checked(ref: string, extra: string[] = []): Promise<{ code: number; files: string[]; stderr: string; doc: { circuits: { file: string }[] } }> {
  const r = await cli(["check", "cards", "--changed-since", ref, "--json=-", "-q", ...extra], repo.dir);
  const doc = JSON.parse(r.stdout || "{}") as { circuits: { file: string }[] };
  return { code: r.code, files: (doc.circuits ?? []).map((c) => c.file), stderr: r.stderr, doc };
}

let base: string;
beforeAll(() => {
  repo = makeRepo({
    "lib/own.yaml": LIB(200),
    "cards/a.yaml": follower("card-a"),
    "cards/b.yaml": follower("card-b"),
    "cards/c.yaml": follower("card-c", "own-npn", "libraries: [../lib/own.yaml]\n"),
    "cards/d.yaml": follower("card-d"),
    "opgate.config.yaml": "failOn: error\n",
  });
  rmSync(join(repo.dir, "boards"), { recursive: true, force: true });
  sh("init", "-q");
  sh("config", "user.email", "ci@tidewater.example");
  sh("config", "user.name", "Tidewater CI");
  base = commit("four cards");
});
afterAll(() => repo.cleanup());

describe("check --changed-since", () => {
  it("checks nothing when nothing changed (exit 0, an empty results document)", async () => {
    const r = await checked(base);
    expect(r.code).toBe(0);
    expect(r.files).toEqual([]);
    expect(r.stderr).toContain(`changed since ${base}: 0 of 4 circuit files`);
  });

  it("takes a touched file, the new name of a renamed one, and not a deleted one", async () => {
    write("cards/a.yaml", follower("card-a").replace("value: 1k", "value: 1.2k"));
    renameSync(join(repo.dir, "cards/b.yaml"), join(repo.dir, "cards/b-renamed.yaml"));
    rmSync(join(repo.dir, "cards/d.yaml"));
    const head = commit("touch a, rename b, delete d");
    expect((await checked(base)).files).toEqual(["cards/a.yaml", "cards/b-renamed.yaml"]);
    // Against the new commit nothing changed; an uncommitted edit and a new untracked file count.
    expect((await checked(head)).files).toEqual([]);
    write("cards/e.yaml", follower("card-e"));
    write("cards/c.yaml", `${follower("card-c", "own-npn", "libraries: [../lib/own.yaml]\n")}# reviewed\n`);
    expect((await checked(head)).files).toEqual(["cards/c.yaml", "cards/e.yaml"]);
    commit("add e, note on c");
  });

  it("takes the circuits that use a changed model library, and everything when the config changes", async () => {
    const before = sh("rev-parse", "HEAD");
    write("lib/own.yaml", LIB(250));
    commit("retune own-npn");
    expect((await checked(before)).files).toEqual(["cards/c.yaml"]);
    const beforeConfig = sh("rev-parse", "HEAD");
    write("opgate.config.yaml", "failOn: warning\n");
    commit("stricter");
    const r = await checked(beforeConfig);
    expect(r.files).toEqual(["cards/a.yaml", "cards/b-renamed.yaml", "cards/c.yaml", "cards/e.yaml"]);
    expect(r.stderr).toMatch(/opgate\.config\.yaml \(policy\), so all 4 circuit files/);
  });

  it("compares with a baseline on the checked files only (the others are not 'removed'), deleted ones are", async () => {
    const full = await cli(["check", "cards", "--json", "base.json", "-q"], repo.dir);
    expect([0, 1]).toContain(full.code);
    const ref = sh("rev-parse", "HEAD");
    write("cards/a.yaml", follower("card-a").replace("value: 100k", "value: 120k"));
    rmSync(join(repo.dir, "cards/e.yaml"));
    const r = await cli(["check", "cards", "--changed-since", ref, "--baseline", "base.json", "--markdown=-", "-q"], repo.dir);
    expect([0, 1]).toContain(r.code);
    expect(r.stdout).toContain("cards/e.yaml");
    expect(r.stdout).not.toContain("cards/c.yaml");
    expect(r.stdout).not.toContain("cards/b-renamed.yaml");
    expect(readFileSync(join(repo.dir, "base.json"), "utf8")).toContain("cards/c.yaml");
  });

  it("refuses a reference that is not a commit, naming it (exit 2)", async () => {
    const r = await cli(["check", "cards", "--changed-since", "no-such-branch"], repo.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("--changed-since no-such-branch: not a commit in this repository");
  });
});
