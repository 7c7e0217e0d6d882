// A Monte Carlo finding's worst sample as a parameter set: the few parameters that moved its
// quantity most in that sample, checked against Ohm's law, and shown by every report.
import { describe, expect, it } from "vitest";
import { checkCircuit } from "../../src/pipeline/check-file.js";
import { buildDocument } from "../../src/report/build.js";
import { renderConsole } from "../../src/report/console.js";
import { renderJunit } from "../../src/report/junit.js";
import { renderMarkdown } from "../../src/report/markdown.js";
import { renderSarif } from "../../src/report/sarif.js";
import { defineRule } from "../../src/review/rule.js";
import { sampleCorners } from "../../src/variation/sample-corners.js";
import { variationParameters } from "../../src/variation/parameters.js";
import { builtin, CELSIUS, checkContext, load } from "./helpers.js";

// Bounds V(out) above: fails in the samples where the divider's ratio runs high.
const outAtMost = (limit: number) =>
  defineRule({
    id: "out-level",
    description: "Reads the divider's output",
    severity: "error",
    docs: "test rule",
    check({ op }, report) {
      const v = op.nodes.out!;
      const check = { measured: v, limit, unit: "V", bound: "max" as const };
      if (v <= limit) report.pass("out", check);
      else report.fail({ subject: "out", message: `out is ${v} V`, ...check });
    },
  });

// V(out) = VIN·R2/(R1 + R2) (Ohm's law): it rises with R2 and falls with R1; R3 and R4 load VIN
// only (an ideal source), so they never move it, however far they sit in their wide bands.
const circuitText = `components:
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 10 V }
  - { id: R1, kind: resistor, pins: [in, out], value: 10k, tolerance: 5% }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 10k, tolerance: 5% }
  - { id: R3, kind: resistor, pins: [in, x], value: 1k, tolerance: 20% }
  - { id: R4, kind: resistor, pins: [x, gnd], value: 1k, tolerance: 20% }
`;

describe("a Monte Carlo finding's worst sample as its parameter set", () => {
  it("names the parts that move the quantity, with the signs Ohm's law gives, and says it is a sample", async () => {
    const circuit = load(circuitText);
    const result = await checkCircuit(circuit, checkContext([builtin(outAtMost(5.05))], { mode: "monte-carlo", samples: 400, seed: 11, temperature: { min: CELSIUS - 20, max: CELSIUS + 60 } }), "divider.yaml");
    const f = result.findings.find((x) => x.rule === "out-level")!;
    expect(f).toBeDefined();
    expect(f.scenario).toMatch(/^mc-\d+$/);
    const corner = f.corner!;
    expect(corner.label).toContain("Monte Carlo sample");
    const named = corner.parameters.map((p) => p.name);
    // R2 high and R1 low push V(out) up: the worst sample has them that way, and they are named.
    expect(named).toContain("R1");
    expect(named).toContain("R2");
    expect(named).not.toContain("R3");
    expect(named).not.toContain("R4");
    const pct = (name: string) => corner.parameters.find((p) => p.name === name)!.percent!;
    expect(pct("R1")).toBeLessThan(0);
    expect(pct("R2")).toBeGreaterThan(0);
    // Temperature is part of every scenario's set, as in a corner.
    expect(corner.parameters.at(-1)!.parameter).toBe("temperature");
    // The sample's values are the run's own: V(out) from them is the finding's measured value.
    const r1 = 10e3 * (1 + pct("R1") / 100);
    const r2 = 10e3 * (1 + pct("R2") / 100);
    expect(Math.abs((10 * r2) / (r1 + r2) - f.measured!)).toBeLessThan(1e-9);

    const doc = buildDocument([result], { rules: [], failOn: "error", variation: { mode: "monte-carlo", samples: 400, seed: 11 }, version: "0.1.0" });
    expect(renderMarkdown(doc)).toContain(corner.label);
    expect(renderConsole(doc, { color: false })).toContain(corner.label);
    expect(renderJunit(doc)).toContain(corner.label);
    expect(renderSarif(doc)).toContain(corner.label);
  });

  it("is the same for the same seed, and draws the samples the run drew", () => {
    const circuit = load(circuitText);
    const params = variationParameters(circuit, {});
    const q = Float64Array.from({ length: 50 }, (_, k) => Math.sin(k));
    const a = sampleCorners(params, 3, 50, [{ sample: 7, quantity: q }]);
    const b = sampleCorners(params, 3, 50, [{ sample: 7, quantity: q }]);
    expect(a).toEqual(b);
    // A quantity that no parameter explains: nothing stands out, and the label says so.
    expect(a[0]!.label).toContain("none of its 4 varied parameters stands out");
  });
});
