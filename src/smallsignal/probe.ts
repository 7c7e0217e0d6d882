// One gain's drive and read-out on a factored small-signal network: the input source's unit
// drive in the right-hand side, the output difference, and the impedances seen at input and
// output. Shared by the midband split, the band-edge estimates and the sweeps.

import type { Circuit, Component, CurrentSource, GainSpec, VoltageSource } from "../circuit/types.js";
import { factorView, GROUND, midbandInputShort, type SmallSignalNetwork } from "./network.js";
import type { ComplexValue } from "./types.js";

export interface ResolvedGain {
  readonly spec: GainSpec;
  readonly source: VoltageSource | CurrentSource;
  /** The drive put into the right-hand side (1: the gain is per unit of input). */
  readonly amplitude: number;
  readonly plus: number;
  readonly minus: number;
}

/** The unit drive: a gain is per volt (or ampere) of input, whatever the source's signal level. */
const UNIT_DRIVE = 1;

export function resolveGain(circuit: Circuit, net: SmallSignalNetwork, spec: GainSpec): ResolvedGain | string {
  const source = circuit.components.find((c: Component) => c.id === spec.input);
  if (!source) return `input \`${spec.input}\` is not a component of the circuit`;
  if (source.kind !== "voltage-source" && source.kind !== "current-source") {
    return `input \`${spec.input}\` is a ${source.kind}; a gain input must be an independent voltage or current source`;
  }
  const index = (name: string): number | undefined => (name === circuit.ground ? GROUND : net.nodeIndex.get(name));
  const plus = index(spec.output.plus);
  const minus = index(spec.output.minus);
  if (plus === undefined) return `output node \`${spec.output.plus}\` is not in the circuit`;
  if (minus === undefined) return `output node \`${spec.output.minus}\` is not in the circuit`;
  return { spec, source, amplitude: UNIT_DRIVE, plus, minus };
}

/** Why the midband view (with this open mask) cannot give the gain, or null. */
export function inputShort(net: SmallSignalNetwork, g: ResolvedGain, open?: Uint8Array): string | null {
  return g.source.kind === "voltage-source" ? midbandInputShort(net, net.branchIndex.get(g.source.id) as number, open) : null;
}

export function valueAt(x: Float64Array, k: number): number {
  return k === GROUND ? 0 : (x[k] as number);
}

function inject(net: SmallSignalNetwork, into: number, outOf: number, current: number): void {
  if (into !== GROUND) net.rhsRe[into] = (net.rhsRe[into] as number) + current;
  if (outOf !== GROUND) net.rhsRe[outOf] = (net.rhsRe[outOf] as number) - current;
}

/** Puts the gain's input drive into the right-hand side (everything else zeroed). */
function drive(net: SmallSignalNetwork, g: ResolvedGain): void {
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  if (g.source.kind === "voltage-source") {
    net.rhsRe[net.branchIndex.get(g.source.id) as number] = g.amplitude;
  } else {
    // The source's current flows through it from `from` to `to`, out into node `to`.
    inject(net, net.nodeIndex.get(g.source.pins.to) ?? GROUND, net.nodeIndex.get(g.source.pins.from) ?? GROUND, g.amplitude);
    // A controlled source sensing this current source sees the drive as its current.
    for (const f of net.currentControlled) {
      if (f.sense.kind !== "source" || f.sense.id !== g.source.id) continue;
      if (f.branch !== GROUND) net.rhsRe[f.branch] = (net.rhsRe[f.branch] as number) + f.gain * g.amplitude;
      else inject(net, f.plus, f.minus, f.gain * g.amplitude);
    }
  }
}

/** Solves the factored view for the gain's drive: (V(plus) − V(minus)) / amplitude. */
export function solveGain(net: SmallSignalNetwork, g: ResolvedGain): ComplexValue {
  drive(net, g);
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
  return {
    re: (valueAt(net.xRe, g.plus) - valueAt(net.xRe, g.minus)) / g.amplitude,
    im: (valueAt(net.xIm, g.plus) - valueAt(net.xIm, g.minus)) / g.amplitude,
  };
}

/** Input impedance from the last solveGain (same drive still in x): source voltage / delivered current. */
export function inputImpedance(net: SmallSignalNetwork, g: ResolvedGain): number {
  if (g.source.kind === "voltage-source") {
    // The branch current flows into the plus pin; the source delivers its negative.
    const delivered = -(net.xRe[net.branchIndex.get(g.source.id) as number] as number);
    return delivered === 0 ? Infinity : g.amplitude / delivered;
  }
  const to = net.nodeIndex.get(g.source.pins.to) ?? GROUND;
  const from = net.nodeIndex.get(g.source.pins.from) ?? GROUND;
  return (valueAt(net.xRe, to) - valueAt(net.xRe, from)) / g.amplitude;
}

/** The real resistance between two nodes of the factored view: 1 A in at `a`, out at `b`. */
export function resistanceBetween(net: SmallSignalNetwork, a: number, b: number): number {
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  inject(net, a, b, 1);
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
  return valueAt(net.xRe, a) - valueAt(net.xRe, b);
}

/** Output impedance: input zeroed (its branch stays a 0 V short, a current input stays open), 1 A test current. */
export function outputImpedance(net: SmallSignalNetwork, g: ResolvedGain): number {
  return resistanceBetween(net, g.plus, g.minus);
}

/** The gain at one frequency, or a message when that view is singular or ill-conditioned. */
export function gainAt(net: SmallSignalNetwork, g: ResolvedGain, frequency: number, replace?: { index: number; value: number }): ComplexValue | string {
  const singular = factorView(net, replace ? { kind: "frequency", frequency, replace } : { kind: "frequency", frequency });
  if (singular !== null) return singular;
  const v = solveGain(net, g);
  return Number.isFinite(v.re) && Number.isFinite(v.im) ? v : `the solve at ${frequency} Hz gave a non-finite value; the network is ill-conditioned`;
}
