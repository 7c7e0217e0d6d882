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
import type { Bjt, BjtModel } from "../circuit/types.js";
import type { BjtPoint, BjtRegion } from "../solve/types.js";
import { criticalVoltage, limitJunction } from "../solve/limiting.js";
import {
  DeviceSetupError,
  pinOffsets,
  stampPinsAt,
  terminal,
  volt,
  type DeviceInstance,
  type IterationState,
  type SetupContext,
  type StampTarget,
} from "./device.js";
import { JUNCTION_LEAK_CONDUCTANCE, junction, junctionOut } from "./junction.js";
import { powerLawAt, saturationCurrentAt, thermalVoltage } from "./thermal.js";

/** A junction is taken as conducting at or above this polarity-normalised voltage (DESIGN.md §3, common practice). */
export const BJT_CONDUCTION_VOLTAGE = 0.4;

/** Scratch for one evaluation: currents and partial derivatives in normalised terms. */
interface BjtEval {
  ic: number;
  ib: number;
  icVbe: number; // ∂IC/∂vbe
  icVbc: number; // ∂IC/∂vbc
  ibVbe: number;
  ibVbc: number;
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
  const is = saturationCurrentAt(m.saturationCurrent.typ, t, m.energyGap, m.saturationCurrentExponent);
  const betaF = powerLawAt(m.beta.typ, t, m.betaExponent);
  const betaR = m.reverseBeta.typ;
  const va = m.earlyVoltage.typ;
  const vcrit = criticalVoltage(vt, is);
  const gl = JUNCTION_LEAK_CONDUCTANCE;
  const idx: number[] = [col.index, base.index, emi.index];
  // Pin Jacobian and companion currents as plain arrays (a typed array of more than 64 bytes
  // costs far more to create, once per device per solve); the matrix offsets of the Jacobian
  // (for matrix size offN) and the limiting state as small typed arrays, so the Newton loop
  // stores no boxed doubles.
  const g: number[] = new Array<number>(9).fill(0);
  const ieq: number[] = new Array<number>(3).fill(0);
  const off = new Int32Array(9);
  let offN = -1;
  const e: BjtEval = { ic: 0, ib: 0, icVbe: 0, icVbc: 0, ibVbe: 0, ibVbc: 0 };
  /** [0] vbe and [1] vbc of the last evaluation (limiting reference). */
  const last = Float64Array.of(vcrit, 0);

  const evaluate = (vbe: number, vbc: number): void => {
    junction(vbe, is, vt);
    const iF = junctionOut[0]!;
    const gF = junctionOut[1]!;
    junction(vbc, is, vt);
    const iR = junctionOut[0]!;
    const gR = junctionOut[1]!;
    const early = 1 - vbc / va;
    const kR = 1 + 1 / betaR;
    e.ic = iF * early - iR * kR - gl * vbc;
    e.ib = iF / betaF + iR / betaR + gl * (vbe + vbc);
    e.icVbe = gF * early;
    e.icVbc = -iF / va - gR * kR - gl;
    e.ibVbe = gF / betaF + gl;
    e.ibVbc = gR / betaR + gl;
  };

  /** Pin Jacobian (C, B, E) from the normalised partials; vbe = VB − VE, vbc = VB − VC. */
  const fillJacobian = (): void => {
    // row C
    g[0] = -e.icVbc;
    g[1] = e.icVbe + e.icVbc;
    g[2] = -e.icVbe;
    // row B
    g[3] = -e.ibVbc;
    g[4] = e.ibVbe + e.ibVbc;
    g[5] = -e.ibVbe;
    // row E = −(C + B)
    g[6] = -(g[0]! + g[3]!);
    g[7] = -(g[1]! + g[4]!);
    g[8] = -(g[2]! + g[5]!);
  };

  return {
    id: c.id,
    kind: c.kind,
    terminals: [col, base, emi],
    nonlinear: true,
    stampIndices: idx,
    dcLinks: [
      [base, emi],
      [base, col],
    ],
    voltageLinks: [],
    reset() {
      last[0] = vcrit;
      last[1] = 0;
    },
    stampNonlinear(x: Float64Array, mt: StampTarget, st: IterationState) {
      let vbe: number;
      let vbc: number;
      if (st.init) {
        vbe = vcrit;
        vbc = 0;
      } else {
        const vb = volt(x, base.index);
        const vbeNew = p * (vb - volt(x, emi.index));
        const vbcNew = p * (vb - volt(x, col.index));
        vbe = limitJunction(vbeNew, last[0]!, vt, vcrit);
        vbc = limitJunction(vbcNew, last[1]!, vt, vcrit);
        if (vbe !== vbeNew || vbc !== vbcNew) st.limited = true;
      }
      last[0] = vbe;
      last[1] = vbc;
      evaluate(vbe, vbc);
      fillJacobian();
      const ic = p * (e.ic - e.icVbe * vbe - e.icVbc * vbc);
      const ib = p * (e.ib - e.ibVbe * vbe - e.ibVbc * vbc);
      ieq[0] = ic;
      ieq[1] = ib;
      ieq[2] = -(ic + ib);
      if (offN !== mt.n) {
        pinOffsets(idx, mt.n, off);
        offN = mt.n;
      }
      stampPinsAt(mt, idx, off, g, ieq);
    },
    point(x): BjtPoint {
      const vb = volt(x, base.index);
      const vbeRaw = vb - volt(x, emi.index);
      const vceRaw = volt(x, col.index) - volt(x, emi.index);
      const vbcRaw = vb - volt(x, col.index);
      evaluate(p * vbeRaw, p * vbcRaw);
      fillJacobian();
      const ic = e.ic;
      const ib = e.ib;
      const ie = ic + ib;
      const vbeN = p * vbeRaw;
      const vbcN = p * vbcRaw;
      const vceN = p * vceRaw;
      // Hybrid-π at the point, VCE held constant (so dvbc = dvbe): textbook definitions.
      const gm = e.icVbe + e.icVbc; // ∂IC/∂VBE at constant VCE
      const gpi = e.ibVbe + e.ibVbc; // ∂IB/∂VBE at constant VCE
      const go = -e.icVbc; // ∂IC/∂VCE at constant VBE
      return {
        kind: c.kind,
        ic,
        ib,
        ie,
        vbe: vbeRaw,
        vce: vceRaw,
        region: bjtRegion(vbeN, vbcN, vceN, m.saturationEdge),
        headroom: Math.abs(vceRaw) - m.saturationEdge,
        // Σ V·I over the pins with the emitter as reference (normalised terms are polarity-free).
        power: vceN * ic + vbeN * ib,
        gm,
        rpi: 1 / gpi,
        re: 1 / (gm + gpi),
        ro: 1 / go,
        linear: { pins: [col.node, base.node, emi.node], y: g.slice() },
      };
    },
  };
}

/** Region on polarity-normalised voltages (DESIGN.md §3). */
export function bjtRegion(vbe: number, vbc: number, vce: number, saturationEdge: number): BjtRegion {
  const be = vbe >= BJT_CONDUCTION_VOLTAGE;
  const bc = vbc >= BJT_CONDUCTION_VOLTAGE;
  if (!be) return bc ? "reverse" : "cutoff";
  if (vce < saturationEdge) return "saturation";
  return "active";
}
