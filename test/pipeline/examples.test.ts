// The whole pipeline on the bundled examples, as an analog reviewer would judge them by hand
// (the hand estimates are in each example's header comment), and on the README's format example.
import { readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { loadCircuitText } from "../../src/circuit/index.js";
import { checkCircuit, checkFile } from "../../src/pipeline/check-file.js";
import { createCheckContext } from "../../src/pipeline/context.js";

const ROOT = resolve(import.meta.dirname, "..", "..");
const EXAMPLES = join(ROOT, "examples");
const ctx = await createCheckContext({ cwd: ROOT, configPath: "examples/opgate.config.yaml" });
const plain = await createCheckContext({ cwd: ROOT, configPath: join(ROOT, "test/pipeline/nominal.config.yaml") });

async function check(name: string) {
  return checkFile(join(EXAMPLES, name), ctx, `examples/${name}`);
}

describe("the example boards under the Tidewater policy (corners, −20…60 °C)", () => {
  it.each(["tide-gauge-preamp.yaml", "tide-gauge-line-buffer.yaml", "wind-vane-bridge-amp.yaml", "tide-gauge-reference.yaml"])("%s passes with no findings", async (name) => {
    const r = await check(name);
    expect(r.status).toBe("pass");
    expect(r.findings).toEqual([]);
    expect(r.scenarios.length).toBeGreaterThan(10);
    expect(r.scenarios.every((s) => s.converged)).toBe(true);
  });

  it("the PNP excitation source passes, with the house divider rule's warning at its worst corner", async () => {
    const r = await check("soil-probe-excitation.yaml");
    expect(r.status).toBe("pass");
    expect(r.findings.map((f) => `${f.severity} ${f.rule} ${f.subject}`)).toEqual(["warning tidewater/divider-current Q1"]);
    expect(r.findings[0]!.scenario).not.toBe("nominal");
  });

  it("rev B fails for the reasons a reviewer gives: saturated, starved, gain lost, resistor hot", async () => {
    const r = await check("tide-gauge-preamp-rev-b.yaml");
    expect(r.status).toBe("fail");
    const rules = new Set(r.findings.map((f) => f.rule));
    for (const rule of ["region", "headroom", "device-current", "gain-window", "resistor-power"]) expect(rules).toContain(rule);
    // Rev B has rev A's capacitors (only RC changed), and rev A's band passes: the band of a
    // saturated stage is not judged, so no capacitor is blamed for what the bias did.
    expect(rules).not.toContain("band-edges");
    expect(rules).not.toContain("band-flatness");
    const headroom = r.findings.find((f) => f.rule === "headroom")!;
    expect(headroom.measured).toBeLessThan(0);
    expect(headroom.margin).toBeLessThan(0);
    expect(headroom.line).toBeGreaterThan(1);
  });

  it("the broken file is an input error at its line and column, and does not stop the others", async () => {
    const r = await check("wind-vane-heater-broken.yaml");
    expect(r.status).toBe("error");
    expect(r.findings[0]).toMatchObject({ rule: "input", subject: "RB", line: 19, column: 51 });
    expect(r.findings[0]!.message).toContain("vaule");
  });
});

describe("the README's format example", () => {
  const readme = readFileSync(join(ROOT, "README.md"), "utf8");
  const yaml = /## Circuit format \(v1\)[\s\S]*?```yaml\n([\s\S]*?)```/.exec(readme)![1]!;

  it("loads and passes the built-in rules at nominal", async () => {
    const loaded = loadCircuitText(yaml, "README.md");
    expect(loaded.ok).toBe(true);
    if (!loaded.ok) return;
    const r = await checkCircuit(loaded.circuit, plain, "README.md");
    expect(r.findings).toEqual([]);
    expect(r.status).toBe("pass");
    // Hand estimate, common practice for a stiff divider: VB ≈ 12·12k/68k = 2.1 V, IE ≈ (2.1 − 0.65)/1k ≈ 1.4 mA,
    // gain ≈ −RC/(re + RE) = −5k/(19 Ω + 1k) ≈ −4.9 (midband: the coupling capacitor is a short, RE is not bypassed).
    expect(r.gains[0]!.midband).toBeGreaterThan(-5.3);
    expect(r.gains[0]!.midband).toBeLessThan(-4.2);
  });
});

describe("loader warnings", () => {
  it("become file-warning findings that do not fail the gate", async () => {
    const text = pmosWithPositiveThreshold();
    const loaded = loadCircuitText(text, "warm.yaml");
    expect(loaded.ok).toBe(true);
    if (!loaded.ok) return;
    expect(loaded.circuit.warnings.length).toBeGreaterThan(0);
    const r = await checkCircuit(loaded.circuit, plain, "warm.yaml");
    expect(r.findings.some((f) => f.rule === "file-warning" && f.severity === "warning")).toBe(true);
  });
});

/** DESIGN.md: a PMOS with a positive threshold is a warning naming both readings, never a silent guess. */
function pmosWithPositiveThreshold(): string {
  return [
    "format: opgate-circuit/1",
    "name: warm",
    "models:",
    "  m: { kind: pmos, threshold: 0.7 V, kPrime: 100u, width: 10u, length: 1u }",
    "components:",
    "  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 5 V }",
    "  - { id: RD, kind: resistor, pins: [d, gnd], value: 10k }",
    "  - { id: M1, kind: pmos, model: m, pins: { drain: d, gate: gnd, source: vdd } }",
  ].join("\n");
}
