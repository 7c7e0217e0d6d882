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
import { MODEL_TEMPERATURE, powerLawAt } from "./thermal.js";

/**
 * Drain–source conductance present in every region, S. It keeps a cut-off device's drain node
 * from making the matrix singular; 1e-12 S (1 pA per volt) is invisible to any review rule.
 */
export const MOS_LEAK_CONDUCTANCE = 1e-12;

/**
 * One transistor of a plan. A class with shared prototype methods rather than an object of
 * closures: a plan builds every device afresh on each solve, and this makes that one
 * allocation plus its small arrays. The evaluation scratch lives in fields (id … region).
 */
class MosInstance implements DeviceInstance {
  readonly nonlinear = true;
  readonly terminals: readonly Terminal[];
  readonly stampIndices: readonly number[];
  readonly dcLinks: readonly (readonly [Terminal, Terminal])[];
  readonly voltageLinks = NO_LINKS;
  // Pin Jacobian (rows G and B stay zero: no gate or body current), companion currents and the
  // matrix offsets (for matrix size offN) as plain arrays: array literals are far cheaper to
  // create than typed arrays, once per device per solve, and hold their numbers unboxed all the same.
  private readonly g: number[] = [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
  private readonly ieq: number[] = [0, 0, 0, 0];
  private readonly off: number[] = [-1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1];
  private offN = -1;
  // vgs and vds of the last evaluation (limiting reference): double fields, which V8 updates in
  // place (unlike a closure's variables), so the Newton loop allocates nothing.
  private lastVgs = 0;
  private lastVds = 0;
  /** The next pass evaluates at lastVgs as primed from a warm start, not at x's vgs. */
  private primed = false;
  readonly warmSize = 1;
  // Scratch of one evaluation.
  private id_ = 0; // normalised current into the drain
  private gm = 0; // ∂ID/∂vgs
  private gds = 0; // ∂ID/∂vds
  private gmb = 0; // ∂ID/∂vbs
  private vt = 0; // normalised threshold in the effective orientation
  private vov = 0;
  private region: MosRegion = "cutoff";

  // Model constants as fields declared with a number. A parameter property starts as undefined,
  // so V8 would keep it as a boxed value, and the Newton loop, mixing it with computed doubles,
  // may box a double per stamp.
  private readonly p: number = 0;
  private readonly vt0: number = 0;
  private readonly kn: number = 0;
  private readonly clmCoeff: number = 0;
  private readonly bodyCoeff: number = 0;
  private readonly twoPhiF: number = 0;
  private readonly sqrtTwoPhiF: number = 0;

  constructor(
    readonly id: string,
    readonly kind: Mosfet["kind"],
    p: number,
    private readonly dr: Terminal,
    private readonly gt: Terminal,
    private readonly sr: Terminal,
    private readonly bd: Terminal,
    vt0: number,
    kn: number,
    clmCoeff: number,
    bodyCoeff: number,
    twoPhiF: number,
    sqrtTwoPhiF: number,
  ) {
    this.p = p;
    this.vt0 = vt0;
    this.kn = kn;
    this.clmCoeff = clmCoeff;
    this.bodyCoeff = bodyCoeff;
    this.twoPhiF = twoPhiF;
    this.sqrtTwoPhiF = sqrtTwoPhiF;
    this.terminals = [dr, gt, sr, bd];
    this.stampIndices = [dr.index, gt.index, sr.index, bd.index];
    this.dcLinks = [[dr, sr]];
  }

  /** Square law in the forward orientation (vds ≥ 0). */
  private forward(vgs: number, vds: number, vbs: number): void {
    const { kn, clmCoeff, bodyCoeff } = this;
    const arg = this.twoPhiF - vbs;
    let vt = this.vt0;
    let dVtdVbs = 0;
    if (bodyCoeff !== 0) {
      const s = Math.sqrt(Math.max(arg, 0));
      vt = this.vt0 + bodyCoeff * (s - this.sqrtTwoPhiF);
      dVtdVbs = s > 0 ? -bodyCoeff / (2 * s) : 0;
    }
    const vov = vgs - vt;
    this.vt = vt;
    this.vov = vov;
    if (vov <= 0) {
      this.id_ = 0;
      this.gm = 0;
      this.gds = 0;
      this.region = "cutoff";
    } else {
      const clm = 1 + clmCoeff * vds;
      if (vds < vov) {
        const core = vov * vds - 0.5 * vds * vds;
        this.id_ = kn * core * clm;
        this.gm = kn * vds * clm;
        this.gds = kn * ((vov - vds) * clm + core * clmCoeff);
        this.region = "triode";
      } else {
        const core = 0.5 * vov * vov;
        this.id_ = kn * core * clm;
        this.gm = kn * vov * clm;
        this.gds = kn * core * clmCoeff;
        this.region = "saturation";
      }
    }
    this.gmb = -this.gm * dVtdVbs;
  }

  /** Either orientation; partials always with respect to the pin-referred vgs, vds, vbs. */
  private evaluate(vgs: number, vds: number, vbs: number): void {
    if (vds >= 0) {
      this.forward(vgs, vds, vbs);
    } else {
      // Source and drain swap: I(vgs, vds, vbs) = −f(vgs − vds, −vds, vbs − vds).
      this.forward(vgs - vds, -vds, vbs - vds);
      const fg = this.gm;
      const fd = this.gds;
      const fb = this.gmb;
      this.id_ = -this.id_;
      this.gm = -fg;
      this.gmb = -fb;
      this.gds = fg + fd + fb;
    }
    this.id_ += MOS_LEAK_CONDUCTANCE * vds;
    this.gds += MOS_LEAK_CONDUCTANCE;
  }

  /** Pin Jacobian over (D, G, S, B); only drain and source carry current. */
  private fillJacobian(): void {
    const g = this.g;
    const gs = -(this.gm + this.gds + this.gmb);
    g[0] = this.gds;
    g[1] = this.gm;
    g[2] = gs;
    g[3] = this.gmb;
    g[8] = -this.gds;
    g[9] = -this.gm;
    g[10] = -gs;
    g[11] = -this.gmb;
  }

  /** The channel current at x (normalised, leakage excluded); 0 unless conducting forward. */
  saveWarm(x: Float64Array, out: Float64Array, at: number): void {
    const vs = this.sr.index >= 0 ? x[this.sr.index]! : 0;
    const p = this.p;
    const vgs = p * ((this.gt.index >= 0 ? x[this.gt.index]! : 0) - vs);
    const vds = p * ((this.dr.index >= 0 ? x[this.dr.index]! : 0) - vs);
    const vbs = p * ((this.bd.index >= 0 ? x[this.bd.index]! : 0) - vs);
    if (vds < 0) {
      out[at] = 0;
      return;
    }
    this.forward(vgs, vds, vbs);
    out[at] = this.id_;
  }

  /**
   * With `saved`, a device that conducted forward there is first evaluated at the vgs that
   * carries the saved current under this circuit's threshold and k′ (the square law solved for
   * the overdrive, in saturation or, below it, in triode), like a junction (see DeviceInstance).
   */
  prime(x: Float64Array, saved?: Float64Array, at = 0): void {
    const vs = this.sr.index >= 0 ? x[this.sr.index]! : 0;
    const p = this.p;
    const vgs = p * ((this.gt.index >= 0 ? x[this.gt.index]! : 0) - vs);
    const vds = p * ((this.dr.index >= 0 ? x[this.dr.index]! : 0) - vs);
    this.lastVgs = vgs;
    this.lastVds = vds;
    this.primed = false;
    const current = saved ? saved[at]! : 0;
    if (!(current > 0) || !(vds >= 0)) return;
    const vbs = p * ((this.bd.index >= 0 ? x[this.bd.index]! : 0) - vs);
    this.forward(vgs, vds, vbs);
    const clm = 1 + this.clmCoeff * vds;
    const beta = this.kn * clm;
    if (!(beta > 0)) return;
    // Saturation: ID = ½β·Vov²; triode (Vov > vds): ID = β(Vov·vds − vds²/2).
    let vov = Math.sqrt((2 * current) / beta);
    if (vov > vds && vds > 0) vov = current / (beta * vds) + vds / 2;
    const primedVgs = this.vt + vov;
    if (!Number.isFinite(primedVgs) || primedVgs === vgs) return;
    this.lastVgs = primedVgs;
    this.primed = true;
  }

  reset(): void {
    this.lastVgs = 0;
    this.lastVds = 0;
    this.primed = false;
  }

  stampNonlinear(x: Float64Array, mt: StampTarget, st: IterationState): void {
    const p = this.p;
    const di = this.dr.index;
    const si = this.sr.index;
    const gi = this.gt.index;
    const bi = this.bd.index;
    const vs = si >= 0 ? x[si]! : 0;
    let vgs = st.init ? 0 : p * ((gi >= 0 ? x[gi]! : 0) - vs);
    let vds = st.init ? 0 : p * ((di >= 0 ? x[di]! : 0) - vs);
    const vbs = st.init ? 0 : p * ((bi >= 0 ? x[bi]! : 0) - vs);
    if (this.primed) {
      // First pass of a warm start: at the primed vgs, which is not x's (so no convergence on it).
      vgs = this.lastVgs;
      this.primed = false;
      st.limited = true;
    } else if (!st.init) {
      const vgsLast = this.lastVgs;
      const vdsLast = this.lastVds;
      const vgsL = limitStep(vgs, vgsLast, vgsLast - this.vt0, MOS_VGS_STEP_MIN, MOS_VGS_STEP_RELATIVE);
      const vdsL = limitStep(vds, vdsLast, vdsLast, MOS_VDS_STEP_MIN, MOS_VDS_STEP_RELATIVE);
      if (vgsL !== vgs || vdsL !== vds) st.limited = true;
      vgs = vgsL;
      vds = vdsL;
    }
    this.lastVgs = vgs;
    this.lastVds = vds;
    this.evaluate(vgs, vds, vbs);
    // The drain row of fillJacobian in locals; the source row is its negation and the gate and
    // body rows are zero (adding +0 changes no entry: stamped entries are never −0).
    const { gm, gds, gmb } = this;
    const gs = -(gm + gds + gmb);
    const id = p * (this.id_ - gm * vgs - gds * vds - gmb * vbs);
    if (this.offN !== mt.n) {
      pinOffsets(this.stampIndices, mt, this.off);
      this.offN = mt.n;
    }
    // The non-zero part of stampPinsAt unrolled: the same additions in the same order, so pins
    // sharing a node (body on source) sum exactly as before.
    const a = mt.a;
    const off = this.off;
    let o = off[0]!;
    if (o >= 0) a[o]! += gds;
    if ((o = off[1]!) >= 0) a[o]! += gm;
    if ((o = off[2]!) >= 0) a[o]! += gs;
    if ((o = off[3]!) >= 0) a[o]! += gmb;
    if ((o = off[8]!) >= 0) a[o]! += -gds;
    if ((o = off[9]!) >= 0) a[o]! += -gm;
    if ((o = off[10]!) >= 0) a[o]! += -gs;
    if ((o = off[11]!) >= 0) a[o]! += -gmb;
    const b = mt.b;
    if (di >= 0) b[di]! -= id;
    if (si >= 0) b[si]! -= -id;
  }

  point(x: Float64Array): MosPoint {
    const { p, dr, gt, sr, bd } = this;
    const vs = volt(x, sr.index);
    const vgsRaw = volt(x, gt.index) - vs;
    const vdsRaw = volt(x, dr.index) - vs;
    const vbsRaw = volt(x, bd.index) - vs;
    this.evaluate(p * vgsRaw, p * vdsRaw, p * vbsRaw);
    this.fillJacobian();
    return {
      kind: this.kind,
      drainCurrent: this.id_,
      gateSourceVoltage: vgsRaw,
      drainSourceVoltage: vdsRaw,
      overdrive: this.vov,
      threshold: p * this.vt,
      region: this.region,
      headroom: Math.abs(vdsRaw) - Math.abs(this.vov), // |VDS| − |Vov| (DESIGN.md §3)
      power: p * vdsRaw * this.id_,
      transconductance: this.gm,
      bodyTransconductance: this.gmb,
      outputResistance: 1 / this.gds,
      linear: { pins: [dr.node, gt.node, sr.node, bd.node], y: this.g.slice() },
    };
  }
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
  const kn = (powerLawAt(m.kPrime.typ, t, m.kPrimeExponent) * m.width) / m.length;
  const twoPhiF = 2 * Math.max(m.fermiPotential, 0);
  return new MosInstance(c.id, c.kind, p, dr, gt, sr, bd, vt0, kn, m.channelLengthModulation.typ, m.bodyEffect, twoPhiF, Math.sqrt(twoPhiF));
}

/**
 * Gate capacitances at the operating point. The fixed parts (overlap, package) are the model's
 * gateSourceCapacitance and gateDrainCapacitance; with oxideCapacitance the channel's share of
 * W·L·Cox is added by region (textbook square-law values: saturation 2/3 to gate–source and
 * none to gate–drain; triode half to each; cutoff none, the gate–body part being neglected).
 */
export function mosCapacitances(c: Mosfet, model: MosfetModel, point: MosPoint): DeviceCapacitance[] {
  let cgs = model.gateSourceCapacitance ?? 0;
  let cgd = model.gateDrainCapacitance ?? 0;
  if (model.oxideCapacitance !== undefined) {
    const channel = model.width * model.length * model.oxideCapacitance;
    if (point.region === "saturation") cgs += (2 / 3) * channel;
    else if (point.region === "triode") {
      cgs += channel / 2;
      cgd += channel / 2;
    }
  }
  const out: DeviceCapacitance[] = [];
  if (cgs > 0) out.push({ device: c.id, between: "gate–source", a: c.pins.gate, b: c.pins.source, value: cgs });
  if (cgd > 0) out.push({ device: c.id, between: "gate–drain", a: c.pins.gate, b: c.pins.drain, value: cgd });
  return out;
}
