// Every example circuit loads and resolves, except the one that is broken on purpose.
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { loadCircuitFile, loadCircuitText } from "../../src/circuit/index.js";
import { readFileSync } from "node:fs";

const EXAMPLES = fileURLToPath(new URL("../../examples/", import.meta.url));
// opgate.config.yaml beside them is the demo policy, not a circuit.
const files = readdirSync(EXAMPLES).filter((f) => /\.(ya?ml|json)$/.test(f) && !f.startsWith("opgate.config."));
const BROKEN = "wind-vane-heater-broken.yaml";

describe("examples", () => {
  it("there are four to seven of them, one broken on purpose", () => {
    expect(files.length).toBeGreaterThanOrEqual(4);
    expect(files.length).toBeLessThanOrEqual(7);
    expect(files).toContain(BROKEN);
  });

  it.each(files.filter((f) => f !== BROKEN))("%s loads with specs, models and no warnings", async (f) => {
    const r = await loadCircuitFile(join(EXAMPLES, f), { displayPath: `examples/${f}` });
    if (!r.ok) throw new Error(r.errors.map((e) => `${e.file}:${e.line}:${e.column} ${e.message}`).join("\n"));
    const c = r.circuit;
    expect(c.file).toBe(`examples/${f}`);
    expect(c.specs.gains.length + c.specs.devices.length).toBeGreaterThan(0);
    expect(c.models.size).toBeGreaterThan(0);
    expect(c.warnings).toEqual([]);
  });

  it("the broken example fails with file:line and the typo; fixed, it shows the floating gate", async () => {
    const r = await loadCircuitFile(join(EXAMPLES, BROKEN), { displayPath: `examples/${BROKEN}` });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ file: `examples/${BROKEN}`, line: 19, message: "unknown key `vaule` in component RB", hint: "did you mean `value`?" });
    const fixed = loadCircuitText(readFileSync(join(EXAMPLES, BROKEN), "utf8").replace("vaule: 1k", "value: 1k"), BROKEN);
    expect(!fixed.ok && fixed.errors[0]!.message).toMatch(/node `gate` has no DC path to ground `gnd` \(isolated by capacitor C1, the gate of M1\)/);
  });

  it("the preamp resolves to the values written (hand-checked design)", async () => {
    const r = await loadCircuitFile(join(EXAMPLES, "tide-gauge-preamp.yaml"));
    if (!r.ok) throw new Error("preamp did not load");
    const rc = r.circuit.components.find((c) => c.id === "RC");
    expect(rc?.kind === "resistor" && rc.value).toEqual({ nominal: 4700, min: 4653, max: 4747 });
    const g = r.circuit.specs.gains[0]!;
    expect(g.window.min).toBeCloseTo(-14.605, 9);
    expect(g.window.max).toBeCloseTo(-10.795, 9);
    expect(r.circuit.parameters.get("rLoad")).toBe(10_000);
  });
});
