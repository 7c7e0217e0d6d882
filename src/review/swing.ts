// Does a stated signal fit? From the per-unit excursions of the small-signal stage, each
// transistor's distance to its saturation (BJT: |VCE| − saturationEdge) or triode edge
// (MOSFET: |VDS| − |Vov|, which the gate swing moves too) and to cutoff (its own bias
// current), and a DC-coupled output node's distance to the rails, each turned into the largest
// input amplitude it allows. The smallest of them is the stage's largest undistorted input.
import type { Circuit, Component, GainSpec } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { excursions } from "../smallsignal/swing.js";
import { intendedRegion, isDiodeConnected, isTransistorKind, REGIONS } from "./quantities.js";

export type ClipSide = "saturation" | "triode" | "cutoff" | "upper rail" | "lower rail";

export interface SwingLimit {
  /** Device id, or the output node's name for a rail limit. */
  readonly subject: string;
  readonly side: ClipSide;
  /** Peak excursion per unit of input (V or A per V or A). */
  readonly perUnit: number;
  /** What the bias leaves before that edge (V or A, ≥ 0 when biased properly). */
  readonly available: number;
  readonly unit: "V" | "A";
  /** available / perUnit: the largest input amplitude this limit allows (Infinity when it does not move). */
  readonly maxInput: number;
}

export interface SwingFit {
  readonly gain: string;
  /** Input unit: V for a voltage-source input, A for a current-source input. */
  readonly inputUnit: "V" | "A";
  /** Every limit, the first to clip first. */
  readonly limits: readonly SwingLimit[];
  /** The views the excursions were taken in ("midband", "20 Hz", …). */
  readonly views: readonly string[];
}

/** A node's DC path to a transistor through resistors and inductors only (not through a capacitor). */
function dcCoupledToTransistor(circuit: Circuit, node: string): boolean {
  const seen = new Set([node]);
  const queue = [node];
  const transistorNodes = new Set<string>();
  for (const c of circuit.components) {
    if (c.kind === "npn" || c.kind === "pnp" || c.kind === "nmos" || c.kind === "pmos") for (const n of Object.values(c.pins)) transistorNodes.add(n);
  }
  while (queue.length > 0) {
    const n = queue.pop() as string;
    if (transistorNodes.has(n)) return true;
    for (const c of circuit.components) {
      if (c.kind !== "resistor" && c.kind !== "inductor") continue;
      const other = c.pins.a === n ? c.pins.b : c.pins.b === n ? c.pins.a : undefined;
      if (other !== undefined && other !== circuit.ground && !seen.has(other)) {
        seen.add(other);
        queue.push(other);
      }
    }
  }
  return false;
}

/** The rails: the highest and lowest DC voltage at a voltage source's terminal (ground included). */
function rails(circuit: Circuit, op: OperatingPoint): { high: number; low: number } {
  let high = 0;
  let low = 0;
  for (const c of circuit.components) {
    if (c.kind !== "voltage-source") continue;
    for (const n of [c.pins.plus, c.pins.minus]) {
      const v = op.nodes[n] ?? 0;
      high = Math.max(high, v);
      low = Math.min(low, v);
    }
  }
  return { high, low };
}

function limit(subject: string, side: ClipSide, perUnit: number, available: number, unit: "V" | "A"): SwingLimit {
  return { subject, side, perUnit, available, unit, maxInput: perUnit > 0 ? Math.max(available, 0) / perUnit : Infinity };
}

/** Every clipping limit of one gain, sorted by the input amplitude it allows; a message when the network cannot be solved. */
export function swingLimits(circuit: Circuit, op: OperatingPoint, spec: GainSpec): SwingFit | string {
  const ex = excursions(circuit, op, spec.name);
  if (typeof ex === "string") return ex;
  const byId = new Map<string, Component>(circuit.components.map((c) => [c.id, c]));
  const input = byId.get(spec.input);
  const inputUnit = input?.kind === "current-source" ? "A" : "V";
  const out: SwingLimit[] = [];
  for (const d of ex.devices) {
    const point = op.devices[d.device];
    const c = byId.get(d.device);
    if (!point || !c || !isTransistorKind(c.kind)) continue;
    // A switch (specs.devices names another region) is not an amplifier: no swing to judge.
    if (intendedRegion(circuit, c.id, c.kind as "npn") !== REGIONS[c.kind as "npn"][0]) continue;
    // A diode-connected device cannot saturate (VCB = 0, VDG = 0 by construction): cutoff only.
    const diode = isDiodeConnected(c);
    if (point.kind === "npn" || point.kind === "pnp") {
      if (!diode) out.push(limit(d.device, "saturation", d.edgeVoltage, point.headroom, "V"));
      out.push(limit(d.device, "cutoff", d.current, Math.abs(point.collectorCurrent), "A"));
    } else if (point.kind === "nmos" || point.kind === "pmos") {
      if (!diode) out.push(limit(d.device, "triode", d.edgeVoltage, point.headroom, "V"));
      out.push(limit(d.device, "cutoff", d.current, Math.abs(point.drainCurrent), "A"));
    }
  }
  const node = spec.output.plus;
  if (spec.output.minus === circuit.ground && node !== circuit.ground && dcCoupledToTransistor(circuit, node)) {
    const v = op.nodes[node] ?? 0;
    const r = rails(circuit, op);
    const perUnit = ex.nodes.get(node) ?? 0;
    out.push(limit(node, "upper rail", perUnit, r.high - v, "V"));
    out.push(limit(node, "lower rail", perUnit, v - r.low, "V"));
  }
  out.sort((a, b) => a.maxInput - b.maxInput);
  return { gain: spec.name, inputUnit, limits: out, views: ex.views };
}
