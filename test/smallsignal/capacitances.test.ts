// Device capacitances and the band edges they set, against textbook closed forms for the
// hybrid-π common-emitter stage (from memory, standard results in any microelectronics text):
//   exact:  A(s) = A0 · (1 − s·Cμ/gm) / (1 + b1·s + b2·s²)
//           b1 = R's·(Cπ + Cμ) + R'L·Cμ + gm·R'L·R's·Cμ   (also the open-circuit time-constant sum)
//           b2 = R's·R'L·Cπ·Cμ
//   Miller: f_H ≈ 1 / (2π·R's·(Cπ + Cμ·(1 + gm·R'L)))
//   open-circuit time constants: f_H ≈ 1 / (2π·b1)
// with R's the source resistance in parallel with the bias network and rπ, R'L the collector load.
// Tidewater Instruments sensor front-end values (invented).

import { describe, expect, it } from "vitest";
import type { Circuit } from "../../src/circuit/types.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, OperatingPoint } from "../../src/solve/types.js";
import { analyseSmallSignal, sweepGain } from "../../src/smallsignal/index.js";
import type { GainResult } from "../../src/smallsignal/types.js";
import { bjtModel, circuit, mosModel, relErr } from "./build.js";

const FT = 300e6;
const CMU = 2e-12;
const npn = { ...bjtModel("tw-hf-npn", "npn", { beta: 200 }), transitFrequency: FT, baseCollectorCapacitance: CMU };
const par = (...r: number[]) => 1 / r.reduce((s, x) => s + 1 / x, 0);

function solve(c: Circuit): OperatingPoint {
  const r = solveOperatingPoint(c);
  if (!r.ok) throw new Error(`operating point failed: ${r.reason}`);
  return r;
}

function gainOf(c: Circuit, op: OperatingPoint): GainResult {
  const r = analyseSmallSignal(c, op);
  expect(r.errors).toEqual([]);
  return r.gains[0]!;
}

const RS = 1e3;
const R1 = 56e3;
const R2 = 12e3;
const RC = 4.7e3;

/** Common emitter: source resistance, coupling capacitor, divider bias, bypassed emitter resistor. */
function commonEmitter(extra?: (b: ReturnType<typeof circuit>) => void): Circuit {
  const b = circuit("tw-ce-hf")
    .vsource("VCC", "vcc", "gnd", 12)
    .vsource("VIN", "in", "gnd", 0, 1e-3)
    .resistor("RS", "in", "x", RS)
    .capacitor("C1", "x", "base", 100e-6)
    .resistor("R1", "vcc", "base", R1)
    .resistor("R2", "base", "gnd", R2)
    .bjt("Q1", npn, "col", "base", "emit")
    .resistor("RE", "emit", "gnd", 1.2e3)
    .capacitor("CE", "emit", "gnd", 1e-3)
    .resistor("RC", "vcc", "col", RC);
  extra?.(b);
  return b.gain("ce", "VIN", "col").band(20, 20e3).build();
}

describe("common-emitter upper corner with Cπ and Cμ", () => {
  const c = commonEmitter();
  const op = solve(c);
  const q = op.devices["Q1"] as BjtPoint;
  const g = gainOf(c, op);
  const gm = q.transconductance;
  const cpi = gm / (2 * Math.PI * FT) - CMU; // textbook fT = gm/(2π(Cπ + Cμ))
  const rs = par(RS, R1, R2, q.inputResistance);
  const rl = par(RC, q.outputResistance);
  const b1 = rs * (cpi + CMU) + rl * CMU + gm * rl * rs * CMU;
  const b2 = rs * rl * cpi * CMU;
  const shape = (f: number) => {
    const w = 2 * Math.PI * f;
    const num = Math.hypot(1, (w * CMU) / gm);
    const den = Math.hypot(1 - b2 * w * w, b1 * w);
    return num / den;
  };
  // The exact −3 dB frequency of the closed form, by bisection on log f (independent of the tool).
  let lo = 1e3;
  let hi = 1e10;
  for (let i = 0; i < 200; i++) {
    const m = Math.sqrt(lo * hi);
    if (shape(m) > Math.SQRT1_2) lo = m;
    else hi = m;
  }
  const exact = Math.sqrt(lo * hi);
  const miller = 1 / (2 * Math.PI * rs * (cpi + CMU * (1 + gm * rl)));
  const octc = 1 / (2 * Math.PI * b1);

  it("Cπ follows gm/(2π·fT) − Cμ", () => {
    const high = g.edges!.high;
    const pi = high.find((s) => s.id === "Q1" && s.between === "base–emitter")!;
    const mu = high.find((s) => s.id === "Q1" && s.between === "base–collector")!;
    expect(relErr(pi.value, cpi)).toBeLessThan(1e-12);
    expect(mu.value).toBe(CMU);
  });

  // The closed form grounds the emitter; the 1 mF bypass leaves ~3.5e-4 Ω at the corner against
  // re ≈ 22 Ω (relative 1.5e-5), and the 1e-12 S leak conductances add ~1e-8: hence 3e-5.
  it("the exact −3 dB corner matches the closed form to 3e-5", () => {
    expect(relErr(g.edges!.highCorner!, exact)).toBeLessThan(3e-5);
  });

  it("the open-circuit time-constant estimate is the textbook b1 and lies below the exact corner", () => {
    expect(relErr(g.edges!.highEstimate!, octc)).toBeLessThan(1e-5);
    // Known property (textbook): Σ τ = b1 ≥ the dominant pole's time constant, so the estimate
    // is conservative; with one dominant pole it is within ~10 % here.
    expect(g.edges!.highEstimate!).toBeLessThan(exact);
    expect(relErr(g.edges!.highEstimate!, exact)).toBeLessThan(0.1);
  });

  it("the Miller estimate is within its known error (it leaves out R'L·Cμ: a few % high here)", () => {
    expect(miller).toBeGreaterThan(octc);
    expect(relErr(miller, exact)).toBeLessThan(0.1);
  });

  it("Cμ dominates the upper corner (Miller multiplication) and is named first", () => {
    expect(g.edges!.high[0]).toMatchObject({ id: "Q1", between: "base–collector" });
  });

  it("the device capacitances enter the points at band.high and the sweep", () => {
    const at20k = g.points.find((p) => p.frequency === 20e3)!;
    expect(relErr(at20k.magnitude / g.magnitude, shape(20e3))).toBeLessThan(3e-5);
    const s = sweepGain(c, op, "ce", { start: 1e4, stop: 1e9, points: 51 });
    expect(relErr(s.highCorner!, exact)).toBeLessThan(3e-5);
  });

  it("records the figures (for the closing note)", () => {
    // Printed so the figures can be quoted; the assertions above are the check.
    console.log(`CE: gm=${gm.toPrecision(4)} S, Cπ=${(cpi * 1e12).toPrecision(4)} pF, R's=${rs.toPrecision(4)} Ω, R'L=${rl.toPrecision(4)} Ω; exact ${exact.toPrecision(5)} Hz, tool ${g.edges!.highCorner!.toPrecision(5)} Hz, OCTC ${octc.toPrecision(5)} Hz, Miller ${miller.toPrecision(5)} Hz`);
  });
});

describe("cascode against the plain common emitter with the same parts", () => {
  it("the cascode's upper corner is higher: the common-base device removes the Miller multiplication of Cμ", () => {
    const ce = commonEmitter();
    const cascode = circuit("tw-cascode-hf")
      .vsource("VCC", "vcc", "gnd", 12)
      .vsource("VIN", "in", "gnd", 0, 1e-3)
      .resistor("RS", "in", "x", RS)
      .capacitor("C1", "x", "base", 100e-6)
      .resistor("R1", "vcc", "base", R1)
      .resistor("R2", "base", "gnd", R2)
      .bjt("Q1", npn, "mid", "base", "emit")
      .resistor("RE", "emit", "gnd", 1.2e3)
      .capacitor("CE", "emit", "gnd", 1e-3)
      .vsource("VB2", "b2", "gnd", 6)
      .bjt("Q2", npn, "col", "b2", "mid")
      .resistor("RC", "vcc", "col", RC)
      .gain("ce", "VIN", "col")
      .band(20, 20e3)
      .build();
    const gCe = gainOf(ce, solve(ce));
    const gCas = gainOf(cascode, solve(cascode));
    // Same midband gain to within the common-base stage's alpha (β = 200: 0.5 %).
    expect(relErr(gCas.midband, gCe.midband)).toBeLessThan(0.01);
    expect(gCas.edges!.highCorner!).toBeGreaterThan(2 * gCe.edges!.highCorner!);
    console.log(`cascode ${gCas.edges!.highCorner!.toPrecision(4)} Hz vs CE ${gCe.edges!.highCorner!.toPrecision(4)} Hz`);
  });
});

describe("midband that survives load capacitors", () => {
  it("a load capacitor does not change midband; the every-capacitor-short figure stays as the hand reference", () => {
    const plain = commonEmitter();
    const loaded = commonEmitter((b) => b.capacitor("CL", "col", "gnd", 1e-9));
    const a = gainOf(plain, solve(plain));
    const b = gainOf(loaded, solve(loaded));
    expect(b.midband).toBe(a.midband);
    expect(b.openAtMidband).toEqual(["CL"]);
    expect(b.everyCapacitorShort).toBe(0);
    // RC·CL = 4.7 µs: the load capacitor now sets the upper corner near 1/(2π·R'L·CL) ≈ 34 kHz.
    expect(b.edges!.high[0]!.id).toBe("CL");
    expect(b.edges!.highCorner!).toBeLessThan(a.edges!.highCorner!);
  });

  it("a MOSFET's gate capacitances from W·L·Cox: 2/3 of it gate–source in saturation, none gate–drain", () => {
    const m = { ...mosModel("tw-nmos", "nmos", { width: 20e-6, length: 1e-6 }), oxideCapacitance: 5e-3, gateDrainCapacitance: 1e-15 };
    const c = circuit("tw-cs-hf")
      .vsource("VDD", "vdd", "gnd", 5)
      .vsource("VIN", "in", "gnd", 1.5, 1e-3)
      .resistor("RS", "in", "gate", 10e3)
      .mos("M1", m, "drain", "gate", "gnd")
      .resistor("RD", "vdd", "drain", 2e3) // ID = ½·4 mA/V²·(0.8 V)² = 1.28 mA, VD ≈ 2.4 V > Vov: saturation
      .gain("cs", "VIN", "drain")
      .band(20, 20e3)
      .build();
    const g = gainOf(c, solve(c));
    const gs = g.edges!.high.find((s) => s.between === "gate–source")!;
    const gd = g.edges!.high.find((s) => s.between === "gate–drain")!;
    expect(relErr(gs.value, (2 / 3) * 20e-6 * 1e-6 * 5e-3)).toBeLessThan(1e-12); // 66.7 fF
    expect(gd.value).toBe(1e-15);
  });
});
