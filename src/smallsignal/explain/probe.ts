// Measurements on the linearised network for the explanation: node-to-node transfers of a gain's
// drive, Thevenin resistances at a node with chosen transistors removed, and the same network
// with one transistor's ro taken out or one capacitor forced to a short. Every probe assembles
// the network's own view (network.ts) and edits the assembled matrix before factoring, so the
// stamps stay those of the small-signal stage; nothing here re-derives a device model.

import type { Circuit, CurrentSource, GainSpec, VoltageSource } from "../../circuit/types.js";
import { assemble, GROUND, type SmallSignalNetwork, type View } from "../network.js";
import type { ComplexValue } from "../types.js";

/**
 * Conductance from every node to ground in probes that remove transistors: a node left with no
 * other path (an emitter only the removed device reached) would make the matrix singular. 1e-12 S
 * moves a kΩ-level resistance by 1e-9 relative, far below what the explanation prints.
 */
const PROBE_LEAK = 1e-12;
/** A Thevenin resistance above this is reported as open (null): it is the probe's leak, not a part. */
export const OPEN_RESISTANCE = 1e10;

export interface NetworkEdits {
  /** Transistors whose whole stamp is taken out (Thevenin resistances seen by a stage). */
  readonly remove?: ReadonlySet<string>;
  /** Transistors whose output conductance 1/ro (collector–emitter, drain–source) is taken out. */
  readonly withoutRo?: ReadonlyMap<string, { readonly a: number; readonly b: number; readonly g: number }>;
  /** Capacitor ids forced to a short (only meaningful at a frequency view). */
  readonly shorted?: ReadonlySet<string>;
}

function add(net: SmallSignalNetwork, row: number, col: number, re: number, im = 0): void {
  if (row !== GROUND && col !== GROUND) net.lu.add(row, col, re, im);
}

/** Assembles `view`, applies the edits and factors; true when the matrix factored. */
export function factorEdited(net: SmallSignalNetwork, view: View, edits: NetworkEdits = {}): boolean {
  assemble(net, view);
  const remove = edits.remove;
  if (remove && remove.size > 0) {
    for (const d of net.devices) {
      if (!remove.has(d.id)) continue;
      const n = d.pins.length;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const v = d.y[i * n + j] as number;
          if (v !== 0) add(net, d.pins[i] as number, d.pins[j] as number, -v);
        }
      }
    }
    for (let k = 0; k < net.nodeIndex.size; k++) add(net, k, k, PROBE_LEAK);
  }
  for (const r of edits.withoutRo?.values() ?? []) {
    add(net, r.a, r.a, -r.g);
    add(net, r.b, r.b, -r.g);
    add(net, r.a, r.b, r.g);
    add(net, r.b, r.a, r.g);
  }
  if (edits.shorted && view.kind === "frequency") {
    const omega = 2 * Math.PI * view.frequency;
    net.circuit.components.forEach((c) => {
      if (c.kind !== "capacitor" || !edits.shorted?.has(c.id)) return;
      const k = net.branchIndex.get(c.id) as number;
      const cap = net.capacitors.find((x) => x.branch === k);
      if (!cap || cap.redundantShort) return;
      // Undo jωC·(Va − Vb) − I = 0 and write Va − Vb = 0 in its place.
      add(net, k, cap.a, 1, -omega * cap.value);
      add(net, k, cap.b, -1, omega * cap.value);
      add(net, k, k, 1);
    });
  }
  return net.lu.factor() < 0;
}

export function nodeOf(net: SmallSignalNetwork, name: string): number {
  return name === net.circuit.ground ? GROUND : (net.nodeIndex.get(name) ?? GROUND);
}

function valueAt(x: Float64Array, k: number): number {
  return k === GROUND ? 0 : (x[k] as number);
}

/** Solves the factored matrix for the gain's unit drive; node voltages are then read with `voltage`. */
export function solveDrive(net: SmallSignalNetwork, source: VoltageSource | CurrentSource): void {
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  if (source.kind === "voltage-source") {
    net.rhsRe[net.branchIndex.get(source.id) as number] = 1;
  } else {
    const into = nodeOf(net, source.pins.to);
    const outOf = nodeOf(net, source.pins.from);
    if (into !== GROUND) net.rhsRe[into] = 1;
    if (outOf !== GROUND) net.rhsRe[outOf] = -1;
  }
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
}

/** V(name) from the last solve. */
export function voltage(net: SmallSignalNetwork, name: string): ComplexValue {
  const k = nodeOf(net, name);
  return { re: valueAt(net.xRe, k), im: valueAt(net.xIm, k) };
}

export function divide(a: ComplexValue, b: ComplexValue): ComplexValue | null {
  const d = b.re * b.re + b.im * b.im;
  if (!(d > 0)) return null;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
}

export function subtract(a: ComplexValue, b: ComplexValue): ComplexValue {
  return { re: a.re - b.re, im: a.im - b.im };
}

/** Thevenin resistance from `node` to ground on the factored matrix (real part at midband); null = open. */
export function resistanceAt(net: SmallSignalNetwork, node: string): number | null {
  const k = nodeOf(net, node);
  if (k === GROUND) return 0;
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  net.rhsRe[k] = 1;
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
  const r = Math.hypot(valueAt(net.xRe, k), valueAt(net.xIm, k));
  return Number.isFinite(r) && r < OPEN_RESISTANCE ? r : null;
}

/** The input source of a gain spec (the caller has checked it exists and is a source). */
export function inputSource(circuit: Circuit, spec: GainSpec): VoltageSource | CurrentSource | null {
  const c = circuit.components.find((x) => x.id === spec.input);
  return c && (c.kind === "voltage-source" || c.kind === "current-source") ? c : null;
}
