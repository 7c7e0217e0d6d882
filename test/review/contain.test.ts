// Team rules that misbehave (issue 12, items 4 and 6–8): each plugin here is a fixture of a way a
// rule or plugin once ended, stalled or misled the gate. Every case runs the real `check` on the
// failing example circuit and expects the verdict still to fail (exit 1) with an `error` finding
// for the misbehaving rule, or the run refused (exit 2) with a message: never a pass, never a hang.
import { spawnSync } from "node:child_process";
import { createRequire } from "node:module";
import { pathToFileURL } from "node:url";
import { readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { setContainmentBudgets } from "../../src/review/contain.js";
import { documentProblems } from "../../src/report/validate.js";
import { PACKAGE_ROOT } from "../../src/paths.js";
import { cli, makeRepo } from "../run/repo.js";

const FAILING = "boards/tide-gauge-preamp-rev-b.yaml";

function rule(id: string, body: string, top = ""): string {
  return `${top}
export default {
  id: "team/${id}",
  description: "Checks something for the containment tests",
  severity: "warning",
  docs: "A fixture.",
  async check(view, report) {
${body}
  },
};
`;
}

const PLUGINS: Record<string, string> = {
  "exit.mjs": rule("exit", "    process.exit(0);"),
  "sync-loop.mjs": rule("sync-loop", "    for (;;) {}"),
  "async-loop.mjs": rule("async-loop", "    await null;\n    for (;;) {}"),
  "never.mjs": rule("never", "    await new Promise(() => {});"),
  "bad-hint.mjs": rule("bad-hint", '    report.fail({ subject: view.circuit.name, message: "hint is a number", hint: 42 });'),
  "bad-fields.mjs": rule(
    "bad-fields",
    '    report.fail({ subject: view.circuit.name, message: "measured is text", measured: "5", unit: 7 });',
  ),
  "bad-pos.mjs": rule("bad-pos", '    report.fail({ subject: "x", message: "bad position", pos: { file: "a.yaml", line: -5, column: 1 } });'),
  "writes-op.mjs": rule("writes-op", "    for (const n of Object.keys(view.op.nodes)) view.op.nodes[n] = 42;"),
  "writes-ss.mjs": rule("writes-ss", "    if (view.smallSignal) view.smallSignal.gains.length = 0;\n    view.circuit.components.pop();"),
  "writes-map.mjs": rule("writes-map", "    view.circuit.models.clear();"),
  "keeps-alive.mjs": rule("keeps-alive", "    report.pass(view.circuit.name);", "setInterval(() => {}, 1000);"),
  "import-hangs.mjs": rule("import-hangs", "", "await new Promise(() => {});"),
  "import-exits.mjs": rule("import-exits", "", "process.exit(0);"),
  "fine.mjs": rule("fine", '    report.fail({ subject: view.circuit.name, message: "a real finding from a well-behaved rule" });'),
};

function withPlugins(names: string[]): { dir: string; cleanup(): void } {
  const files: Record<string, string> = names.length ? { "opgate.config.yaml": `plugins:\n${names.map((n) => `  - team/${n}`).join("\n")}\n` } : {};
  for (const n of names) files[`team/${n}`] = PLUGINS[n]!;
  const repo = makeRepo(files);
  rmSync(join(repo.dir, "boards/wind-vane-heater-broken.yaml"));
  return repo;
}

interface Doc {
  circuits: { file: string; findings: { rule: string; severity: string; message: string; line: number }[]; operatingPoint: { nodes: Record<string, number> } | null; gains: unknown[] }[];
}

async function check(names: string[], extra: string[] = []): Promise<{ code: number; stderr: string; doc?: Doc; ms: number }> {
  const { dir, cleanup } = withPlugins(names);
  try {
    const t0 = Date.now();
    const r = await cli(["check", FAILING, "--json", "out.json", "-q", ...extra], dir);
    const ms = Date.now() - t0;
    let doc: Doc | undefined;
    try {
      doc = JSON.parse(readFileSync(join(dir, "out.json"), "utf8")) as Doc;
      expect(documentProblems(doc)).toEqual([]);
    } catch (err) {
      if ((err as { code?: string }).code !== "ENOENT") throw err;
    }
    return { code: r.code, stderr: r.stderr, ms, ...(doc ? { doc } : {}) };
  } finally {
    cleanup();
  }
}

function ruleErrors(doc: Doc | undefined, id: string): string[] {
  return (doc?.circuits[0]?.findings ?? []).filter((f) => f.rule === `team/${id}` && f.severity === "error").map((f) => f.message);
}

beforeAll(() => setContainmentBudgets({ loadMs: 4000, ruleMs: 1500 }));
afterAll(() => setContainmentBudgets({}));

describe("team rules that would end, stall or mislead the gate", () => {
  it("process.exit in a rule is an error finding for that rule; the failing circuit still fails", async () => {
    const r = await check(["exit.mjs", "fine.mjs"]);
    expect(r.code).toBe(1);
    expect(ruleErrors(r.doc, "exit")[0]).toMatch(/process\.exit/);
    expect(r.doc!.circuits[0]!.findings.some((f) => f.rule === "team/fine")).toBe(true);
  }, 30_000);

  it("a synchronous loop, a loop after an await and a promise that never settles each cost one budget, then an error finding", async () => {
    const r = await check(["sync-loop.mjs", "async-loop.mjs", "never.mjs", "fine.mjs"]);
    expect(r.code).toBe(1);
    for (const id of ["sync-loop", "async-loop", "never"]) expect(ruleErrors(r.doc, id)[0]).toMatch(/checking the circuit's \d+ scenarios? took longer than 1\.5 s/);
    expect(r.doc!.circuits[0]!.findings.some((f) => f.rule === "team/fine")).toBe(true);
    // One budget per rule and circuit, not one per scenario: three stalled rules, well under
    // a per-scenario cost (3 rules × the scenarios × 1.5 s) — plus three plugin reloads.
    expect(r.ms).toBeLessThan(3 * 1500 + 15_000);
  }, 60_000);

  it("reports whose fields the results cannot hold are error findings naming the field, and the documents stay valid", async () => {
    const r = await check(["bad-hint.mjs", "bad-fields.mjs", "bad-pos.mjs"], ["--sarif", "out.sarif"]);
    expect(r.code).toBe(1);
    expect(ruleErrors(r.doc, "bad-hint")[0]).toMatch(/`hint` must be text, got 42/);
    const fields = ruleErrors(r.doc, "bad-fields");
    expect(fields.join("\n")).toMatch(/`measured` must be a number, got "5"/);
    expect(fields.join("\n")).toMatch(/`unit` must be text, got 7/);
    expect(ruleErrors(r.doc, "bad-pos").join("\n")).toMatch(/`pos` must have a file name and a line and column from 1/);
    expect(r.doc!.circuits[0]!.findings.every((f) => f.line >= 1)).toBe(true);
  }, 30_000);

  it("gives rules a read-only view: writes fail the rule and never reach the published results", async () => {
    const plain = await check([]);
    const r = await check(["writes-op.mjs", "writes-ss.mjs", "writes-map.mjs"]);
    expect(r.code).toBe(1);
    expect(ruleErrors(r.doc, "writes-op")[0]).toMatch(/read.only|Cannot assign/);
    expect(ruleErrors(r.doc, "writes-ss")[0]).toMatch(/read.only|Cannot (assign|delete)|not extensible|Cannot add/);
    expect(ruleErrors(r.doc, "writes-map")[0]).toMatch(/read-only for rules/);
    expect(r.doc!.circuits[0]!.operatingPoint).toEqual(plain.doc!.circuits[0]!.operatingPoint);
    expect(r.doc!.circuits[0]!.gains).toEqual(plain.doc!.circuits[0]!.gains);
    expect(r.doc!.circuits[0]!.findings.some((f) => f.rule === "internal")).toBe(false);
  }, 30_000);

  it("a plugin whose import never finishes, or that exits while loading, is refused with exit 2 and a message", async () => {
    const hangs = await check(["import-hangs.mjs"]);
    expect(hangs.code).toBe(2);
    expect(hangs.stderr).toMatch(/import-hangs\.mjs did not load: importing the plugins took longer than 4 s/);
    const exits = await check(["import-exits.mjs"]);
    expect(exits.code).toBe(2);
    expect(exits.stderr).toMatch(/import-exits\.mjs did not load: .*process\.exit/);
  }, 30_000);

  it("a plugin that keeps its event loop busy does not keep the gate from exiting (real process)", () => {
    const { dir, cleanup } = withPlugins(["keeps-alive.mjs", "fine.mjs"]);
    try {
      const bin = join(PACKAGE_ROOT, "src/cli/bin.ts");
      const r = spawnSync(process.execPath, ["--import", pathToFileURL(createRequire(import.meta.url).resolve("tsx")).href, bin, "check", FAILING, "-q"], { cwd: dir, encoding: "utf8", timeout: 60_000, env: { ...process.env, NO_COLOR: "1" } });
      expect(r.error).toBeUndefined();
      expect(r.stderr).not.toMatch(/Error|ERR_/);
      expect(r.status).toBe(1);
      expect(r.stdout).toMatch(/opgate: fail/);
    } finally {
      cleanup();
    }
  }, 70_000);
});
