// Scenario generation: corners cover each extreme, Monte Carlo is seeded and stays in band.
import { describe, expect, it } from "vitest";
import type { Circuit, Component } from "../../src/circuit/types.js";
import { buildScenarios, variedQuantities, withPicks } from "../../src/variation/index.js";
import { circuitMaker, variationParameters } from "../../src/variation/parameters.js";
import { seededRandom, triangular } from "../../src/variation/random.js";

const pos = { file: "t.yaml", line: 1, column: 1 };

function circuit(): Circuit {
  const components: Component[] = [
    { id: "VCC", kind: "voltage-source", pins: { plus: "vcc", minus: "gnd" }, voltage: { nominal: 12, min: 11.4, max: 12.6 }, pos },
    { id: "R1", kind: "resistor", pins: { a: "vcc", b: "out" }, value: { nominal: 1000, min: 990, max: 1010 }, pos },
    { id: "R2", kind: "resistor", pins: { a: "out", b: "gnd" }, value: { nominal: 1000, min: 1000, max: 1000 }, pos },
  ];
  return {
    file: "t.yaml",
    name: "t",
    temperature: 298.15,
    ground: "gnd",
    parameters: new Map(),
    models: new Map([
      [
        "q",
        {
          id: "q",
          kind: "npn",
          pos,
          beta: { min: 100, typ: 200, max: 300 },
          reverseBeta: { min: 1, typ: 1, max: 1 },
          saturationCurrent: { min: 1e-14, typ: 1e-14, max: 1e-14 },
          earlyVoltage: { min: Infinity, typ: Infinity, max: Infinity },
          saturationEdge: 0.3,
          drift: { voltage: -0.002, current: 1e-3 },
          betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 },
        },
      ],
    ]),
    components,
    nodes: ["out", "vcc"],
    specs: { gains: [], supplies: [], devices: [] },
    overrides: [],
    warnings: [],
    pos,
  };
}

describe("variation", () => {
  it("lists only quantities with a band", () => {
    expect(variedQuantities(circuit()).map((q) => q.key)).toEqual(["VCC.voltage", "R1.value", "q.beta"]);
  });

  it("nominal mode is the circuit itself", () => {
    const c = circuit();
    const s = buildScenarios(c, { mode: "nominal", samples: 0, seed: 1 });
    expect(s).toHaveLength(1);
    expect(s[0]!.circuit).toBe(c);
  });

  it("corners are not a fixed list: they come from the worst-case analysis", () => {
    expect(() => buildScenarios(circuit(), { mode: "corners", samples: 0, seed: 1 })).toThrow(/runVariation/);
  });

  it("Monte Carlo repeats for a seed, differs for another, and stays inside the band", () => {
    const settings = { mode: "monte-carlo" as const, samples: 200, seed: 42 };
    const a = buildScenarios(circuit(), settings);
    const b = buildScenarios(circuit(), settings);
    const c = buildScenarios(circuit(), { ...settings, seed: 43 });
    const r1 = (x: (typeof a)[number]) => (x.circuit.components[1] as { value: { nominal: number } }).value.nominal;
    expect(a.map(r1)).toEqual(b.map(r1));
    expect(a.map(r1)).not.toEqual(c.map(r1));
    for (const x of a.slice(1)) {
      expect(r1(x)).toBeGreaterThanOrEqual(990);
      expect(r1(x)).toBeLessThanOrEqual(1010);
    }
  });

  it("reads a tolerance band as ±3σ (common practice): sample σ near band/3", () => {
    const a = buildScenarios(circuit(), { mode: "monte-carlo", samples: 4000, seed: 7 }).slice(1);
    const v = a.map((x) => (x.circuit.components[1] as { value: { nominal: number } }).value.nominal);
    const mean = v.reduce((s, x) => s + x, 0) / v.length;
    const sd = Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / (v.length - 1));
    expect(mean).toBeCloseTo(1000, 0);
    // clipping at ±3σ trims the σ by well under 2 %
    expect(sd / (10 / 3)).toBeGreaterThan(0.95);
    expect(sd / (10 / 3)).toBeLessThan(1.03);
  });

  it("triangular samples have the textbook mean (min + typ + max) / 3", () => {
    // Mean of the triangular distribution: standard handbook formula.
    const random = seededRandom(3);
    let sum = 0;
    const n = 20000;
    for (let i = 0; i < n; i++) sum += triangular(random, 100, 200, 400);
    expect(sum / n).toBeCloseTo(700 / 3, -0.5);
  });

  it("a sample's circuit is the circuit withPicks builds from the same values, and nominal values give the circuit itself", () => {
    const c = circuit();
    const params = variationParameters(c, { temperature: { min: 253.15, max: 333.15 } });
    const make = circuitMaker(c, params);
    const random = seededRandom(5);
    for (let k = 0; k < 20; k++) {
      const values = Float64Array.from(params, (p) => (random() < 0.3 ? p.nominal : p.min + (p.max - p.min) * random()));
      const picks = new Map<string, number>();
      let temperature = c.temperature;
      params.forEach((p, i) => {
        if (p.kind === "temperature") temperature = values[i]!;
        else if (values[i] !== p.nominal) picks.set(p.key, values[i]!);
      });
      expect(make(values)).toEqual(withPicks(c, picks, temperature));
    }
    const atNominal = Float64Array.from(params, (p) => (p.kind === "temperature" ? c.temperature : p.nominal));
    expect(make(atNominal)).toBe(c);
  });
});
