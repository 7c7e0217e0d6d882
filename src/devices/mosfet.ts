// MOSFET, NMOS and PMOS through one polarity sign p (+1 NMOS, −1 PMOS): the equations see
// p·V and their drain current leaves as p·I. Square law in normalised terms (vgs, vds, vbs):
//   Vt  = Vt0 + γ(√(2φF + VSB) − √(2φF))      (sqrt argument clamped ≥ 0)
//   Vov = vgs − Vt,  β = k'·W/L
//   cutoff     Vov ≤ 0:     ID = 0
//   triode     vds < Vov:   ID = β(Vov·vds − vds²/2)(1 + λ·vds)
//   saturation vds ≥ Vov:   ID = ½β·Vov²(1 + λ·vds)     (continuous with triode at the edge)
// plus MOS_LEAK_CONDUCTANCE drain–source in every region. The device is symmetric: when vds < 0
// drain and source swap roles (the same equations with vgd, −vds, vbd) and the current reverses.
import type { Mosfet, MosfetModel } from "../circuit/types.js";
import type { MosPoint, MosRegion } from "../solve/types.js";
import {
  limitStep,
  MOS_VDS_STEP_MIN,
  MOS_VDS_STEP_RELATIVE,
  MOS_VGS_STEP_MIN,
  MOS_VGS_STEP_RELATIVE,
} from "../solve/limiting.js";
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
import { MODEL_TEMPERATURE, powerLawAt } from "./thermal.js";

/**
 * Drain–source conductance present in every region, S. It keeps a cut-off device's drain node
 * from making the matrix singular; 1e-12 S (1 pA per volt) is invisible to any review rule.
 */
export const MOS_LEAK_CONDUCTANCE = 1e-12;

interface MosEval {
  id: number; // normalised current into the drain
  gm: number; // ∂ID/∂vgs
  gds: number; // ∂ID/∂vds
  gmb: number; // ∂ID/∂vbs
  vt: number; // normalised threshold in the effective orientation
  vov: number;
  region: MosRegion;
}

export function mosfet(c: Mosfet, ctx: SetupContext): DeviceInstance {
  const model = ctx.model(c.model);
  if (!model || model.kind !== c.kind) {
    throw new DeviceSetupError(`${c.kind} ${c.id} names model \`${c.model}\`, which is not an ${c.kind} model`, [c.id]);
  }
  const m: MosfetModel = model;
  if (!(m.length > 0) || !(m.width > 0)) throw new DeviceSetupError(`${c.kind} ${c.id}: model \`${c.model}\` needs a positive width and length`, [c.id]);
  const p = c.kind === "nmos" ? 1 : -1;
  const dr = terminal(ctx, "drain", c.pins.drain);
  const gt = terminal(ctx, "gate", c.pins.gate);
  const sr = terminal(ctx, "source", c.pins.source);
  const bd = terminal(ctx, "body", c.pins.body);
  const t = ctx.temperature;
  const vt0 = p * m.threshold.typ + m.thresholdTempco * (t - MODEL_TEMPERATURE);
  const beta = (powerLawAt(m.kPrime.typ, t, m.kPrimeExponent) * m.width) / m.length;
  const lambda = m.lambda.typ;
  const gamma = m.bodyEffect;
  const phi2 = Math.max(m.surfacePotential, 0);
  const sqrtPhi2 = Math.sqrt(phi2);
  const idx: number[] = [dr.index, gt.index, sr.index, bd.index];
  // Pin Jacobian (rows G and B stay zero: no gate or body current) and companion currents as
  // plain arrays (a typed array of more than 64 bytes costs far more to create, once per device
  // per solve); the matrix offsets (for matrix size offN) and the step-limiting state as small
  // typed arrays, so the Newton loop stores no boxed doubles.
  const g: number[] = new Array<number>(16).fill(0);
  const ieq: number[] = new Array<number>(4).fill(0);
  const off = new Int32Array(16);
  let offN = -1;
  const e: MosEval = { id: 0, gm: 0, gds: 0, gmb: 0, vt: 0, vov: 0, region: "cutoff" };
  /** [0] vgs and [1] vds of the last evaluation (limiting reference). */
  const last = new Float64Array(2);

  /** Square law in the forward orientation (vds ≥ 0). */
  const forward = (vgs: number, vds: number, vbs: number): void => {
    const arg = phi2 - vbs;
    let vt = vt0;
    let dVtdVbs = 0;
    if (gamma !== 0) {
      const s = Math.sqrt(Math.max(arg, 0));
      vt = vt0 + gamma * (s - sqrtPhi2);
      dVtdVbs = s > 0 ? -gamma / (2 * s) : 0;
    }
    const vov = vgs - vt;
    e.vt = vt;
    e.vov = vov;
    if (vov <= 0) {
      e.id = 0;
      e.gm = 0;
      e.gds = 0;
      e.region = "cutoff";
    } else {
      const clm = 1 + lambda * vds;
      if (vds < vov) {
        const core = vov * vds - 0.5 * vds * vds;
        e.id = beta * core * clm;
        e.gm = beta * vds * clm;
        e.gds = beta * ((vov - vds) * clm + core * lambda);
        e.region = "triode";
      } else {
        const core = 0.5 * vov * vov;
        e.id = beta * core * clm;
        e.gm = beta * vov * clm;
        e.gds = beta * core * lambda;
        e.region = "saturation";
      }
    }
    e.gmb = -e.gm * dVtdVbs;
  };

  /** Either orientation; partials always with respect to the pin-referred vgs, vds, vbs. */
  const evaluate = (vgs: number, vds: number, vbs: number): void => {
    if (vds >= 0) {
      forward(vgs, vds, vbs);
    } else {
      // Source and drain swap: I(vgs, vds, vbs) = −f(vgs − vds, −vds, vbs − vds).
      forward(vgs - vds, -vds, vbs - vds);
      const fg = e.gm;
      const fd = e.gds;
      const fb = e.gmb;
      e.id = -e.id;
      e.gm = -fg;
      e.gmb = -fb;
      e.gds = fg + fd + fb;
    }
    e.id += MOS_LEAK_CONDUCTANCE * vds;
    e.gds += MOS_LEAK_CONDUCTANCE;
  };

  /** Pin Jacobian over (D, G, S, B); only drain and source carry current. */
  const fillJacobian = (): void => {
    const gs = -(e.gm + e.gds + e.gmb);
    g[0] = e.gds;
    g[1] = e.gm;
    g[2] = gs;
    g[3] = e.gmb;
    g[8] = -e.gds;
    g[9] = -e.gm;
    g[10] = -gs;
    g[11] = -e.gmb;
  };

  return {
    id: c.id,
    kind: c.kind,
    terminals: [dr, gt, sr, bd],
    nonlinear: true,
    stampIndices: idx,
    dcLinks: [[dr, sr]],
    voltageLinks: [],
    reset() {
      last[0] = 0;
      last[1] = 0;
    },
    stampNonlinear(x: Float64Array, mt: StampTarget, st: IterationState) {
      const vs = volt(x, sr.index);
      let vgs = st.init ? 0 : p * (volt(x, gt.index) - vs);
      let vds = st.init ? 0 : p * (volt(x, dr.index) - vs);
      const vbs = st.init ? 0 : p * (volt(x, bd.index) - vs);
      if (!st.init) {
        const vgsLast = last[0]!;
        const vdsLast = last[1]!;
        const vgsL = limitStep(vgs, vgsLast, vgsLast - vt0, MOS_VGS_STEP_MIN, MOS_VGS_STEP_RELATIVE);
        const vdsL = limitStep(vds, vdsLast, vdsLast, MOS_VDS_STEP_MIN, MOS_VDS_STEP_RELATIVE);
        if (vgsL !== vgs || vdsL !== vds) st.limited = true;
        vgs = vgsL;
        vds = vdsL;
      }
      last[0] = vgs;
      last[1] = vds;
      evaluate(vgs, vds, vbs);
      fillJacobian();
      const id = p * (e.id - e.gm * vgs - e.gds * vds - e.gmb * vbs);
      ieq[0] = id;
      ieq[1] = 0;
      ieq[2] = -id;
      ieq[3] = 0;
      if (offN !== mt.n) {
        pinOffsets(idx, mt.n, off);
        offN = mt.n;
      }
      stampPinsAt(mt, idx, off, g, ieq);
    },
    point(x): MosPoint {
      const vs = volt(x, sr.index);
      const vgsRaw = volt(x, gt.index) - vs;
      const vdsRaw = volt(x, dr.index) - vs;
      const vbsRaw = volt(x, bd.index) - vs;
      evaluate(p * vgsRaw, p * vdsRaw, p * vbsRaw);
      fillJacobian();
      return {
        kind: c.kind,
        id: e.id,
        vgs: vgsRaw,
        vds: vdsRaw,
        vov: e.vov,
        vth: p * e.vt,
        region: e.region,
        headroom: Math.abs(vdsRaw) - Math.abs(e.vov), // |VDS| − |Vov| (DESIGN.md §3)
        power: p * vdsRaw * e.id,
        gm: e.gm,
        gmb: e.gmb,
        ro: 1 / e.gds,
        linear: { pins: [dr.node, gt.node, sr.node, bd.node], y: g.slice() },
      };
    },
  };
}
