// Diode: Shockley junction I = IS(exp(V/(n·VT)) − 1) with ideality n and series resistance.
// A non-zero series resistance gets an internal node between the anode pin and the junction
// (an exact resistor stamp, no nested solve); the reported `linear` folds it back into one
// conductance between anode and cathode, which is the exact two-pin Jacobian. A model with a
// breakdown voltage (a Zener) adds its reverse breakdown branch (breakdown.ts) to the junction.
import type { Diode, DiodeModel } from "../circuit/types.js";
import type { DiodePoint } from "../solve/types.js";
import { criticalVoltage, limitJunction, warmJunctionVoltage } from "../solve/limiting.js";
import {
  DeviceSetupError,
  stampConductance,
  pinOffsets,
  terminal,
  volt,
  type DeviceInstance,
  type IterationState,
  type SetupContext,
  type StampTarget,
} from "./device.js";
import { addBreakdown, breakdownBranch } from "./breakdown.js";
import { JUNCTION_LEAK_CONDUCTANCE, junction, junctionOut } from "./junction.js";
import { saturationCurrentAt, thermalVoltage } from "./thermal.js";

export function diodeModelFor(c: { id: string; model: string }, ctx: SetupContext): DiodeModel {
  const m = ctx.model(c.model);
  if (!m || m.kind !== "diode") throw new DeviceSetupError(`diode ${c.id} names model \`${c.model}\`, which is not a diode model`, [c.id]);
  return m;
}

export function diode(c: Diode, ctx: SetupContext): DeviceInstance {
  const model = diodeModelFor(c, ctx);
  const anode = terminal(ctx, "anode", c.pins.anode);
  const cathode = terminal(ctx, "cathode", c.pins.cathode);
  const rs = model.seriesResistance;
  const inner = rs > 0 ? ctx.internalNode(`${c.id}#junction`, c.id) : anode.index;
  const nvt = model.ideality.typ * thermalVoltage(ctx.temperature);
  const is = saturationCurrentAt(model.saturationCurrent.typ, ctx.temperature, model.ideality.typ, model.drift);
  const vcrit = criticalVoltage(nvt, is);
  const zener = breakdownBranch(model, ctx.temperature);
  const idx: number[] = [inner, cathode.index];
  // Matrix offsets of the pin Jacobian (for matrix size offN) as a plain array (cheapest to
  // create); [0] the last junction voltage as a small typed array, so the
  // Newton loop stores no boxed doubles (a closure variable would box each new value).
  const off: number[] = [-1, -1, -1, -1];
  let offN = -1;
  const last = Float64Array.of(vcrit);
  // The next pass evaluates at last[0] as primed from a warm start, not at x.
  let primed = false;

  const evaluate = (v: number): void => {
    junction(v, is, nvt);
    junctionOut[0] = junctionOut[0]! + JUNCTION_LEAK_CONDUCTANCE * v;
    junctionOut[1] = junctionOut[1]! + JUNCTION_LEAK_CONDUCTANCE;
    if (zener) addBreakdown(v, zener, junctionOut);
  };

  return {
    id: c.id,
    kind: c.kind,
    terminals: [anode, cathode],
    nonlinear: true,
    stampIndices: idx,
    dcLinks: [[anode, cathode]],
    voltageLinks: [],
    stampStatic(m: StampTarget) {
      if (rs > 0) stampConductance(m, anode.index, inner, 1 / rs);
    },
    reset() {
      last[0] = vcrit;
      primed = false;
    },
    warmSize: 1,
    saveWarm(x: Float64Array, out: Float64Array, at: number) {
      // The Shockley current alone (leakage and breakdown excluded).
      junction(volt(x, inner) - volt(x, cathode.index), is, nvt);
      out[at] = junctionOut[0]!;
    },
    prime(x: Float64Array, saved?: Float64Array, at = 0) {
      const v = volt(x, inner) - volt(x, cathode.index);
      last[0] = saved ? warmJunctionVoltage(v, saved[at]!, is, nvt, vcrit) : v;
      primed = last[0] !== v;
    },
    stampNonlinear(x: Float64Array, m: StampTarget, st: IterationState) {
      let v: number;
      if (primed) {
        // First pass of a warm start: at the primed voltage, which is not x's.
        v = last[0]!;
        primed = false;
        st.limited = true;
      } else {
        v = st.init ? vcrit : volt(x, inner) - volt(x, cathode.index);
        const vl = limitJunction(v, last[0]!, nvt, vcrit);
        if (vl !== v) st.limited = true;
        v = vl;
      }
      last[0] = v;
      evaluate(v);
      const i = junctionOut[0]!;
      const gd = junctionOut[1]!;
      const ieq = i - gd * v;
      if (offN !== m.n) {
        pinOffsets(idx, m, off);
        offN = m.n;
      }
      // stampPinsAt unrolled over g = [gd, −gd; −gd, gd]: the same additions in the same order.
      const a = m.a;
      let o = off[0]!;
      if (o >= 0) a[o]! += gd;
      if ((o = off[1]!) >= 0) a[o]! += -gd;
      if ((o = off[2]!) >= 0) a[o]! += -gd;
      if ((o = off[3]!) >= 0) a[o]! += gd;
      if (inner >= 0) m.b[inner]! -= ieq;
      if (cathode.index >= 0) m.b[cathode.index]! -= -ieq;
    },
    point(x): DiodePoint {
      const vj = volt(x, inner) - volt(x, cathode.index);
      evaluate(vj);
      const id = junctionOut[0]!;
      const gd = junctionOut[1]!;
      const vd = volt(x, anode.index) - volt(x, cathode.index);
      const rd = 1 / gd + rs;
      const gEff = 1 / rd;
      return {
        kind: "diode",
        current: id,
        voltage: vd,
        power: vd * id,
        dynamicResistance: rd,
        linear: { pins: [anode.node, cathode.node], y: [gEff, -gEff, -gEff, gEff] },
      };
    },
  };
}
