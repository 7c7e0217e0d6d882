// What discovery may take (issue 12 item 9, issue 11 item 4): only circuit files, inside the
// repository, each real file once, never node_modules or the run's own reports; unreadable or
// empty paths are errors naming them; --jobs never starts more lanes than there are cores.
import { chmodSync, mkdirSync, readFileSync, symlinkSync, writeFileSync } from "node:fs";
import { availableParallelism } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { discover } from "../../src/run/discover.js";
import { cli, makeRepo } from "./repo.js";

const FAILING = "boards/tide-gauge-preamp-rev-b.yaml";

let repo: { dir: string; cleanup(): void };
beforeAll(() => {
  repo = makeRepo({
    "reports/results.json": '{ "format": "opgate-results/1", "circuits": [] }\n',
    "schemas/thing.schema.json": '{ "type": "object" }\n',
    "docker-compose.yml": "services:\n  db:\n    image: x\n",
    "node_modules/pkg/circuit.yaml": readFileSync(join(__dirname, "../../examples/tide-gauge-preamp-rev-b.yaml"), "utf8"),
  });
  // A folder that links back to its parent: a loop a naive crawl follows many times.
  symlinkSync("..", join(repo.dir, "boards", "loop"));
  // A second name for one circuit file: checked once.
  symlinkSync("tide-gauge-preamp-rev-b.yaml", join(repo.dir, "boards", "zz-alias.yaml"));
});
afterAll(() => repo.cleanup());

const opts = (dir: string) => ({ cwd: dir, root: dir, include: ["**/*.{json,yaml,yml}"], exclude: [], circuitsOnly: true });

describe("discovery", () => {
  it("takes circuit files only, and says in one line how many others it skipped", async () => {
    const r = await cli(["check", "-q"], repo.dir);
    // The failing example is still found and still fails the run; the broken example makes it 2.
    expect(r.code).toBe(2);
    const skipped = r.stderr.split("\n").filter((l) => l.includes("skipped"));
    expect(skipped).toHaveLength(1);
    expect(skipped[0]).toMatch(/skipped 3 files that are not circuit files/);
    expect(r.stdout).not.toMatch(/results\.json|thing\.schema|docker-compose|node_modules/);
  });

  it("makes skipped files an error with --strict or the config's nonCircuitFiles: error", async () => {
    const strict = await cli(["check", "boards", "reports", "--strict", "-q"], repo.dir);
    expect(strict.code).toBe(2);
    expect(strict.stderr).toMatch(/reports\/results\.json.*--strict/);
    const { dir, cleanup } = makeRepo({ "opgate.config.yaml": "nonCircuitFiles: error\n", "notes.yaml": "a: 1\n" });
    try {
      const r = await cli(["check", "-q"], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/notes\.yaml.*nonCircuitFiles/);
    } finally {
      cleanup();
    }
  });

  it("never takes the run's own report as a circuit, even one that a later run finds", async () => {
    const first = await cli(["check", "boards", "--json", "boards/out.json", "-q"], repo.dir);
    const second = await cli(["check", "boards", "--json", "boards/out.json", "-q"], repo.dir);
    expect(second.code).toBe(first.code);
    expect(JSON.parse(readFileSync(join(repo.dir, "boards/out.json"), "utf8")).circuits.map((c: { file: string }) => c.file)).not.toContain("boards/out.json");
  });

  it("checks each real file once through a symbolic-link loop", async () => {
    const found = await discover(["boards"], opts(repo.dir));
    const displays = found.files.map((f) => f.display);
    expect(displays.filter((d) => d.endsWith("tide-gauge-preamp-rev-b.yaml") || d.endsWith("zz-alias.yaml"))).toHaveLength(1);
    expect(displays.some((d) => d.includes("loop/"))).toBe(false);
    expect(new Set(displays).size).toBe(displays.length);
  });

  it("keeps the config's include globs inside the repository root", async () => {
    const { dir, cleanup } = makeRepo({ "opgate.config.yaml": "include:\n  - ../**/*.yaml\n" });
    try {
      const r = await cli(["check", "-q"], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/`\.\.\/\*\*\/\*\.yaml` leaves the repository root/);
    } finally {
      cleanup();
    }
  });

  it.skipIf(process.getuid?.() === 0)("names an unreadable folder (not as root: root reads everything)", async () => {
    const { dir, cleanup } = makeRepo({ "locked/x.yaml": "format: opgate-circuit/1\n" });
    chmodSync(join(dir, "locked"), 0o000);
    try {
      const r = await cli(["check", "-q"], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/cannot read locked.*permission denied/);
      expect(r.stderr).not.toMatch(/internal error/);
    } finally {
      chmodSync(join(dir, "locked"), 0o755);
      cleanup();
    }
  });

  it("caps --jobs at the number of cores and says so", async () => {
    const r = await cli(["check", FAILING, "--jobs", "1000", "-q"], repo.dir);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`--jobs 1000 capped at ${availableParallelism()}`);
  });

  it("refuses an empty path instead of checking the working directory", async () => {
    mkdirSync(join(repo.dir, "empty"), { recursive: true });
    writeFileSync(join(repo.dir, "empty", "readme.txt"), "no circuits here");
    expect((await cli(["check", ""], repo.dir)).code).toBe(2);
    const folder = await cli(["check", "empty"], repo.dir);
    expect(folder.code).toBe(2);
    expect(folder.stderr).toContain('"empty"');
  });
});
