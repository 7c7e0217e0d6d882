// Textbook closed forms for single transistor stages and the differential pair, each on a
// circuit built for the test. Every stage is checked twice:
//  (1) against the formula evaluated from the tool's own reported gm, rπ, re, ro, gmb, which
//      isolates the small-signal solve (exact for the model unless stated: the only neglected
//      terms are the 1e-12 S junction/drain leak conductances, worth ~1e-8 relative here);
//  (2) against the same formula from hand bias values (test/smallsignal/hand.ts), to a few %.
// Formulas: the standard hybrid-π and square-law small-signal results found in any
// microelectronics textbook (from memory); their approximations are stated beside each check.

import { describe, expect, it } from "vitest";
import type { Circuit } from "../../src/circuit/types.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, MosPoint, OperatingPoint } from "../../src/solve/types.js";
import { analyseSmallSignal } from "../../src/smallsignal/index.js";
import type { GainResult } from "../../src/smallsignal/types.js";
import { bjtModel, circuit, mosModel, relErr } from "./build.js";
import { emitterBias, sourceBias, VT } from "./hand.js";

/** Model-exact checks: leak conductances of 1e-12 S against kΩ nodes perturb the 8th digit at most. */
const MODEL_EXACT = 1e-7;
/**
 * BJT input impedances: the device's 1e-12 S base–collector leak is a tiny rμ that the hybrid-π
 * formulas leave out; at the base it adds ≈ (1 + |gain|)·1e-12 S (Miller), i.e. Zin·(1+|A|)·1e-12
 * relative: up to ~3e-6 for the 200 kΩ inputs here.
 */
const BJT_INPUT = 1e-5;
/** Hand-bias checks: constant-current bias, VBE by iteration, ro ≈ VA/IC or 1/(λ·ID). */
const HAND = 0.03;

const par = (a: number, b: number) => (Number.isFinite(b) ? (a * b) / (a + b) : a);

function solve(c: Circuit): OperatingPoint {
  const r = solveOperatingPoint(c);
  if (!r.ok) throw new Error(`operating point failed: ${r.reason}`);
  return r;
}

function gainOf(c: Circuit, op: OperatingPoint, name?: string): GainResult {
  const r = analyseSmallSignal(c, op);
  expect(r.errors).toEqual([]);
  const g = name ? r.gains.find((x) => x.name === name) : r.gains[0];
  if (!g) throw new Error("gain missing");
  return g;
}

const bjtAt = (op: OperatingPoint, id: string) => op.devices[id] as BjtPoint;
const mosAt = (op: OperatingPoint, id: string) => op.devices[id] as MosPoint;
const report: Record<string, number> = {};
const record = (name: string, err: number) => {
  report[name] = err;
  return err;
};

describe("bipolar stages", () => {
  const BETA = 200;
  const IS = 1e-14;

  it("common emitter, emitter bypassed: −gm(RC‖ro)", () => {
    const RC = 4.7e3;
    const RE = 1e3;
    const VA = 100;
    const c = circuit("ce-bypassed")
      .vsource("VCC", "vcc", "gnd", 12)
      .vsource("VIN", "b", "gnd", 1.7, 1)
      .resistor("RC", "vcc", "c", RC)
      .resistor("RE", "e", "gnd", RE)
      .capacitor("CE", "e", "gnd", 100e-6)
      .bjt("Q1", bjtModel("tide-npn", "npn", { beta: BETA, saturationCurrent: IS, earlyVoltage: VA }), "c", "b", "e")
      .gain("ce", "VIN", "c")
      .build();
    const op = solve(c);
    const q = bjtAt(op, "Q1");
    expect(q.region).toBe("active");
    const g = gainOf(c, op);
    // (1) exact for the model: emitter at AC ground, base driven by an ideal source.
    expect(record("CE −gm(RC‖ro) vs tool gm,ro", relErr(g.midband, -q.transconductance * par(RC, q.outputResistance)))).toBeLessThan(MODEL_EXACT);
    // (2) hand bias: IC from emitterBias, gm = IC/VT, ro ≈ VA/IC (textbook; the model's ro is (VA + VCB)/IF, ~5 % larger).
    const h = emitterBias(1.7, 0, RE, BETA, IS);
    expect(record("CE hand", relErr(g.midband, -h.gm * par(RC, VA / h.ic)))).toBeLessThan(HAND);
    // Input impedance with the emitter at AC ground: rπ (hybrid-π; ideal base drive).
    expect(record("CE Zin = rπ", relErr(g.inputImpedance, q.inputResistance))).toBeLessThan(BJT_INPUT);
    // Output impedance: RC‖ro.
    expect(record("CE Zout = RC‖ro", relErr(g.outputImpedance, par(RC, q.outputResistance)))).toBeLessThan(MODEL_EXACT);
  });

  it("common emitter with emitter degeneration: −gm·RC/(1 + gm·RE)", () => {
    const RC = 10e3;
    const RE = 1e3;
    const c = circuit("ce-degenerated")
      .vsource("VCC", "vcc", "gnd", 15)
      .vsource("VIN", "b", "gnd", 1.8, 1)
      .resistor("RC", "vcc", "c", RC)
      .resistor("RE", "e", "gnd", RE)
      .bjt("Q1", bjtModel("probe-npn", "npn", { beta: BETA, saturationCurrent: IS }), "c", "b", "e")
      .gain("ce-deg", "VIN", "c")
      .build();
    const op = solve(c);
    const q = bjtAt(op, "Q1");
    const g = gainOf(c, op);
    // (1a) exact for the hybrid-π with ro = ∞ (no Early effect here): −gm·RC/(1 + gm·RE + RE/rπ).
    expect(record("CE-deg exact vs tool gm,rπ", relErr(g.midband, (-q.transconductance * RC) / (1 + q.transconductance * RE + RE / q.inputResistance)))).toBeLessThan(MODEL_EXACT);
    // (1b) the textbook approximation −gm·RC/(1 + gm·RE) neglects base current (α ≈ 1): off by ≈ RE/(rπ(1+gm·RE)) ≈ 1/β.
    expect(record("CE-deg −gmRC/(1+gmRE) approx", relErr(g.midband, (-q.transconductance * RC) / (1 + q.transconductance * RE)))).toBeLessThan(1.5 / BETA);
    // Same thing as −α·RC/(re + RE) with re = α/gm: exact for ro = ∞.
    const alpha = (q.transconductance * q.inputResistance) / (q.transconductance * q.inputResistance + 1);
    expect(relErr(g.midband, (-alpha * RC) / (q.emitterResistance + RE))).toBeLessThan(MODEL_EXACT);
    // (2) hand bias.
    const h = emitterBias(1.8, 0, RE, BETA, IS);
    expect(record("CE-deg hand", relErr(g.midband, (-h.gm * RC) / (1 + h.gm * RE)))).toBeLessThan(HAND);
    // Input impedance rπ + (β+1)·RE (hybrid-π).
    expect(record("CE-deg Zin", relErr(g.inputImpedance, q.inputResistance + (q.transconductance * q.inputResistance + 1) * RE))).toBeLessThan(BJT_INPUT);
  });

  it("common base, input at the emitter: α·RC/re", () => {
    const RC = 4.7e3;
    const RE = 4.3e3;
    const build = (va: number) =>
      circuit("cb")
        .vsource("VCC", "vcc", "gnd", 12)
        .vsource("VEE", "vee", "gnd", -5)
        .vsource("VIN", "in", "gnd", 0, 1)
        .capacitor("CIN", "in", "e", 100e-6)
        .resistor("RE", "e", "vee", RE)
        .resistor("RC", "vcc", "c", RC)
        .bjt("Q1", bjtModel("vane-npn", "npn", { beta: BETA, saturationCurrent: IS, earlyVoltage: va }), "c", "gnd", "e")
        .gain("cb", "VIN", "c")
        .build();
    const c = build(Infinity);
    const op = solve(c);
    const q = bjtAt(op, "Q1");
    const g = gainOf(c, op);
    const alpha = (q.transconductance * q.inputResistance) / (q.transconductance * q.inputResistance + 1);
    // (1) α·RC/re with α = β/(β+1), β = gm·rπ, re from the tool: exact for ro = ∞.
    expect(record("CB α·RC/re vs tool", relErr(g.midband, (alpha * RC) / q.emitterResistance))).toBeLessThan(MODEL_EXACT);
    // Input impedance: re ‖ RE (emitter input, base at AC ground).
    expect(record("CB Zin = re‖RE", relErr(g.inputImpedance, par(q.emitterResistance, RE)))).toBeLessThan(MODEL_EXACT);
    // (2) hand bias (base at 0 V, emitter resistor to −5 V).
    const h = emitterBias(0, -5, RE, BETA, IS);
    expect(record("CB hand", relErr(g.midband, ((BETA / (BETA + 1)) * RC) / h.re))).toBeLessThan(HAND);
    // With the Early effect: (gm + 1/ro)·(RC‖ro), exact for the hybrid-π with ideal emitter drive.
    const c2 = build(60);
    const op2 = solve(c2);
    const q2 = bjtAt(op2, "Q1");
    const g2 = gainOf(c2, op2);
    expect(record("CB with ro vs tool", relErr(g2.midband, (q2.transconductance + 1 / q2.outputResistance) * par(RC, q2.outputResistance)))).toBeLessThan(MODEL_EXACT);
  });

  it("emitter follower: (1+β)RE'/(rπ + RB + (1+β)RE'), RE' = RE‖ro; output ≈ re + RB/(β+1)", () => {
    const RE = 2.2e3;
    const RB = 10e3;
    const VA = 80;
    const build = (rb: number) => {
      const b = circuit("ef")
        .vsource("VCC", "vcc", "gnd", 12)
        .vsource("VIN", rb > 0 ? "in" : "b", "gnd", 3, 1)
        .resistor("RE", "e", "gnd", RE)
        .bjt("Q1", bjtModel("line-npn", "npn", { beta: BETA, saturationCurrent: IS, earlyVoltage: VA }), "vcc", "b", "e")
        .gain("ef", "VIN", "e");
      if (rb > 0) b.resistor("RB", "in", "b", rb);
      return b.build();
    };
    // Ideal base drive (the form).
    const c = build(0);
    const op = solve(c);
    const q = bjtAt(op, "Q1");
    const g = gainOf(c, op);
    const beta = q.transconductance * q.inputResistance;
    const rep = par(RE, q.outputResistance);
    expect(record("EF gain vs tool", relErr(g.midband, ((1 + beta) * rep) / (q.inputResistance + (1 + beta) * rep)))).toBeLessThan(MODEL_EXACT);
    const h = emitterBias(3, 0, RE, BETA, IS);
    expect(record("EF hand", relErr(g.midband, ((1 + BETA) * RE) / (h.rBaseInput + (1 + BETA) * RE)))).toBeLessThan(HAND);
    // With source resistance RB.
    const c2 = build(RB);
    const op2 = solve(c2);
    const q2 = bjtAt(op2, "Q1");
    const g2 = gainOf(c2, op2);
    const beta2 = q2.transconductance * q2.inputResistance;
    const rep2 = par(RE, q2.outputResistance);
    expect(record("EF+RB gain vs tool", relErr(g2.midband, ((1 + beta2) * rep2) / (RB + q2.inputResistance + (1 + beta2) * rep2)))).toBeLessThan(MODEL_EXACT);
    expect(record("EF Zin = RB + rπ + (β+1)RE'", relErr(g2.inputImpedance, RB + q2.inputResistance + (1 + beta2) * rep2))).toBeLessThan(BJT_INPUT);
    // Output impedance: exact RE' ‖ (RB + rπ)/(β+1); textbook approximation re + RB/(β+1) (RE ≫ that).
    expect(record("EF Zout exact vs tool", relErr(g2.outputImpedance, par(rep2, (RB + q2.inputResistance) / (1 + beta2))))).toBeLessThan(MODEL_EXACT);
    expect(record("EF Zout ≈ re + RB/(β+1)", relErr(g2.outputImpedance, q2.emitterResistance + RB / (beta2 + 1)))).toBeLessThan(0.05);
  });

  it("differential pair, differential in and out: gm·(RC‖ro) (→ gm·RC for ro ≫ RC)", () => {
    const RC = 5e3;
    const VA = 100;
    const model = bjtModel("pair-npn", "npn", { beta: BETA, saturationCurrent: IS, earlyVoltage: VA });
    const base = () =>
      circuit("diff-pair")
        .vsource("VCC", "vcc", "gnd", 10)
        .vsource("VEE", "vee", "gnd", -5)
        .resistor("RC1", "vcc", "c1", RC)
        .resistor("RC2", "vcc", "c2", RC)
        .bjt("Q1", model, "c1", "b1", "e")
        .bjt("Q2", model, "c2", "b2", "e")
        .isource("ITAIL", "e", "vee", 2e-3);
    // Drive 1: one input source, split ±½ by two ideal voltage-controlled sources (vid = VIN).
    const c = base()
      .vsource("VIN", "in", "gnd", 0, 1)
      .resistor("RIN", "in", "gnd", 1e6)
      .vcvs("EP", "b1", "gnd", "in", "gnd", 0.5)
      .vcvs("EM", "b2", "gnd", "in", "gnd", -0.5)
      .gain("diff", "VIN", "c2", "c1")
      .build();
    const op = solve(c);
    const q1 = bjtAt(op, "Q1");
    const q2 = bjtAt(op, "Q2");
    expect(relErr(q1.collectorCurrent, q2.collectorCurrent)).toBeLessThan(1e-9);
    const g = gainOf(c, op);
    // Half-circuit: the tail node is an exact AC ground for a symmetric pair under a balanced drive.
    expect(record("diff pair vs tool", relErr(g.midband, q1.transconductance * par(RC, q1.outputResistance)))).toBeLessThan(MODEL_EXACT);
    // Hand: IC = α·ITAIL/2, ro ≈ VA/IC.
    const ic = ((BETA / (BETA + 1)) * 2e-3) / 2;
    expect(record("diff pair hand", relErr(g.midband, (ic / VT) * par(RC, VA / ic)))).toBeLessThan(HAND);
    // Drive 2: one source on the first base, the second base grounded: vid = VIN, plus a common
    // mode of VIN/2 that an ideal tail source rejects, so the differential gain is the same.
    const c2 = base().vsource("VIN", "b1", "gnd", 0, 1).vsource("VB2", "b2", "gnd", 0).gain("diff", "VIN", "c2", "c1").build();
    const op2 = solve(c2);
    const g2 = gainOf(c2, op2);
    expect(record("diff pair single-ended drive", relErr(g2.midband, bjtAt(op2, "Q1").transconductance * par(RC, bjtAt(op2, "Q1").outputResistance)))).toBeLessThan(MODEL_EXACT);
  });
});

describe("MOS stages", () => {
  const KP = 200e-6;
  const W = 10e-6;
  const L = 1e-6;
  const BETA = (KP * W) / L;
  const VT0 = 0.7;

  it("common source, source grounded: −gm(RD‖ro)", () => {
    const RD = 20e3;
    const LAMBDA = 0.02;
    const VG = 1.2;
    const c = circuit("cs")
      .vsource("VDD", "vdd", "gnd", 10)
      .vsource("VIN", "g", "gnd", VG, 1)
      .resistor("RD", "vdd", "d", RD)
      .mos("M1", mosModel("moist-n", "nmos", { kPrime: KP, width: W, length: L, threshold: VT0, lambda: LAMBDA }), "d", "g", "gnd")
      .gain("cs", "VIN", "d")
      .build();
    const op = solve(c);
    const m = mosAt(op, "M1");
    expect(m.region).toBe("saturation");
    const g = gainOf(c, op);
    expect(record("CS vs tool", relErr(g.midband, -m.transconductance * par(RD, m.outputResistance)))).toBeLessThan(MODEL_EXACT);
    // Hand: ID = ½β·Vov²·(1 + λ·VDS) with VDS = VDD − ID·RD (linear in ID); gm = 2ID/Vov; ro ≈ 1/(λ·ID) (textbook).
    const vov = VG - VT0;
    const a = 0.5 * BETA * vov * vov;
    const id = (a * (1 + LAMBDA * 10)) / (1 + a * LAMBDA * RD);
    expect(record("CS hand", relErr(g.midband, -((2 * id) / vov) * par(RD, 1 / (LAMBDA * id))))).toBeLessThan(HAND);
    expect(g.inputImpedance).toBe(Infinity); // gate draws no current
    expect(record("CS Zout = RD‖ro", relErr(g.outputImpedance, par(RD, m.outputResistance)))).toBeLessThan(MODEL_EXACT);
  });

  it("common source with source degeneration: −gm·RD/(1 + gm·RS)", () => {
    const RD = 10e3;
    const RS = 1e3;
    const VG = 2;
    const build = (lambda: number) =>
      circuit("cs-deg")
        .vsource("VDD", "vdd", "gnd", 12)
        .vsource("VIN", "g", "gnd", VG, 1)
        .resistor("RD", "vdd", "d", RD)
        .resistor("RS", "s", "gnd", RS)
        .mos("M1", mosModel("moist-n", "nmos", { kPrime: KP, width: W, length: L, threshold: VT0, lambda }), "d", "g", "s")
        .gain("cs-deg", "VIN", "d")
        .build();
    const c = build(0);
    const op = solve(c);
    const m = mosAt(op, "M1");
    const g = gainOf(c, op);
    // (1) exact for λ = 0, body tied to source.
    expect(record("CS-deg vs tool", relErr(g.midband, (-m.transconductance * RD) / (1 + m.transconductance * RS)))).toBeLessThan(MODEL_EXACT);
    // (2) hand: the square-law quadratic (exact for this model with λ = 0).
    const h = sourceBias(VG, RS, BETA, VT0);
    expect(record("CS-deg hand", relErr(g.midband, (-h.gm * RD) / (1 + h.gm * RS)))).toBeLessThan(HAND);
    // With λ: −gm·RD/(1 + gm·RS + (RD + RS)/ro), exact for the square law with ro.
    const c2 = build(0.03);
    const op2 = solve(c2);
    const m2 = mosAt(op2, "M1");
    expect(record("CS-deg with ro vs tool", relErr(gainOf(c2, op2).midband, (-m2.transconductance * RD) / (1 + m2.transconductance * RS + (RD + RS) / m2.outputResistance)))).toBeLessThan(MODEL_EXACT);
  });

  it("common gate, body at ground: (gm + gmb + 1/ro)·(RD‖ro) (→ (gm+gmb)·RD)", () => {
    const RD = 10e3;
    const RS = 2e3;
    const GAMMA = 0.4;
    const VG = 3;
    const build = (lambda: number) =>
      circuit("cg")
        .vsource("VDD", "vdd", "gnd", 12)
        .vsource("VG", "g", "gnd", VG)
        .vsource("VIN", "in", "gnd", 0, 1)
        .capacitor("CIN", "in", "s", 100e-6)
        .resistor("RS", "s", "gnd", RS)
        .resistor("RD", "vdd", "d", RD)
        .mos("M1", mosModel("vane-n", "nmos", { kPrime: KP, width: W, length: L, threshold: VT0, lambda, bodyEffect: GAMMA }), "d", "g", "s", "gnd")
        .gain("cg", "VIN", "d")
        .build();
    const c = build(0);
    const op = solve(c);
    const m = mosAt(op, "M1");
    expect(m.bodyTransconductance).toBeGreaterThan(0);
    const g = gainOf(c, op);
    expect(record("CG (gm+gmb)RD vs tool", relErr(g.midband, (m.transconductance + m.bodyTransconductance) * RD))).toBeLessThan(MODEL_EXACT);
    // Input impedance: RS ‖ 1/(gm + gmb) (λ = 0).
    expect(record("CG Zin", relErr(g.inputImpedance, par(RS, 1 / (m.transconductance + m.bodyTransconductance))))).toBeLessThan(MODEL_EXACT);
    const h = sourceBias(VG, RS, BETA, VT0, GAMMA);
    expect(record("CG hand", relErr(g.midband, (h.gm + h.gmb) * RD))).toBeLessThan(HAND);
    const c2 = build(0.02);
    const op2 = solve(c2);
    const m2 = mosAt(op2, "M1");
    expect(record("CG with ro vs tool", relErr(gainOf(c2, op2).midband, (m2.transconductance + m2.bodyTransconductance + 1 / m2.outputResistance) * par(RD, m2.outputResistance)))).toBeLessThan(MODEL_EXACT);
  });

  it("source follower with body effect: gm·RS/(1 + (gm + gmb)·RS)", () => {
    const RS = 2e3;
    const GAMMA = 0.5;
    const VG = 4;
    const c = circuit("sf")
      .vsource("VDD", "vdd", "gnd", 10)
      .vsource("VIN", "g", "gnd", VG, 1)
      .resistor("RS", "s", "gnd", RS)
      .mos("M1", mosModel("probe-n", "nmos", { kPrime: KP, width: W, length: L, threshold: VT0, bodyEffect: GAMMA }), "vdd", "g", "s", "gnd")
      .gain("sf", "VIN", "s")
      .build();
    const op = solve(c);
    const m = mosAt(op, "M1");
    const g = gainOf(c, op);
    expect(record("SF vs tool", relErr(g.midband, (m.transconductance * RS) / (1 + (m.transconductance + m.bodyTransconductance) * RS)))).toBeLessThan(MODEL_EXACT);
    // Output impedance RS ‖ 1/(gm + gmb).
    expect(record("SF Zout", relErr(g.outputImpedance, par(RS, 1 / (m.transconductance + m.bodyTransconductance))))).toBeLessThan(MODEL_EXACT);
    const h = sourceBias(VG, RS, BETA, VT0, GAMMA);
    expect(record("SF hand", relErr(g.midband, (h.gm * RS) / (1 + (h.gm + h.gmb) * RS)))).toBeLessThan(HAND);
    // Without body effect the follower gain would be larger: the body term matters here.
    expect(g.midband).toBeLessThan((m.transconductance * RS) / (1 + m.transconductance * RS) - 0.01);
  });

  it("prints the relative errors of the closed-form checks (for the stage report)", () => {
    if (process.env.OPGATE_SMALLSIGNAL_REPORT) console.log(JSON.stringify(report, null, 1));
    expect(Object.keys(report).length).toBeGreaterThan(20);
  });
});
