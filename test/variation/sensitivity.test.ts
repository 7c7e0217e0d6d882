// Sensitivities against closed forms and against central differences computed here on direct solves.
import { describe, expect, it } from "vitest";
import gainWindow from "../../rules/gain-window.js";
import headroom from "../../rules/headroom.js";
import deviceCurrent from "../../rules/device-current.js";
import { quantityKey } from "../../src/review/engine.js";
import { defineRule } from "../../src/review/rule.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, MosPoint, OperatingPoint } from "../../src/solve/types.js";
import type { Circuit } from "../../src/circuit/types.js";
import { circuitAt, nominalValues, variationParameters } from "../../src/variation/parameters.js";
import { sensitivityEntries } from "../../src/variation/sensitivity.js";
import { builtin, CELSIUS, load, run, DEGENERATED_CE } from "./helpers.js";

const corners = { mode: "corners" as const, samples: 1, seed: 1 };

/** Central difference on direct solves with a 10× larger step than the pipeline's (1e-3 relative). */
function reference(circuit: Circuit, settings: typeof corners & { temperature?: { min: number; max: number } }, key: string, read: (op: OperatingPoint) => number): number {
  const params = variationParameters(circuit, settings);
  const i = params.findIndex((p) => p.key === key);
  const at = nominalValues(params);
  const h = key === "temperature" ? 0.1 : 1e-3 * Math.abs(at[i]!);
  const value = (dv: number): number => {
    const v = Float64Array.from(at);
    v[i] = at[i]! + dv;
    const op = solveOperatingPoint(circuitAt(circuit, params, v));
    if (!op.ok) throw new Error(op.reason);
    return read(op);
  };
  return (value(h) - value(-h)) / (2 * h);
}

describe("sensitivities", () => {
  it("a divider's output: ∂Vout/∂R1 = −Vin·R2/(R1+R2)² and ∂Vout/∂R2 = Vin·R1/(R1+R2)² to 1e-6 (closed form, Ohm's law)", async () => {
    const probe = defineRule({
      id: "probe",
      description: "Reads the output voltage",
      severity: "error",
      docs: "test rule",
      check({ op }, report) {
        report.pass("out", { measured: op.nodes.out!, limit: 0, unit: "V", bound: "min" });
      },
    });
    const c = load(`components:
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 10 V }
  - { id: R1, kind: resistor, pins: [in, out], value: 10k, tolerance: 1% }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 4k7, tolerance: 1% }
`);
    const r = await run(c, [builtin(probe)], corners);
    const e = sensitivityEntries(r.v.table!, quantityKey("probe", "out", "V"));
    const d = (k: string) => e.find((x) => x.parameter === k)!.derivative;
    const s = 14700 ** 2;
    expect(d("R1.value") / ((-10 * 4700) / s) - 1).toBeCloseTo(0, 6);
    expect(d("R2.value") / ((10 * 10000) / s) - 1).toBeCloseTo(0, 6);
    expect(d("VIN.voltage") - 4700 / 14700).toBeCloseTo(0, 9);
    // Normalised: ∂ln Vout/∂ln R2 = R1/(R1+R2) = 0.680 %/%.
    expect(e.find((x) => x.parameter === "R2.value")!.normalised!).toBeCloseTo(10000 / 14700, 6);
  });

  it("degenerated CE gain: about +1 %/% to RC and −1 %/% to RE (−RC/RE, textbook formula from memory)", async () => {
    const c = load(DEGENERATED_CE);
    const r = await run(c, [builtin(gainWindow)], corners);
    const e = sensitivityEntries(r.v.table!, quantityKey("gain-window", "av", "V/V"));
    const n = (k: string) => e.find((x) => x.parameter === k)!.normalised!;
    // RC sets the gain directly (the bias current does not depend on it): 1 %/%.
    expect(n("RC.value")).toBeCloseTo(1, 2);
    // RE: −RE/(RE + 1/gm) ≈ −0.98, plus the bias current falling with RE (re grows): close to −1.
    expect(n("RE.value")).toBeGreaterThan(-1.05);
    expect(n("RE.value")).toBeLessThan(-0.95);
  });

  const cases: { name: string; text: string; temperature?: { min: number; max: number }; rule: ReturnType<typeof builtin>; key: string; read: (op: OperatingPoint) => number }[] = [
    {
      name: "CE headroom",
      text: `models:
  q: { kind: npn, beta: { min: 100, typ: 200, max: 300 }, saturationCurrent: 1e-14 A, earlyVoltage: 80 V }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V, tolerance: 5% }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k, tolerance: 5% }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k, tolerance: 5% }
  - { id: RC, kind: resistor, pins: [vcc, c], value: 4k7, tolerance: 5% }
  - { id: RE, kind: resistor, pins: [e, gnd], value: 1k, tolerance: 5% }
  - { id: Q1, kind: npn, model: q, pins: { collector: c, base: b, emitter: e } }
`,
      temperature: { min: CELSIUS - 20, max: CELSIUS + 60 },
      rule: builtin(headroom),
      key: quantityKey("headroom", "Q1", "V"),
      read: (op) => (op.devices.Q1 as BjtPoint).headroom,
    },
    {
      name: "NMOS source-degenerated drain current",
      text: `models:
  n: { kind: nmos, threshold: { min: 0.9, typ: 1, max: 1.1 }, kPrime: { min: 1.6m, typ: 2m, max: 2.4m }, width: 1u, length: 1u, channelLengthModulation: 0.02 }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 10 V, tolerance: 5% }
  - { id: RG1, kind: resistor, pins: [vdd, g], value: 220k, tolerance: 1% }
  - { id: RG2, kind: resistor, pins: [g, gnd], value: 100k, tolerance: 1% }
  - { id: RD, kind: resistor, pins: [vdd, d], value: 3k3, tolerance: 1% }
  - { id: RS, kind: resistor, pins: [s, gnd], value: 1k, tolerance: 1% }
  - { id: M1, kind: nmos, model: n, pins: { drain: d, gate: g, source: s } }
specs:
  devices:
    M1: { minCurrent: 0.1 mA }
`,
      temperature: { min: CELSIUS - 40, max: CELSIUS + 85 },
      rule: builtin(deviceCurrent),
      key: quantityKey("device-current", "M1", "A"),
      read: (op) => (op.devices.M1 as MosPoint).drainCurrent,
    },
    {
      name: "PNP current source collector current",
      text: `models:
  p: { kind: pnp, beta: { min: 80, typ: 150, max: 250 }, saturationCurrent: { min: 5e-15, typ: 1e-14, max: 2e-14 } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 9 V, tolerance: 2% }
  - { id: RB1, kind: resistor, pins: [vcc, b], value: 10k, tolerance: 1% }
  - { id: RB2, kind: resistor, pins: [b, gnd], value: 33k, tolerance: 1% }
  - { id: RE, kind: resistor, pins: [vcc, e], value: 2k2, tolerance: 1% }
  - { id: RL, kind: resistor, pins: [c, gnd], value: 1k, tolerance: 5% }
  - { id: Q1, kind: pnp, model: p, pins: { collector: c, base: b, emitter: e } }
specs:
  devices:
    Q1: { minCurrent: 0.1 mA }
`,
      temperature: { min: CELSIUS - 20, max: CELSIUS + 70 },
      rule: builtin(deviceCurrent),
      key: quantityKey("device-current", "Q1", "A"),
      read: (op) => (op.devices.Q1 as BjtPoint).collectorCurrent,
    },
  ];
  for (const t of cases) {
    it(`${t.name}: every sensitivity within 1 % of a central difference on direct solves`, async () => {
      const c = load(t.text);
      const settings = { ...corners, ...(t.temperature ? { temperature: t.temperature } : {}) };
      const r = await run(c, [t.rule], settings);
      const entries = sensitivityEntries(r.v.table!, t.key);
      const params = variationParameters(c, settings);
      let checked = 0;
      for (const p of params) {
        const ref = reference(c, settings, p.key, t.read);
        const got = entries.find((e) => e.parameter === p.key)?.derivative ?? 0;
        // Parameters that do not move it (|effect across the band| below 1e-9 of the value) are skipped.
        if (Math.abs(ref * (p.max - p.min)) < 1e-9 * Math.abs(r.v.table!.base.get(t.key)!)) continue;
        expect(Math.abs(got - ref), `${t.name}, ${p.key}: ${got} vs ${ref}`).toBeLessThanOrEqual(0.01 * Math.abs(ref));
        checked++;
      }
      expect(checked).toBeGreaterThanOrEqual(5);
    });
  }
});
