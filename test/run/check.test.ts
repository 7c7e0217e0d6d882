// `opgate check` end to end, in-process, on a temporary repository of the example circuits:
// reports, exit codes, a broken file among good ones, shards and merge, worker threads, CI outputs.
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { documentProblems } from "../../src/report/validate.js";
import { PACKAGE_ROOT } from "../../src/paths.js";
import { cli, exampleFiles, makeRepo } from "./repo.js";

const BROKEN_YAML = "format: opgate-circuit/1\nname: broken-one\ncomponents: [\n";

let repo: { dir: string; cleanup(): void };
beforeAll(() => {
  repo = makeRepo({ "boards/zz-unparseable.yaml": BROKEN_YAML });
});
afterAll(() => repo.cleanup());

/** The test repository's context and circuit files, as `check` finds them. */
async function repoFiles() {
  const { makeCheckContext } = await import("../../src/run/context.js");
  const { discoverCircuitFiles } = await import("../../src/run/discover.js");
  const ctx = await makeCheckContext({ cwd: repo.dir });
  const files = await discoverCircuitFiles(["boards"], { cwd: repo.dir, root: repo.dir, include: ctx.config.include, exclude: ctx.config.exclude, circuitsOnly: true });
  return { ctx, files };
}

function read(rel: string): string {
  return readFileSync(join(repo.dir, rel), "utf8");
}

describe("opgate check", () => {
  it("checks every file, keeps going past broken ones, and writes every report", async () => {
    const r = await cli(["check", "boards", "--jobs", "1", "--json", "out/r.json", "--junit", "out/j.xml", "--markdown", "out/r.md", "--sarif", "out/s.sarif"], repo.dir);
    expect(r.code).toBe(2);
    const doc = JSON.parse(read("out/r.json"));
    expect(documentProblems(doc)).toEqual([]);
    expect(doc.circuits.map((c: { file: string }) => c.file)).toEqual([...exampleFiles().map((f) => `boards/${f}`), "boards/zz-unparseable.yaml"].sort());
    const broken = doc.circuits.find((c: { file: string }) => c.file === "boards/zz-unparseable.yaml");
    expect(broken.status).toBe("error");
    expect(broken.findings[0].rule).toBe("input");
    // The good files still have their full results.
    const preamp = doc.circuits.find((c: { file: string }) => c.file === "boards/tide-gauge-preamp.yaml");
    expect(preamp.operatingPoint).not.toBeNull();
    expect(r.stdout).toMatch(/^error boards\/zz-unparseable\.yaml$/m);
    expect(r.stdout).toMatch(/^\s+boards\/zz-unparseable\.yaml:\d+:\d+  error   input /m);
    expect(r.stdout.trimEnd().split("\n").at(-1)).toMatch(/^opgate: error — \d+ circuits/);
    expect(read("out/j.xml")).toContain("<testsuites");
    expect(read("out/r.md").split("\n")[0]).toContain("**opgate: error**");
    expect(JSON.parse(read("out/s.sarif")).version).toBe("2.1.0");
  });

  it("writes byte-identical results with --jobs 2 and --jobs 1", async () => {
    const one = await cli(["check", "boards", "--jobs", "1", "--json", "out/j1.json"], repo.dir);
    const two = await cli(["check", "boards", "--jobs", "2", "--json", "out/j2.json"], repo.dir);
    expect(two.code).toBe(one.code);
    expect(read("out/j2.json")).toBe(read("out/j1.json"));
    expect(two.stdout).toBe(one.stdout);
    // Seven files are too few for a worker to pay back its start-up: force workers (and keep
    // this process out of it) so that every file really crosses a process or thread boundary.
    const { runCheckDocument } = await import("../../src/run/run-check.js");
    const { renderJson } = await import("../../src/report/json.js");
    const { ctx, files } = await repoFiles();
    const notices: string[] = [];
    const onNotice = (m: string): void => void notices.push(m);
    const single = await runCheckDocument(files, { ctx, contextOptions: { cwd: repo.dir }, jobs: 1 });
    expect(renderJson(single)).toBe(read("out/j1.json"));
    const workers = await runCheckDocument(files, { ctx, contextOptions: { cwd: repo.dir }, jobs: 2, minFilesPerWorker: 1, mainThreadLane: false, onNotice });
    expect(notices).toEqual([]);
    expect(renderJson(workers)).toBe(renderJson(single));
  }, 120_000);

  it("adds workers on its own only where they pay, and always when --jobs asks for them", async () => {
    const { checkFiles } = await import("../../src/run/pool.js");
    const { ctx, files } = await repoFiles();
    // A worker would crash on this file: a run in which it checks fine used no worker.
    const victim = files[1]!.display;
    const auto = await checkFiles(files, { jobs: 2, autoJobs: true, context: { cwd: repo.dir }, ctx, crashOn: victim });
    expect(auto.filter((r) => r.findings.some((f) => f.rule === "internal"))).toHaveLength(0);
    const asked = await checkFiles(files, { jobs: 2, mainThreadLane: false, context: { cwd: repo.dir }, ctx, crashOn: victim });
    expect(asked[1]!.findings[0]!.rule).toBe("internal");
  }, 120_000);

  it("takes over workers started ahead, and stops the ones it has no file for", async () => {
    const { checkFiles } = await import("../../src/run/pool.js");
    const { openLane } = await import("../../src/run/lane.js");
    const { ctx, files: all } = await repoFiles();
    const files = all.slice(0, 3);
    const attached: number[] = [];
    const stopped: number[] = [];
    // Three workers started ahead, as `check --jobs 4` does, for a run that turns out to have
    // three files: it needs two workers beside this thread.
    const started = [0, 1, 2].map((k) => {
      const lane = openLane({ context: { cwd: repo.dir } });
      return {
        attach: (on: Parameters<typeof lane.attach>[0]) => (attached.push(k), lane.attach(on)),
        stop: () => (stopped.push(k), lane.stop()),
      };
    });
    // A worker started ahead learns the run (here: crash on this file) only when taken over.
    const victim = files[2]!.display;
    const results = await checkFiles(files, { jobs: 4, context: { cwd: repo.dir }, ctx, started, crashOn: victim, mainThreadLane: false });
    expect(attached).toEqual([0, 1, 2]);
    expect(stopped).toEqual([]);
    expect(results[2]!.findings[0]!.rule).toBe("internal");
    const alone = await checkFiles(files.slice(0, 2), { jobs: 1, context: { cwd: repo.dir }, ctx });
    expect(results.slice(0, 2)).toEqual(alone);

    const spare = [0, 1, 2].map((k) => {
      const lane = openLane({ context: { cwd: repo.dir } });
      return { attach: (on: Parameters<typeof lane.attach>[0]) => (attached.push(10 + k), lane.attach(on)), stop: () => (stopped.push(10 + k), lane.stop()) };
    });
    attached.length = 0;
    const two = await checkFiles(files.slice(0, 2), { jobs: 4, context: { cwd: repo.dir }, ctx, started: spare });
    // Two files: this thread and one worker; the other two are stopped before any file is sent.
    expect(attached).toEqual([10]);
    expect(stopped).toEqual([11, 12]);
    expect(two).toEqual(alone);
  }, 120_000);

  it("stops its workers when the caller's handler throws, and says why", async () => {
    const { checkFiles } = await import("../../src/run/pool.js");
    const { openLane } = await import("../../src/run/lane.js");
    const { ctx, files } = await repoFiles();
    const stops: number[] = [];
    const started = [0, 1].map((k) => {
      const lane = openLane({ context: { cwd: repo.dir } });
      return {
        attach: (on: Parameters<typeof lane.attach>[0]) => {
          const attached = lane.attach(on);
          return { send: attached.send, stop: () => (stops.push(k), attached.stop()) };
        },
        stop: lane.stop,
      };
    });
    const run = checkFiles(files, {
      jobs: 2,
      mainThreadLane: false,
      context: { cwd: repo.dir },
      ctx,
      started,
      prepare: { failOn: "error", needs: { json: false, junit: false, whole: false } },
      onResult: () => {
        throw new Error("the report disk is full");
      },
    });
    await expect(run).rejects.toThrow("the report disk is full");
    expect(stops.sort()).toEqual([0, 1]);
  }, 120_000);

  it("reports a dead worker as an error for its file and finishes the rest", async () => {
    const { checkFiles } = await import("../../src/run/pool.js");
    const { ctx, files } = await repoFiles();
    const victim = files[1]!.display;
    const notices: string[] = [];
    const results = await checkFiles(files, { jobs: 2, minFilesPerWorker: 1, mainThreadLane: false, context: { cwd: repo.dir }, ctx, crashOn: victim, onNotice: (m) => notices.push(m) });
    expect(results.map((r) => r.file)).toEqual(files.map((f) => f.display));
    const dead = results[1]!;
    expect(dead.status).toBe("error");
    expect(dead.findings[0]!.rule).toBe("internal");
    expect(dead.findings[0]!.message).toMatch(/worker exited with code 70/);
    expect(results.filter((r) => r.findings.some((f) => f.rule === "internal"))).toHaveLength(1);
    expect(notices.some((m) => m.includes(victim))).toBe(true);
  }, 120_000);

  it("merges shards into exactly the unsharded results", async () => {
    const full = await cli(["check", "boards", "--jobs", "1", "--json", "out/full.json"], repo.dir);
    const shardFiles: string[] = [];
    for (let k = 1; k <= 3; k++) {
      const r = await cli(["check", "boards", "--jobs", "1", "--shard", `${k}/3`, "--json", `out/results-${k}.json`], repo.dir);
      expect([0, 1, 2]).toContain(r.code);
      shardFiles.push(`out/results-${k}.json`);
    }
    const counts = shardFiles.map((f) => JSON.parse(read(f)).circuits.length);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(JSON.parse(read("out/full.json")).circuits.length);
    const merged = await cli(["merge", ...shardFiles, "--json", "out/merged.json", "--sarif", "out/merged.sarif"], repo.dir);
    expect(merged.code).toBe(full.code);
    expect(read("out/merged.json")).toBe(read("out/full.json"));
    const missing = await cli(["merge", shardFiles[0]!, shardFiles[2]!], repo.dir);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toContain("missing shard 2/3");
    const twice = await cli(["merge", shardFiles[0]!, shardFiles[0]!, shardFiles[1]!], repo.dir);
    expect(twice.code).toBe(2);
    const garbage = await cli(["merge", "boards/tide-gauge-preamp.yaml"], repo.dir);
    expect(garbage.code).toBe(2);
    expect(garbage.stderr).toMatch(/not JSON|not an opgate results document/);
  });

  it("annotates and writes the step summary only under GitHub Actions", async () => {
    const plain = await cli(["check", "boards", "--jobs", "1"], repo.dir, { CI: "true" });
    expect(plain.stdout).not.toMatch(/^::error /m);
    mkdirSync(join(repo.dir, "out"), { recursive: true });
    const summary = join(repo.dir, "out", "summary.md");
    writeFileSync(summary, "");
    const gh = await cli(["check", "boards", "--jobs", "1"], repo.dir, { CI: "true", GITHUB_ACTIONS: "true", GITHUB_STEP_SUMMARY: summary });
    expect(gh.stdout).toMatch(/^::error file=boards\/zz-unparseable\.yaml,line=\d+,col=\d+,title=opgate input%3A /m);
    expect(readFileSync(summary, "utf8")).toContain("**opgate: error**");
    // After earlier content that did not end its line, the summary still starts a new block.
    writeFileSync(summary, "Earlier step: done");
    await cli(["check", "boards", "--jobs", "1"], repo.dir, { CI: "true", GITHUB_ACTIONS: "true", GITHUB_STEP_SUMMARY: summary });
    const { fromMarkdown } = await import("mdast-util-from-markdown");
    const tree = fromMarkdown(readFileSync(summary, "utf8"));
    expect(tree.children[0]).toMatchObject({ type: "paragraph", children: [{ type: "text", value: "Earlier step: done" }] });
    // The verdict is its own paragraph with a real strong node, not literal asterisks.
    const second = tree.children[1] as { type: string; children: { type: string }[] };
    expect(second.type).toBe("paragraph");
    expect(second.children.some((n) => n.type === "strong")).toBe(true);
    // A shard job leaves annotations and the summary to the merge job.
    writeFileSync(summary, "");
    const shardJob = await cli(["check", "boards", "--jobs", "1", "--shard", "1/2", "--no-annotations"], repo.dir, { GITHUB_ACTIONS: "true", GITHUB_STEP_SUMMARY: summary });
    expect(shardJob.stdout).not.toMatch(/^::/m);
    expect(readFileSync(summary, "utf8")).toBe("");
  });

  it("shows baseline changes", async () => {
    await cli(["check", "boards", "--jobs", "1", "--json", "out/base.json"], repo.dir);
    const r = await cli(["check", "boards", "--jobs", "1", "--baseline", "out/base.json", "--markdown", "out/b.md"], repo.dir);
    expect(r.stdout).toContain("Against the baseline: no changes in");
    expect(read("out/b.md")).toContain("## Changes against the baseline");
    const bad = await cli(["check", "boards", "--baseline", "nope.json"], repo.dir);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain("--baseline nope.json: cannot read the file");
  });

  it("applies --rule and --fail-on, and reports config mistakes with exit 2", async () => {
    const base = JSON.parse((await cli(["check", "boards/tide-gauge-preamp-rev-b.yaml", "--json=-"], repo.dir)).stdout);
    const rules = new Set(base.circuits[0].findings.map((f: { rule: string }) => f.rule));
    expect(rules.has("headroom")).toBe(true);
    const off = await cli(["check", "boards/tide-gauge-preamp-rev-b.yaml", "--rule", "headroom=off", "--json=-"], repo.dir);
    expect(JSON.parse(off.stdout).circuits[0].findings.some((f: { rule: string }) => f.rule === "headroom")).toBe(false);
    // The console text moved to stderr so that stdout stays parseable JSON.
    expect(off.stderr).toContain("opgate: fail");
    const typo = await cli(["check", "boards", "--rule", "headrom=off"], repo.dir);
    expect(typo.code).toBe(2);
    expect(typo.stderr).toContain("did you mean `headroom`?");
    expect((await cli(["check", "boards", "--json"], repo.dir)).stderr).toContain("--json needs a path");
    const passing = await cli(["check", "boards/tide-gauge-preamp.yaml"], repo.dir);
    expect(passing.code).toBe(0);
  });

  it("draws a progress bar on a terminal only, never under CI", async () => {
    const preamp = read("boards/tide-gauge-preamp.yaml");
    for (let i = 0; i < 24; i++) writeFileSync(join(repo.dir, "boards", `many-${String(i).padStart(2, "0")}.yml`), preamp.replace("name: tide-gauge-preamp", `name: preamp-copy-${i}`));
    const many = ["check", "boards", "--jobs", "1", "--quiet"];
    const tty = await cli(many, repo.dir, {}, true);
    expect(tty.stderr).toContain("\r[");
    expect(tty.stderr).toMatch(/\] 32\/32 files\n$/);
    expect((await cli(many, repo.dir, { CI: "true" }, true)).stderr).not.toContain("\r[");
    expect((await cli(many, repo.dir, {}, false)).stderr).not.toContain("\r[");
    // Decided by the stream it is drawn on: stderr. `opgate check 2>log` on a terminal draws none;
    // `opgate check | tee out` (stdout piped, stderr on the terminal) draws it.
    expect((await cli(many, repo.dir, {}, true, false)).stderr).not.toContain("\r[");
    expect((await cli(many, repo.dir, {}, false, true)).stderr).toContain("\r[");
  });

  it("says which policy judged the run: the config file, or the built-in defaults", async () => {
    const none = await cli(["check", "boards/tide-gauge-preamp.yaml"], repo.dir);
    expect(none.stderr).toMatch(/^opgate: no config file: built-in defaults$/m);
    writeFileSync(join(repo.dir, "strict.yaml"), "failOn: warning\n");
    const withConfig = await cli(["check", "boards/tide-gauge-preamp.yaml", "--config", "strict.yaml"], repo.dir);
    expect(withConfig.stderr).toMatch(/^opgate: config strict\.yaml$/m);
    // On stderr only: stdout stays the report when one is written there.
    expect(withConfig.stdout).not.toContain("opgate: config");
  });

  it("prints only failures with --quiet, and rejects bad flags with exit 2", async () => {
    const q = await cli(["check", "boards", "--jobs", "1", "--quiet"], repo.dir);
    expect(q.stdout).not.toMatch(/^ok /m);
    expect(q.stdout).toMatch(/^error boards\/zz-unparseable\.yaml/m);
    expect((await cli(["check", "boards", "--shard", "5/4"], repo.dir)).code).toBe(2);
    expect((await cli(["check", "boards", "--jobs", "0"], repo.dir)).code).toBe(2);
    expect((await cli(["check", "nothing-here/*.yaml"], repo.dir)).code).toBe(2);
    const help = await cli(["check", "--help"], repo.dir);
    expect(help.code).toBe(0);
    expect(help.stdout).toContain("--shard 2/4 --json results-2.json");
    // A CI log shows which gate ran: the package's version, the one results documents record.
    const version = await cli(["--version"], repo.dir);
    expect(version.code).toBe(0);
    expect(version.stdout.trim()).toBe(JSON.parse(readFileSync(join(PACKAGE_ROOT, "package.json"), "utf8")).version);
  });
});
