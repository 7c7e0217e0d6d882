// Bipolar transistor, NPN and PNP through one polarity sign p (+1 NPN, −1 PNP): the equations
// see polarity-normalised junction voltages p·V and their currents leave as p·I.
//
// Ebers–Moll transport model with the Early effect on the forward transport current
// (DESIGN.md §3), in normalised terms with vbe = p(VB − VE), vbc = p(VB − VC):
//   IF = IS(exp(vbe/VT) − 1),  IR = IS(exp(vbc/VT) − 1)
//   IC = IF·(1 − vbc/VA) − IR·(1 + 1/βR)        (into the collector)
//   IB = IF/βF + IR/βR                          (into the base)
//   IE = IC + IB                                (out of the emitter)
// plus JUNCTION_LEAK_CONDUCTANCE across each junction. VA = Infinity means no Early effect.
// The model's `beta` is the DC gain IC/IB at its test condition `betaAt` (a datasheet's hFE);
// βF is the value that reproduces it there (forwardBetaFor), then drifts with temperature.
import type { Bjt, BjtModel } from "../circuit/types.js";
import type { BjtPoint, BjtRegion } from "../solve/types.js";
import { criticalVoltage, JUNCTION_REFERENCE_FLOOR, limitJunction, warmJunctionVoltage } from "../solve/limiting.js";
import {
  DeviceSetupError,
  NO_LINKS,
  pinOffsets,
  terminal,
  volt,
  type DeviceCapacitance,
  type DeviceInstance,
  type IterationState,
  type SetupContext,
  type StampTarget,
  type Terminal,
} from "./device.js";
import { JUNCTION_LEAK_CONDUCTANCE, junction, junctionOut } from "./junction.js";
import { MODEL_TEMPERATURE, relativeDriftAt, saturationCurrentAt, thermalVoltage } from "./thermal.js";

/** A junction is taken as conducting at or above this polarity-normalised voltage (DESIGN.md §3, common practice). */
export const BJT_CONDUCTION_VOLTAGE = 0.4;

/**
 * One transistor of a plan. A class with shared prototype methods rather than an object of
 * closures: a plan builds every device afresh on each solve, and this makes that one
 * allocation plus its small arrays. The evaluation scratch lives in fields (ic … ibVbc).
 */
class BjtInstance implements DeviceInstance {
  readonly nonlinear = true;
  readonly terminals: readonly Terminal[];
  readonly stampIndices: readonly number[];
  readonly dcLinks: readonly (readonly [Terminal, Terminal])[];
  readonly voltageLinks = NO_LINKS;
  // Pin Jacobian, companion currents and the matrix offsets of the Jacobian (for matrix size
  // offN) as plain arrays: array literals are far cheaper to create than typed arrays, once per
  // device per solve, and hold their numbers unboxed all the same.
  private readonly g: number[] = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  private readonly ieq: number[] = [0, 0, 0];
  private readonly off: number[] = [-1, -1, -1, -1, -1, -1, -1, -1, -1];
  private offN = -1;
  // vbe and vbc of the last evaluation (limiting reference): double fields, which V8 updates in
  // place (unlike a closure's variables), so the Newton loop allocates nothing. Each starts as
  // a number: a field declared without a value starts as undefined, and V8 then boxes every
  // double stored in it (one allocation per stamp).
  private lastVbe = 0;
  private lastVbc = 0;
  /** The next pass evaluates at lastVbe/lastVbc as primed from a warm start, not at x. */
  private primed = false;
  readonly warmSize = 2;
  // Scratch of one evaluation: currents and partial derivatives in normalised terms.
  private ic = 0;
  private ib = 0;
  private icVbe = 0; // ∂IC/∂vbe
  private icVbc = 0; // ∂IC/∂vbc
  private ibVbe = 0;
  private ibVbc = 0;

  // Model constants as fields declared with a number. A parameter property starts as undefined,
  // so V8 would keep it as a boxed value, and the Newton loop, mixing it with computed doubles
  // (vbe = vcrit on a first pass), would box a double per stamp.
  private readonly p: number = 0;
  private readonly saturationEdge: number = 0;
  private readonly vt: number = 0;
  private readonly is: number = 0;
  private readonly betaF: number = 0;
  private readonly betaR: number = 0;
  private readonly va: number = 0;
  private readonly vcrit: number = 0;

  constructor(
    readonly id: string,
    readonly kind: Bjt["kind"],
    p: number,
    private readonly col: Terminal,
    private readonly base: Terminal,
    private readonly emi: Terminal,
    saturationEdge: number,
    vt: number,
    is: number,
    betaF: number,
    betaR: number,
    va: number,
    vcrit: number,
  ) {
    this.p = p;
    this.saturationEdge = saturationEdge;
    this.vt = vt;
    this.is = is;
    this.betaF = betaF;
    this.betaR = betaR;
    this.va = va;
    this.vcrit = vcrit;
    this.terminals = [col, base, emi];
    this.stampIndices = [col.index, base.index, emi.index];
    this.dcLinks = [
      [base, emi],
      [base, col],
    ];
    this.lastVbe = vcrit;
  }

  private evaluate(vbe: number, vbc: number): void {
    const { is, vt, va, betaF, betaR } = this;
    const gl = JUNCTION_LEAK_CONDUCTANCE;
    junction(vbe, is, vt);
    const iF = junctionOut[0]!;
    const gF = junctionOut[1]!;
    junction(vbc, is, vt);
    const iR = junctionOut[0]!;
    const gR = junctionOut[1]!;
    const early = 1 - vbc / va;
    const kR = 1 + 1 / betaR;
    this.ic = iF * early - iR * kR - gl * vbc;
    this.ib = iF / betaF + iR / betaR + gl * (vbe + vbc);
    this.icVbe = gF * early;
    this.icVbc = -iF / va - gR * kR - gl;
    this.ibVbe = gF / betaF + gl;
    this.ibVbc = gR / betaR + gl;
  }

  /** Pin Jacobian (C, B, E) from the normalised partials; vbe = VB − VE, vbc = VB − VC. */
  private fillJacobian(): void {
    const g = this.g;
    // row C
    g[0] = -this.icVbc;
    g[1] = this.icVbe + this.icVbc;
    g[2] = -this.icVbe;
    // row B
    g[3] = -this.ibVbc;
    g[4] = this.ibVbe + this.ibVbc;
    g[5] = -this.ibVbe;
    // row E = −(C + B)
    g[6] = -(g[0]! + g[3]!);
    g[7] = -(g[1]! + g[4]!);
    g[8] = -(g[2]! + g[5]!);
  }

  /** The transport currents IF and IR at x (normalised, leakage excluded). */
  saveWarm(x: Float64Array, out: Float64Array, at: number): void {
    const bi = this.base.index;
    const vb = bi >= 0 ? x[bi]! : 0;
    const vbe = this.p * (vb - (this.emi.index >= 0 ? x[this.emi.index]! : 0));
    const vbc = this.p * (vb - (this.col.index >= 0 ? x[this.col.index]! : 0));
    junction(vbe, this.is, this.vt);
    out[at] = junctionOut[0]!;
    junction(vbc, this.is, this.vt);
    out[at + 1] = junctionOut[0]!;
  }

  prime(x: Float64Array, saved?: Float64Array, at = 0): void {
    const bi = this.base.index;
    const vb = bi >= 0 ? x[bi]! : 0;
    const vbe = this.p * (vb - (this.emi.index >= 0 ? x[this.emi.index]! : 0));
    const vbc = this.p * (vb - (this.col.index >= 0 ? x[this.col.index]! : 0));
    this.lastVbe = saved ? warmJunctionVoltage(vbe, saved[at]!, this.is, this.vt, this.vcrit) : vbe;
    // A conducting base–collector junction (saturation) keeps VCE rather than its current: both
    // junctions move alike with temperature, while the reverse current IR, set by the excess base
    // drive, can change by a large factor (first steps moved collectors by 0.5 V below 0 °C).
    const saturated = vbc > this.vcrit - JUNCTION_REFERENCE_FLOOR * this.vt;
    this.lastVbc = !saved ? vbc : saturated ? this.lastVbe - (vbe - vbc) : warmJunctionVoltage(vbc, saved[at + 1]!, this.is, this.vt, this.vcrit);
    this.primed = this.lastVbe !== vbe || this.lastVbc !== vbc;
  }

  reset(): void {
    this.lastVbe = this.vcrit;
    this.lastVbc = 0;
    this.primed = false;
  }

  stampNonlinear(x: Float64Array, mt: StampTarget, st: IterationState): void {
    const { p, vt, vcrit } = this;
    const ci = this.col.index;
    const bi = this.base.index;
    const ei = this.emi.index;
    let vbe: number;
    let vbc: number;
    if (st.init) {
      vbe = vcrit;
      vbc = 0;
    } else if (this.primed) {
      // First pass of a warm start: at the primed voltages, which are not x's (so no convergence on it).
      vbe = this.lastVbe;
      vbc = this.lastVbc;
      this.primed = false;
      st.limited = true;
    } else {
      const vb = bi >= 0 ? x[bi]! : 0;
      const vbeNew = p * (vb - (ei >= 0 ? x[ei]! : 0));
      const vbcNew = p * (vb - (ci >= 0 ? x[ci]! : 0));
      vbe = limitJunction(vbeNew, this.lastVbe, vt, vcrit);
      vbc = limitJunction(vbcNew, this.lastVbc, vt, vcrit);
      if (vbe !== vbeNew || vbc !== vbcNew) st.limited = true;
    }
    this.lastVbe = vbe;
    this.lastVbc = vbc;
    this.evaluate(vbe, vbc);
    // The pin Jacobian of fillJacobian, in locals (the record's copy is made by point()).
    const { icVbe, icVbc, ibVbe, ibVbc } = this;
    const g0 = -icVbc;
    const g1 = icVbe + icVbc;
    const g2 = -icVbe;
    const g3 = -ibVbc;
    const g4 = ibVbe + ibVbc;
    const g5 = -ibVbe;
    const ic = p * (this.ic - icVbe * vbe - icVbc * vbc);
    const ib = p * (this.ib - ibVbe * vbe - ibVbc * vbc);
    if (this.offN !== mt.n) {
      pinOffsets(this.stampIndices, mt, this.off);
      this.offN = mt.n;
    }
    // stampPinsAt unrolled: the same additions in the same order (row by row, column by
    // column), so pins sharing a node sum exactly as before.
    const a = mt.a;
    const off = this.off;
    let o = off[0]!;
    if (o >= 0) a[o]! += g0;
    if ((o = off[1]!) >= 0) a[o]! += g1;
    if ((o = off[2]!) >= 0) a[o]! += g2;
    if ((o = off[3]!) >= 0) a[o]! += g3;
    if ((o = off[4]!) >= 0) a[o]! += g4;
    if ((o = off[5]!) >= 0) a[o]! += g5;
    if ((o = off[6]!) >= 0) a[o]! += -(g0 + g3);
    if ((o = off[7]!) >= 0) a[o]! += -(g1 + g4);
    if ((o = off[8]!) >= 0) a[o]! += -(g2 + g5);
    const b = mt.b;
    if (ci >= 0) b[ci]! -= ic;
    if (bi >= 0) b[bi]! -= ib;
    if (ei >= 0) b[ei]! -= -(ic + ib);
  }

  point(x: Float64Array): BjtPoint {
    const { p, col, base, emi, saturationEdge } = this;
    const vb = volt(x, base.index);
    const vbeRaw = vb - volt(x, emi.index);
    const vceRaw = volt(x, col.index) - volt(x, emi.index);
    const vbcRaw = vb - volt(x, col.index);
    this.evaluate(p * vbeRaw, p * vbcRaw);
    this.fillJacobian();
    const ic = this.ic;
    const ib = this.ib;
    const ie = ic + ib;
    const vbeN = p * vbeRaw;
    const vbcN = p * vbcRaw;
    const vceN = p * vceRaw;
    // Hybrid-π at the point, VCE held constant (so dvbc = dvbe): textbook definitions.
    const gm = this.icVbe + this.icVbc; // ∂IC/∂VBE at constant VCE
    const gpi = this.ibVbe + this.ibVbc; // ∂IB/∂VBE at constant VCE
    const go = -this.icVbc; // ∂IC/∂VCE at constant VBE
    return {
      kind: this.kind,
      collectorCurrent: ic,
      baseCurrent: ib,
      emitterCurrent: ie,
      baseEmitterVoltage: vbeRaw,
      collectorEmitterVoltage: vceRaw,
      region: bjtRegion(vbeN, vbcN, vceN, saturationEdge),
      headroom: Math.abs(vceRaw) - saturationEdge,
      // Σ V·I over the pins with the emitter as reference (normalised terms are polarity-free).
      power: vceN * ic + vbeN * ib,
      transconductance: gm,
      inputResistance: 1 / gpi,
      emitterResistance: 1 / (gm + gpi),
      outputResistance: 1 / go,
      linear: { pins: [col.node, base.node, emi.node], y: this.g.slice() },
    };
  }
}

export function bjt(c: Bjt, ctx: SetupContext): DeviceInstance {
  const model = ctx.model(c.model);
  if (!model || model.kind !== c.kind) {
    throw new DeviceSetupError(`${c.kind} ${c.id} names model \`${c.model}\`, which is not an ${c.kind} model`, [c.id]);
  }
  const m: BjtModel = model;
  const p = c.kind === "npn" ? 1 : -1;
  const col = terminal(ctx, "collector", c.pins.collector);
  const base = terminal(ctx, "base", c.pins.base);
  const emi = terminal(ctx, "emitter", c.pins.emitter);
  const t = ctx.temperature;
  const vt = thermalVoltage(t);
  const is = saturationCurrentAt(m.saturationCurrent.typ, t, 1, m.drift);
  const betaF0 = forwardBetaFor(m.beta.typ, m.betaAt, m.saturationCurrent.typ, thermalVoltage(MODEL_TEMPERATURE), m.reverseBeta.typ, m.earlyVoltage.typ);
  const betaF = relativeDriftAt(betaF0, t, m.betaDrift);
  const vcrit = criticalVoltage(vt, is);
  return new BjtInstance(c.id, c.kind, p, col, base, emi, m.saturationEdge, vt, is, betaF, m.reverseBeta.typ, m.earlyVoltage.typ, vcrit);
}

/** Newton steps for the VBE of the beta test condition; it converges in about five from the exponential law. */
const BETA_TEST_ITERATIONS = 50;

/**
 * βF of the transport model such that the DC current gain IC/IB equals `beta` at the test
 * condition (polarity-normalised VCE and IC), at the model temperature, as a datasheet states hFE.
 * IC does not depend on βF, so VBE is found first (Newton on IC(VBE) = IC at that VCE, every term
 * of the model included), then IB = IC/beta gives βF = IF / (IC/beta − IR/βR − leakage).
 * Without this, the Early factor (1 − VBC/VA) would put the gain at a real bias point some
 * percent above the datasheet value.
 */
export function forwardBetaFor(
  beta: number,
  at: { readonly collectorEmitterVoltage: number; readonly collectorCurrent: number },
  is: number,
  vt: number,
  betaR: number,
  va: number,
): number {
  const vce = at.collectorEmitterVoltage;
  const ic = at.collectorCurrent;
  const gl = JUNCTION_LEAK_CONDUCTANCE;
  const kR = 1 + 1 / betaR;
  let vbe = vt * Math.log1p(ic / is);
  let iF = 0;
  let iR = 0;
  for (let k = 0; k <= BETA_TEST_ITERATIONS; k++) {
    const vbc = vbe - vce;
    junction(vbe, is, vt);
    iF = junctionOut[0]!;
    const gF = junctionOut[1]!;
    junction(vbc, is, vt);
    iR = junctionOut[0]!;
    const gR = junctionOut[1]!;
    if (k === BETA_TEST_ITERATIONS) break;
    const early = 1 - vbc / va;
    const f = iF * early - iR * kR - gl * vbc - ic;
    const step = f / (gF * early - iF / va - gR * kR - gl);
    vbe -= step;
    if (Math.abs(step) < 1e-15) {
      k = BETA_TEST_ITERATIONS - 1; // one more pass evaluates the currents at the final VBE
    }
  }
  const ibRest = iR / betaR + gl * (2 * vbe - vce);
  const ibForward = ic / beta - ibRest;
  return ibForward > 0 ? iF / ibForward : beta;
}

/** Region on polarity-normalised voltages (DESIGN.md §3). */
export function bjtRegion(vbe: number, vbc: number, vce: number, saturationEdge: number): BjtRegion {
  const be = vbe >= BJT_CONDUCTION_VOLTAGE;
  const bc = vbc >= BJT_CONDUCTION_VOLTAGE;
  if (!be) return bc ? "reverse" : "cutoff";
  if (vce < saturationEdge) return "saturation";
  return "active";
}

/**
 * The hybrid-π capacitances at the operating point (textbook: fT = gm / (2π·(Cπ + Cμ)), so
 * Cπ = gm/(2π·fT) − Cμ). Each is absent unless the model gives it; Cπ is not negative (an fT
 * too high for the given Cμ leaves Cπ at 0).
 */
export function bjtCapacitances(c: Bjt, model: BjtModel, point: BjtPoint): DeviceCapacitance[] {
  const out: DeviceCapacitance[] = [];
  const cmu = model.baseCollectorCapacitance ?? 0;
  if (model.transitFrequency !== undefined && point.transconductance > 0) {
    const cpi = point.transconductance / (2 * Math.PI * model.transitFrequency) - cmu;
    if (cpi > 0) out.push({ device: c.id, between: "base–emitter", a: c.pins.base, b: c.pins.emitter, value: cpi });
  }
  if (cmu > 0) out.push({ device: c.id, between: "base–collector", a: c.pins.base, b: c.pins.collector, value: cmu });
  return out;
}
