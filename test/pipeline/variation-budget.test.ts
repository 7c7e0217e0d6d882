// The per-circuit variation budget (src/pipeline/variation.ts) and its policy key
// `variation.overBudget`: a circuit too large to be judged on every corner is judged at nominal,
// the `variation-budget` finding says so, and the repository decides whether that passes
// (warning, the default) or fails the gate (error). The circuit is a resistor string of 1,500
// parts at 1 %: its worst case would need 2 × 1,500 sensitivity analyses of 1,501 components,
// over the budget of 4,000,000 analyses × components, so only nominal runs.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import { run } from "../../src/cli/main.js";
import type { CliIo } from "../../src/cli/io.js";
import type { ResultsDocument } from "../../src/report/document.js";
import { documentProblems } from "../../src/report/validate.js";

const PARTS = 1500;
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "opgate-budget-"));
  const lines = [
    "format: opgate-circuit/1",
    "name: long-string",
    "components:",
    "  - { id: V1, kind: voltage-source, pins: { plus: n0, minus: gnd }, voltage: 15 V, tolerance: 1% }",
  ];
  for (let i = 1; i <= PARTS; i++) lines.push(`  - { id: R${i}, kind: resistor, pins: [n${i - 1}, ${i === PARTS ? "gnd" : `n${i}`}], value: 1k, tolerance: 1% }`);
  writeFileSync(join(dir, "long-string.yaml"), `${lines.join("\n")}\n`);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function fakeIo(cwd: string): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { cwd, env: {}, isTTY: false, out, err, stdout: (t) => out.push(t), stderr: (t) => err.push(t) };
}

async function check(overBudget?: "warning" | "error"): Promise<{ code: number; doc: ResultsDocument }> {
  const config = ["variation:", "  mode: corners", ...(overBudget ? [`  overBudget: ${overBudget}`] : [])].join("\n");
  writeFileSync(join(dir, "opgate.config.yaml"), `${config}\n`);
  const io = fakeIo(dir);
  const code = await run(["check", "long-string.yaml", "--json=-", "-q"], io);
  const doc = JSON.parse(io.out.join("")) as ResultsDocument;
  return { code, doc };
}

it("judges an over-budget circuit at nominal with a variation-budget warning, and passes it by default", async () => {
  const { code, doc } = await check();
  expect(documentProblems(doc)).toEqual([]);
  const findings = doc.circuits[0]!.findings;
  const budget = findings.filter((f) => f.rule === "variation-budget");
  expect(budget).toHaveLength(1);
  expect(budget[0]).toMatchObject({ severity: "warning", subject: "long-string" });
  expect(budget[0]!.message).toMatch(/worst-case analysis did not run: its 1501 varied parameters need 3002 sensitivity analyses of 1501 components/);
  expect(code).toBe(0);
}, 60_000);

it("fails the same circuit when the repository sets variation.overBudget: error", async () => {
  const { code, doc } = await check("error");
  expect(documentProblems(doc)).toEqual([]);
  const budget = doc.circuits[0]!.findings.filter((f) => f.rule === "variation-budget");
  expect(budget.map((f) => f.severity)).toEqual(["error"]);
  expect(doc.circuits[0]!.status).toBe("fail");
  expect(code).toBe(1);
}, 60_000);

it("refuses an unknown overBudget value with the config's line and column", async () => {
  writeFileSync(join(dir, "opgate.config.yaml"), "variation:\n  mode: corners\n  overBudget: fail\n");
  const io = fakeIo(dir);
  expect(await run(["check", "long-string.yaml", "-q"], io)).toBe(2);
  expect(io.err.join("")).toMatch(/opgate\.config\.yaml:3:\d+/);
});
