// Ways a failing design could slip through the gate with exit 0 (issue 12, items 1–3): a named
// file that does not exist, reports written over inputs or over each other, shards of different
// runs merged. Each case checks that the failing circuit still fails (exit 1) or the run is
// refused (exit 2) — never a pass.
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cli, makeRepo } from "./repo.js";

/** The example circuit whose findings fail the run (exit 1) under the default config. */
const FAILING = "boards/tide-gauge-preamp-rev-b.yaml";
const PASSING = "boards/tide-gauge-preamp.yaml";

let repo: { dir: string; cleanup(): void };
beforeAll(() => {
  repo = makeRepo({ "notes/readme.yaml": "title: not a circuit\n" });
});
afterAll(() => repo.cleanup());

describe("paths on the command line", () => {
  it("a failing circuit fails on its own (the control for every case below)", async () => {
    expect((await cli(["check", FAILING, "-q"], repo.dir)).code).toBe(1);
  });

  it("refuses a named file that does not exist, naming it, instead of skipping it", async () => {
    const r = await cli(["check", PASSING, "boards/missing.yaml", "-q"], repo.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('"boards/missing.yaml"');
    // …and with the failing circuit among the named files it is still not a pass.
    expect((await cli(["check", FAILING, "nope.yaml", "-q"], repo.dir)).code).toBe(2);
  });

  it("refuses a glob that matches nothing and an empty path", async () => {
    const glob = await cli(["check", PASSING, "boards/*.jsno", "-q"], repo.dir);
    expect(glob.code).toBe(2);
    expect(glob.stderr).toContain('"boards/*.jsno"');
    const empty = await cli(["check", "", "-q"], repo.dir);
    expect(empty.code).toBe(2);
    expect(empty.stderr).toMatch(/empty path/);
  });
});

describe("report paths", () => {
  it("refuses a report written over the circuit it checks, and leaves the circuit alone", async () => {
    const before = readFileSync(join(repo.dir, FAILING), "utf8");
    const r = await cli(["check", FAILING, "--json", FAILING], repo.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--json .* is the circuit file boards\/tide-gauge-preamp-rev-b\.yaml/);
    expect(readFileSync(join(repo.dir, FAILING), "utf8")).toBe(before);
    expect((await cli(["check", FAILING, "-q"], repo.dir)).code).toBe(1);
  });

  it("refuses two reports to one path and two reports to standard output", async () => {
    const same = await cli(["check", FAILING, "--json", "out/x", "--sarif", "out/x", "--markdown", "out/./x"], repo.dir);
    expect(same.code).toBe(2);
    expect(same.stderr).toMatch(/both write/);
    expect(existsSync(join(repo.dir, "out/x"))).toBe(false);
    const stdout = await cli(["check", FAILING, "--json=-", "--sarif=-"], repo.dir);
    expect(stdout.code).toBe(2);
    expect(stdout.stderr).toMatch(/standard output/);
    expect(stdout.stdout).toBe("");
  });

  it("refuses config outputs that share a path, and a config output over a flag's", async () => {
    const { dir, cleanup } = makeRepo({ "opgate.config.yaml": "outputs:\n  json: reports/r.out\n  sarif: reports/r.out\n" });
    try {
      const r = await cli(["check", FAILING], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/both write/);
      const flag = await cli(["check", FAILING, "--sarif", "reports/r.out", "--json", "reports/j.json"], dir);
      // --json from the flag, sarif from the flag: distinct, the run goes through and fails.
      expect(flag.code).toBe(1);
      const overConfig = await cli(["check", FAILING, "--junit", "opgate.config.yaml"], dir);
      expect(overConfig.code).toBe(2);
      expect(overConfig.stderr).toMatch(/the config file/);
    } finally {
      cleanup();
    }
  });

  it("writes a report through a temporary file: no temporary file is left, an old report is replaced whole", async () => {
    writeFileSync(join(repo.dir, "old.json"), "x".repeat(100_000));
    const r = await cli(["check", FAILING, "--json", "old.json"], repo.dir);
    expect(r.code).toBe(1);
    expect(JSON.parse(readFileSync(join(repo.dir, "old.json"), "utf8")).summary.verdict).toBe("fail");
    expect(readdirSync(repo.dir).filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });
});

/** The examples without the one that cannot be checked (exit 2), so exit 1 means "the failing circuit". */
function checkableRepo(): { dir: string; cleanup(): void } {
  const r = makeRepo();
  rmSync(join(r.dir, "boards/wind-vane-heater-broken.yaml"));
  return r;
}

describe("merge provenance", () => {
  it("refuses shards of two runs whose file lists differ (a failing file added between the shard jobs)", async () => {
    const { dir, cleanup } = checkableRepo();
    try {
      const failing = readFileSync(join(dir, FAILING), "utf8");
      rmSync(join(dir, FAILING));
      expect((await cli(["check", "boards", "--shard", "1/2", "--json", "r1.json", "-q"], dir)).code).toBe(0);
      writeFileSync(join(dir, FAILING), failing);
      await cli(["check", "boards", "--shard", "2/2", "--json", "r2.json", "-q"], dir);
      const merged = await cli(["merge", "r1.json", "r2.json", "-q"], dir);
      expect(merged.code).toBe(2);
      expect(merged.stderr).toMatch(/different runs/);
    } finally {
      cleanup();
    }
  });

  it("refuses a shard document whose failing circuit's results were removed", async () => {
    const { dir, cleanup } = checkableRepo();
    try {
      for (const k of [1, 2]) await cli(["check", "boards", "--shard", `${k}/2`, "--json", `r${k}.json`, "-q"], dir);
      const all = await cli(["merge", "r1.json", "r2.json", "-q"], dir);
      expect(all.code).toBe(1);
      for (const k of [1, 2]) {
        const doc = JSON.parse(readFileSync(join(dir, `r${k}.json`), "utf8"));
        const kept = doc.circuits.filter((c: { file: string }) => c.file !== FAILING);
        if (kept.length === doc.circuits.length) continue;
        doc.circuits = kept;
        doc.summary = { ...doc.summary, circuits: kept.length, failed: 0, verdict: "pass", findings: { error: 0, warning: 0, note: 0 } };
        writeFileSync(join(dir, `r${k}.json`), JSON.stringify(doc));
      }
      const merged = await cli(["merge", "r1.json", "r2.json", "-q"], dir);
      expect(merged.code).toBe(2);
      expect(merged.stderr).toMatch(/altered/);
    } finally {
      cleanup();
    }
  });
});
