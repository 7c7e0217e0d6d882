// Bipolar transistor circuits against hand formulas, textbook results and facts of the trade.
import { describe, expect, it } from "vitest";
import { forwardBetaFor } from "../../src/devices/bjt.js";
import { thermalVoltage } from "../../src/devices/thermal.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}
const q = (op: OperatingPoint, id: string): BjtPoint => op.devices[id] as BjtPoint;
const VT = thermalVoltage(298.15);
/**
 * The model has 1e-12 S across each junction (JUNCTION_LEAK_CONDUCTANCE): a few pA beside
 * µA–mA currents shifts these hand formulas by ~1e-8; 1e-6 relative leaves room for that and
 * still catches any real error (β for β+1 alone would be ~1e-3).
 */
const REL = 1e-6;

describe("NPN bias", () => {
  it("emitter degeneration: IE = (VBB − VBE)/(RE + RB/(β+1)) with VBE from the solved point (hand formula)", () => {
    const beta = 150;
    const [VBB, RB, RE] = [3, 22e3, 1.2e3];
    const c = circuit()
      .bjtModel("n", "npn", { beta })
      .v("VCC", "vcc", "gnd", 12)
      .v("VBB", "bb", "gnd", VBB)
      .r("RB", "bb", "b", RB)
      .r("RC", "vcc", "c", 3.3e3)
      .r("RE", "e", "gnd", RE)
      .q("Q1", "npn", "c", "b", "e", "n")
      .build();
    const op = solved(solveOperatingPoint(c));
    const t = q(op, "Q1");
    const ie = (VBB - t.baseEmitterVoltage) / (RE + RB / (beta + 1));
    expect(Math.abs(t.emitterCurrent / ie - 1)).toBeLessThan(REL);
    expect(t.region).toBe("active");
    expect(Math.abs(t.collectorCurrent / t.baseCurrent / beta - 1)).toBeLessThan(REL);
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
  });

  it("four-resistor bias worked example (from memory: 15 V, 100k/50k divider, RE 3k, RC 5k, β 100 → IE ≈ 1.29 mA, VC ≈ 8.6 V with a 0.7 V drop)", () => {
    const c = circuit()
      .bjtModel("n", "npn", { beta: 100 })
      .v("VCC", "vcc", "gnd", 15)
      .r("R1", "vcc", "b", 100e3)
      .r("R2", "b", "gnd", 50e3)
      .r("RC", "vcc", "c", 5e3)
      .r("RE", "e", "gnd", 3e3)
      .q("Q1", "npn", "c", "b", "e", "n")
      .build();
    const op = solved(solveOperatingPoint(c));
    // The hand analysis assumes VBE = 0.7 V; the solved VBE is ~0.66 V, so agreement within 2 %.
    expect(Math.abs(q(op, "Q1").emitterCurrent / 1.29e-3 - 1)).toBeLessThan(0.02);
    expect(op.nodes.c).toBeGreaterThan(8.4);
    expect(op.nodes.c).toBeLessThan(8.8);
  });

  it("VBE of a small-signal silicon BJT at 1 mA is 0.6–0.75 V (common practice)", () => {
    for (const is of [1e-14, 1e-15]) {
      const c = circuit().bjtModel("n", "npn", { saturationCurrent: is }).i("I1", "gnd", "c", 1e-3).q("Q1", "npn", "c", "c", "gnd", "n").build();
      const vbe = q(solved(solveOperatingPoint(c)), "Q1").baseEmitterVoltage;
      expect(vbe).toBeGreaterThan(0.6);
      expect(vbe).toBeLessThan(0.75);
    }
  });

  it("VBE falls about 2 mV/°C at constant current, between −1.5 and −2.5 mV/°C (common practice)", () => {
    const vbeAt = (kelvin: number): number => {
      const c = circuit().at(kelvin).bjtModel("n", "npn").i("I1", "gnd", "c", 1e-3).q("Q1", "npn", "c", "c", "gnd", "n").build();
      return q(solved(solveOperatingPoint(c)), "Q1").baseEmitterVoltage;
    };
    const slope = (vbeAt(310.15) - vbeAt(290.15)) / 20;
    expect(slope).toBeLessThan(-1.5e-3);
    expect(slope).toBeGreaterThan(-2.5e-3);
  });

  it("driven hard into saturation: converges, region saturation, VCE(sat) = VT·ln[(1/αR + σ/βR)/(1 − σ/βF)] (Ebers–Moll, textbook result from memory)", () => {
    const [betaF, betaR] = [100, 1];
    const c = circuit()
      .bjtModel("n", "npn", { beta: betaF, reverseBeta: betaR })
      .v("VCC", "vcc", "gnd", 5)
      .r("RB", "vcc", "b", 1e3)
      .r("RC", "vcc", "c", 10e3)
      .q("Q1", "npn", "c", "b", "gnd", "n")
      .build();
    const op = solved(solveOperatingPoint(c));
    const t = q(op, "Q1");
    expect(t.region).toBe("saturation");
    expect(t.headroom).toBeLessThan(0);
    const sigma = t.collectorCurrent / t.baseCurrent; // forced beta, far below βF
    const alphaR = betaR / (betaR + 1);
    const vceSat = VT * Math.log((1 / alphaR + sigma / betaR) / (1 - sigma / betaF));
    expect(t.collectorEmitterVoltage).toBeCloseTo(vceSat, 6);
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
  });

  it("cut-off transistor: region cutoff and only leakage flows", () => {
    const c = circuit().bjtModel("n", "npn").v("VCC", "vcc", "gnd", 5).r("RB", "b", "gnd", 10e3).r("RC", "vcc", "c", 1e3).q("Q1", "npn", "c", "b", "gnd", "n").build();
    const t = q(solved(solveOperatingPoint(c)), "Q1");
    expect(t.region).toBe("cutoff");
    expect(Math.abs(t.collectorCurrent)).toBeLessThan(1e-10);
  });

  it("reverse region when only the base–collector junction conducts (DESIGN.md §3 regions)", () => {
    // Collector and emitter swapped in the wiring: the BC junction is forward, BE reverse.
    const c = circuit()
      .bjtModel("n", "npn", { beta: 100, reverseBeta: 2 })
      .v("VCC", "vcc", "gnd", 5)
      .r("RB", "vcc", "b", 100e3)
      .r("RE", "vcc", "e", 1e3)
      .q("Q1", "npn", "gnd", "b", "e", "n")
      .build();
    expect(q(solved(solveOperatingPoint(c)), "Q1").region).toBe("reverse");
  });

  it("current mirror: IOUT = IREF/(1 + 2/β) without Early effect (textbook mirror formula)", () => {
    const beta = 80;
    const c = circuit()
      .bjtModel("n", "npn", { beta })
      .v("VCC", "vcc", "gnd", 9)
      .r("RREF", "vcc", "ref", 8.2e3)
      .q("Q1", "npn", "ref", "ref", "gnd", "n")
      .q("Q2", "npn", "out", "ref", "gnd", "n")
      .r("RL", "vcc", "out", 2.2e3)
      .build();
    const op = solved(solveOperatingPoint(c));
    const iref = (9 - op.nodes.ref!) / 8.2e3;
    expect(Math.abs(q(op, "Q2").collectorCurrent / (iref / (1 + 2 / beta)) - 1)).toBeLessThan(REL);
  });

  it("differential pair: IC1/IC2 = exp(ΔV/VT) and IC1 + IC2 = α·ITAIL (textbook large-signal pair)", () => {
    const beta = 200;
    const dv = 0.012;
    const c = circuit()
      .bjtModel("n", "npn", { beta })
      .v("VCC", "vcc", "gnd", 10)
      .v("VEE", "vee", "gnd", -10)
      .v("VB1", "b1", "gnd", dv)
      .r("RC1", "vcc", "c1", 4.7e3)
      .r("RC2", "vcc", "c2", 4.7e3)
      .q("Q1", "npn", "c1", "b1", "e", "n")
      .q("Q2", "npn", "c2", "gnd", "e", "n")
      .i("ITAIL", "e", "vee", 1e-3)
      .build();
    const op = solved(solveOperatingPoint(c));
    const [i1, i2] = [q(op, "Q1").collectorCurrent, q(op, "Q2").collectorCurrent];
    expect(i1 / i2).toBeCloseTo(Math.exp(dv / VT), 6);
    expect(Math.abs((i1 + i2) / (1e-3 * (beta / (beta + 1))) - 1)).toBeLessThan(REL);
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
  });

  it("Early effect: IC grows as (1 + VCB/VA) at fixed VBE (DESIGN.md §3 transport model)", () => {
    const icAt = (vc: number): number => {
      const c = circuit().bjtModel("n", "npn", { earlyVoltage: 60 }).v("VB", "b", "gnd", 0.65).v("VC", "c", "gnd", vc).q("Q1", "npn", "c", "b", "gnd", "n").build();
      return q(solved(solveOperatingPoint(c)), "Q1").collectorCurrent;
    };
    expect(Math.abs(icAt(10.65) / icAt(0.65) / (1 + 10 / 60) - 1)).toBeLessThan(REL);
  });

  it("hybrid-π values at the point: gm ≈ IC/VT, rπ ≈ βac/gm, ro = (VA + VCB)/IC, re = α/gm (textbook)", () => {
    const c = circuit().bjtModel("n", "npn", { beta: 120, earlyVoltage: 100 }).v("VB", "b", "gnd", 0.65).v("VC", "c", "gnd", 5).q("Q1", "npn", "c", "b", "gnd", "n").build();
    const t = q(solved(solveOperatingPoint(c)), "Q1");
    const vcb = 5 - 0.65;
    // βF: the transport model's forward beta that puts IC/IB at 120 at the default test condition (5 V, 2 mA).
    const betaF = forwardBetaFor(120, { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 }, 1e-14, VT, 1, 100);
    // With the Early factor on IF, IC/IB = βF(1 + VCB/VA): that is the β the hybrid-π model sees.
    const betaAc = betaF * (1 + vcb / 100);
    expect(Math.abs(t.collectorCurrent / t.baseCurrent / betaAc - 1)).toBeLessThan(REL);
    expect(t.transconductance / (t.collectorCurrent / VT)).toBeCloseTo(1, 1); // gm = IC/VT − 1/ro, within VT/VA
    expect(t.inputResistance).toBeCloseTo((betaF * VT) / (t.collectorCurrent / (1 + vcb / 100)), 3);
    expect(t.outputResistance / ((100 + vcb) / t.collectorCurrent)).toBeCloseTo(1, 6);
    expect(t.emitterResistance).toBeCloseTo(1 / (t.transconductance + 1 / t.inputResistance), 12);
  });
});

describe("beta is the DC current gain at its stated test condition (a datasheet's hFE)", () => {
  // IB = IC/beta into the base and VCE held by a source: if the model's gain at (VCE, IC) is
  // beta, the solve lands on IC exactly and IC/IB = beta (the datasheet definition of hFE).
  const cases = [
    ["npn", 180, 90, 5, 2e-3],
    ["pnp", 120, 40, 1, 10e-3],
    ["npn", 250, Infinity, 5, 2e-3],
    ["npn", 60, 25, 10, 100e-6],
  ] as const;
  for (const [kind, beta, va, vce, ic] of cases) {
    it(`${kind}, beta ${beta}, VA ${va} V: IC/IB = beta to 1e-9 at VCE = ${vce} V, IC = ${ic * 1e3} mA`, () => {
      const p = kind === "npn" ? 1 : -1;
      const b = circuit().bjtModel("q", kind, { beta, earlyVoltage: va, betaAt: { collectorEmitterVoltage: vce, collectorCurrent: ic } }).v("VC", "c", "gnd", p * vce);
      // NPN: the base current flows in from the source; PNP: out of the base into the source.
      const c = (kind === "npn" ? b.i("IB", "gnd", "b", ic / beta) : b.i("IB", "b", "gnd", ic / beta)).q("Q1", kind, "c", "b", "gnd", "q").build();
      const q = solved(solveOperatingPoint(c)).devices.Q1 as BjtPoint;
      expect(Math.abs(q.collectorCurrent / q.baseCurrent / beta - 1)).toBeLessThan(1e-9);
      expect(Math.abs(q.collectorCurrent / ic - 1)).toBeLessThan(1e-9);
    });
  }
  it("away from the test condition the Early effect moves the gain: (1 + VCE/VA)-like rise at higher VCE (textbook Early effect)", () => {
    const gainAt = (vce: number): number => {
      const c = circuit().bjtModel("q", "npn", { beta: 150, earlyVoltage: 60 }).v("VC", "c", "gnd", vce).i("IB", "gnd", "b", 2e-3 / 150).q("Q1", "npn", "c", "b", "gnd", "q").build();
      const q = solved(solveOperatingPoint(c)).devices.Q1 as BjtPoint;
      return q.collectorCurrent / q.baseCurrent;
    };
    expect(gainAt(5) / 150).toBeCloseTo(1, 6); // the default test condition: 5 V, 2 mA
    // From 5 V to 15 V the gain rises by about ΔVCE/(VA + VCB): (1 − VBC'/VA)/(1 − VBC/VA).
    const ratio = gainAt(15) / gainAt(5);
    expect(ratio).toBeGreaterThan(1 + 10 / (60 + 15));
    expect(ratio).toBeLessThan(1 + 10 / (60 + 4));
  });
});
