// The small-signal network of a circuit at its operating point, as complex modified nodal
// analysis. Unknowns: every non-ground node voltage, then one branch current per voltage
// source, controlled voltage source, capacitor and inductor. Every capacitor and inductor
// keeps its branch in both views, so one matrix size (and one preallocated factoriser) serves
// the midband solve and every frequency of a sweep:
//   midband:      capacitor  V(a) − V(b) = 0      (short, exact and non-singular), or
//                            I = 0                (open: the view's `open` mask, for capacitors
//                                                  that set the upper band edge)
//                 inductor   I = 0                (open; its series resistance is irrelevant)
//   frequency f:  capacitor  jωC·(V(a) − V(b)) − I = 0
//                 inductor   V(a) − V(b) − (R + jωL)·I = 0
// Independent sources are zeroed (voltage sources stay as 0 V branches, current sources are
// open); the drive of a gain's input source goes in the right-hand side only, so one
// factorisation serves every gain and the output-impedance test current.
// Nonlinear devices are stamped from their `linear` admittance matrix, whatever their kind;
// their capacitances (Cπ, Cμ, Cgs, Cgd, when the model gives them) follow the circuit's
// capacitors in the same list, without a branch: jωC between two nodes at a frequency, open
// in every midband view.

import type { Circuit, Component } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { SENSED_KINDS_TEXT } from "../circuit/sense.js";
import { bjtCapacitances } from "../devices/bjt.js";
import type { DeviceCapacitance } from "../devices/device.js";
import { mosCapacitances } from "../devices/mosfet.js";
import { ComplexLu } from "./complex-lu.js";

/**
 * midband: every circuit capacitor short except those marked in `open` (indexed like
 * `capacitors`); device capacitances always open. frequency: real impedances, with one
 * capacitor's value optionally replaced (to find the value an edge needs).
 */
export type View =
  | { readonly kind: "midband"; readonly open?: Uint8Array }
  | { readonly kind: "frequency"; readonly frequency: number; readonly replace?: { readonly index: number; readonly value: number } };

export const MIDBAND: View = { kind: "midband" };

/** Index of the ground node in stamp tables: rows and columns of ground are dropped. */
const GROUND = -1;

interface Conductance {
  readonly a: number;
  readonly b: number;
  readonly g: number;
}

interface VoltageBranch {
  readonly plus: number;
  readonly minus: number;
  readonly branch: number;
}

export interface Reactive {
  /** The capacitor's or inductor's id; for a device capacitance, the device's id. */
  readonly id: string;
  /** For a device capacitance: which one ("base–collector"); undefined for a circuit part. */
  readonly between?: string;
  readonly a: number;
  readonly b: number;
  /** Branch unknown; GROUND for a device capacitance (stamped as an admittance). */
  readonly branch: number;
  readonly value: number;
  /** Inductor winding resistance; 0 for capacitors. */
  readonly resistance: number;
  /** Midband: this capacitor's short lies in a loop of voltage-defined branches (see buildNetwork). */
  redundantShort: boolean;
}

interface VoltageControlledStamp {
  readonly plus: number;
  readonly minus: number;
  readonly controlPlus: number;
  readonly controlMinus: number;
  readonly gain: number;
  /** Branch of a vcvs; -1 for a vccs. */
  readonly branch: number;
}

/**
 * The small-signal current through a sensed part, first pin → second: a conductance times its
 * voltage (resistor), a branch current (capacitor: jωC·V, a short's current at midband;
 * inductor; voltage source), or an independent current source's own signal, which is the drive
 * when it is the gain's input and zero otherwise.
 */
export type SensedSignal =
  | { readonly kind: "conductance"; readonly a: number; readonly b: number; readonly g: number }
  | { readonly kind: "branch"; readonly index: number }
  | { readonly kind: "source"; readonly id: string };

export interface CurrentControlledStamp {
  readonly plus: number;
  readonly minus: number;
  readonly sense: SensedSignal;
  readonly gain: number;
  /** Branch of a ccvs; -1 for a cccs. */
  readonly branch: number;
}

interface DeviceStamp {
  readonly id: string;
  readonly pins: Int32Array;
  /** The operating point's own matrix, read in place (it is immutable). */
  readonly y: readonly number[];
}

export interface SmallSignalNetwork {
  readonly circuit: Circuit;
  readonly size: number;
  readonly nodeIndex: ReadonlyMap<string, number>;
  readonly branchIndex: ReadonlyMap<string, number>;
  /** Node names by unknown index, then the ids of the branch elements (for messages). */
  readonly unknownNames: readonly string[];
  readonly lu: ComplexLu;
  readonly rhsRe: Float64Array;
  readonly rhsIm: Float64Array;
  readonly xRe: Float64Array;
  readonly xIm: Float64Array;
  readonly conductances: readonly Conductance[];
  readonly voltageSources: readonly VoltageBranch[];
  readonly capacitors: readonly Reactive[];
  readonly inductors: readonly Reactive[];
  readonly voltageControlled: readonly VoltageControlledStamp[];
  readonly currentControlled: readonly CurrentControlledStamp[];
  readonly devices: readonly DeviceStamp[];
}

export type BuildResult =
  | { readonly ok: true; readonly network: SmallSignalNetwork }
  | { readonly ok: false; readonly message: string };

interface Scratch {
  readonly lu: ComplexLu;
  readonly rhsRe: Float64Array;
  readonly rhsIm: Float64Array;
  readonly xRe: Float64Array;
  readonly xIm: Float64Array;
}

/**
 * Matrix and vectors are scratch space, reused between calls of the same size (scenario runs
 * of one circuit all have the same size). Calls are synchronous and never nested, so one set
 * per size is enough; the cache holds a few sizes and is cleared when it grows past them.
 */
const SCRATCH_SIZES_KEPT = 8;
const scratchCache = new Map<number, Scratch>();

function scratchFor(size: number): Scratch {
  let s = scratchCache.get(size);
  if (!s) {
    if (scratchCache.size >= SCRATCH_SIZES_KEPT) scratchCache.clear();
    s = {
      lu: new ComplexLu(size),
      rhsRe: new Float64Array(size),
      rhsIm: new Float64Array(size),
      xRe: new Float64Array(size),
      xIm: new Float64Array(size),
    };
    scratchCache.set(size, s);
  }
  return s;
}

/** Components whose small-signal behaviour comes from the operating point's `linear` record. */
function isNonlinear(c: Component): boolean {
  return c.kind === "diode" || c.kind === "npn" || c.kind === "pnp" || c.kind === "nmos" || c.kind === "pmos";
}

function hasBranch(c: Component): boolean {
  return (
    c.kind === "voltage-source" ||
    c.kind === "vcvs" ||
    c.kind === "ccvs" ||
    c.kind === "capacitor" ||
    c.kind === "inductor"
  );
}

/** Union–find over node indices (ground is the extra slot `nodeCount`). */
class Islands {
  private readonly parent: Int32Array;
  constructor(private readonly nodeCount: number) {
    this.parent = new Int32Array(nodeCount + 1);
    for (let i = 0; i <= nodeCount; i++) this.parent[i] = i;
  }
  private slot(node: number): number {
    return node === GROUND ? this.nodeCount : node;
  }
  find(node: number): number {
    let x = this.slot(node);
    while ((this.parent[x] as number) !== x) {
      const p = this.parent[x] as number;
      this.parent[x] = this.parent[p] as number;
      x = p;
    }
    return x;
  }
  union(a: number, b: number): boolean {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return false;
    this.parent[ra] = rb;
    return true;
  }
  grounded(node: number): boolean {
    return this.find(node) === this.find(GROUND);
  }
}

/** The device's capacitances at its point, from its model (none unless the model gives them). */
function deviceCapacitances(circuit: Circuit, c: Component, point: unknown): readonly DeviceCapacitance[] {
  if (c.kind === "npn" || c.kind === "pnp") {
    const model = circuit.models.get(c.model);
    const p = point as { kind?: string };
    if (model && (model.kind === "npn" || model.kind === "pnp") && (p.kind === "npn" || p.kind === "pnp")) return bjtCapacitances(c, model, point as Parameters<typeof bjtCapacitances>[2]);
  } else if (c.kind === "nmos" || c.kind === "pmos") {
    const model = circuit.models.get(c.model);
    const p = point as { kind?: string };
    if (model && (model.kind === "nmos" || model.kind === "pmos") && (p.kind === "nmos" || p.kind === "pmos")) return mosCapacitances(c, model, point as Parameters<typeof mosCapacitances>[2]);
  }
  return [];
}

/** Lays out the unknowns and compiles the stamps of every component; nothing is assembled yet. */
export function buildNetwork(circuit: Circuit, op: OperatingPoint): BuildResult {
  // Unknown order decides the fill-in of the dense factorisation (it skips zeros): nodes with
  // few connections first, hubs such as supply rails last; each branch right after the nodes of
  // its element, where its coupling is local.
  const incidence = new Map<string, number>();
  for (const c of circuit.components) {
    const pins = c.pins as Readonly<Record<string, string>>;
    for (const pin in pins) {
      const name = pins[pin] as string;
      incidence.set(name, (incidence.get(name) ?? 0) + 1);
    }
  }
  const nodeNames = circuit.nodes.filter((n) => n !== circuit.ground);
  nodeNames.sort((a, b) => (incidence.get(a) ?? 0) - (incidence.get(b) ?? 0));
  const nodeIndex = new Map<string, number>();
  const unknownNames: string[] = [];
  for (const name of nodeNames) {
    if (nodeIndex.has(name)) continue;
    nodeIndex.set(name, unknownNames.length);
    unknownNames.push(name);
  }
  const nodeCount = nodeIndex.size;
  const branchIndex = new Map<string, number>();
  for (const c of circuit.components) {
    if (!hasBranch(c)) continue;
    branchIndex.set(c.id, unknownNames.length);
    unknownNames.push(c.id);
  }

  let problem: string | undefined;
  const node = (name: string, part: string): number => {
    if (name === circuit.ground) return GROUND;
    const k = nodeIndex.get(name);
    if (k === undefined) {
      problem ??= `${part} names node \`${name}\`, which is not in the circuit`;
      return GROUND;
    }
    return k;
  };
  const branchOf = (id: string): number => branchIndex.get(id) ?? GROUND;

  const conductances: Conductance[] = [];
  const voltageSources: VoltageBranch[] = [];
  const capacitors: Reactive[] = [];
  const inductors: Reactive[] = [];
  const voltageControlled: VoltageControlledStamp[] = [];
  const currentControlled: CurrentControlledStamp[] = [];
  const devices: DeviceStamp[] = [];
  const deviceCaps: Reactive[] = [];

  for (const c of circuit.components) {
    switch (c.kind) {
      case "resistor": {
        const r = c.value.nominal;
        if (!(r > 0) || !Number.isFinite(r)) {
          problem ??= `resistor ${c.id} has resistance ${r} Ω; the small-signal network needs a positive, finite value`;
          break;
        }
        conductances.push({ a: node(c.pins.a, c.id), b: node(c.pins.b, c.id), g: 1 / r });
        break;
      }
      case "capacitor":
        capacitors.push({
          id: c.id,
          a: node(c.pins.a, c.id),
          b: node(c.pins.b, c.id),
          branch: branchOf(c.id),
          value: c.value.nominal,
          resistance: 0,
          redundantShort: false,
        });
        break;
      case "inductor":
        inductors.push({
          id: c.id,
          a: node(c.pins.a, c.id),
          b: node(c.pins.b, c.id),
          branch: branchOf(c.id),
          value: c.value.nominal,
          resistance: c.seriesResistance,
          redundantShort: false,
        });
        break;
      case "voltage-source":
        voltageSources.push({ plus: node(c.pins.plus, c.id), minus: node(c.pins.minus, c.id), branch: branchOf(c.id) });
        break;
      case "current-source":
        break; // open when zeroed; a driving input enters the right-hand side only
      case "vcvs":
      case "vccs":
        voltageControlled.push({
          plus: node(c.pins.plus, c.id),
          minus: node(c.pins.minus, c.id),
          controlPlus: node(c.pins.controlPlus, c.id),
          controlMinus: node(c.pins.controlMinus, c.id),
          gain: c.gain,
          branch: c.kind === "vcvs" ? branchOf(c.id) : GROUND,
        });
        break;
      case "cccs":
      case "ccvs": {
        const sensed = circuit.components.find((x) => x.id === c.sense);
        let sense: SensedSignal | undefined;
        if (sensed?.kind === "resistor") {
          const r = sensed.value.nominal;
          if (r > 0 && Number.isFinite(r)) sense = { kind: "conductance", a: node(sensed.pins.a, c.id), b: node(sensed.pins.b, c.id), g: 1 / r };
        } else if (sensed?.kind === "current-source") sense = { kind: "source", id: sensed.id };
        else if (sensed && (sensed.kind === "capacitor" || sensed.kind === "inductor" || sensed.kind === "voltage-source")) {
          sense = { kind: "branch", index: branchOf(sensed.id) };
        }
        if (sense === undefined) {
          problem ??= `${c.id} senses the current of \`${c.sense}\`, which is not a ${SENSED_KINDS_TEXT} with a usable value`;
          break;
        }
        currentControlled.push({
          plus: node(c.pins.plus, c.id),
          minus: node(c.pins.minus, c.id),
          sense,
          gain: c.gain,
          branch: c.kind === "ccvs" ? branchOf(c.id) : GROUND,
        });
        break;
      }
      default: {
        if (!isNonlinear(c)) break;
        const point = op.devices[c.id];
        const linear = point && "linear" in point ? point.linear : undefined;
        if (!linear) {
          problem ??= `the operating point has no linearised model for ${c.id}`;
          break;
        }
        const n = linear.pins.length;
        if (linear.y.length !== n * n) {
          problem ??= `the linearised model of ${c.id} has ${linear.y.length} entries for ${n} pins`;
          break;
        }
        const pins = new Int32Array(n);
        for (let i = 0; i < n; i++) pins[i] = node(linear.pins[i] as string, c.id);
        devices.push({ id: c.id, pins, y: linear.y });
        for (const dc of deviceCapacitances(circuit, c, point)) {
          if (!(dc.value > 0) || dc.a === dc.b) continue;
          deviceCaps.push({ id: c.id, between: dc.between, a: node(dc.a, c.id), b: node(dc.b, c.id), branch: GROUND, value: dc.value, resistance: 0, redundantShort: false });
        }
      }
    }
  }
  if (problem !== undefined) return { ok: false, message: problem };

  // A capacitor's midband short in parallel with an ideal voltage source (or closing a loop of
  // other shorts) would make two branches fix the same voltage: singular, though the node
  // voltages are perfectly defined. The source wins, as it does at every frequency: such a
  // capacitor's short is dropped (its branch current is set to 0) and nothing else changes.
  const loops = new Islands(nodeCount);
  for (const v of voltageSources) loops.union(v.plus, v.minus);
  for (const v of voltageControlled) if (v.branch !== GROUND) loops.union(v.plus, v.minus);
  for (const v of currentControlled) if (v.branch !== GROUND) loops.union(v.plus, v.minus);
  for (const c of capacitors) c.redundantShort = !loops.union(c.a, c.b);
  capacitors.push(...deviceCaps);

  const size = unknownNames.length;
  const scratch = scratchFor(size);
  return {
    ok: true,
    network: {
      circuit,
      size,
      nodeIndex,
      branchIndex,
      unknownNames,
      ...scratch,
      conductances,
      voltageSources,
      capacitors,
      inductors,
      voltageControlled,
      currentControlled,
      devices,
    },
  };
}

/** Fills the factoriser's matrix for one view; allocates nothing. */
export function assemble(net: SmallSignalNetwork, view: View): void {
  const lu = net.lu;
  lu.clear();
  const add = (row: number, col: number, re: number, im = 0): void => {
    if (row !== GROUND && col !== GROUND) lu.add(row, col, re, im);
  };
  const stampBranchKcl = (a: number, b: number, k: number): void => {
    // Branch current k flows from a through the element to b: it leaves node a.
    add(a, k, 1);
    add(b, k, -1);
  };
  const stampBranchVoltage = (k: number, a: number, b: number, scale = 1): void => {
    add(k, a, scale);
    add(k, b, -scale);
  };

  for (const r of net.conductances) {
    add(r.a, r.a, r.g);
    add(r.b, r.b, r.g);
    add(r.a, r.b, -r.g);
    add(r.b, r.a, -r.g);
  }
  for (const v of net.voltageSources) {
    stampBranchKcl(v.plus, v.minus, v.branch);
    stampBranchVoltage(v.branch, v.plus, v.minus);
  }
  const omega = view.kind === "frequency" ? 2 * Math.PI * view.frequency : 0;
  const caps = net.capacitors;
  for (let i = 0; i < caps.length; i++) {
    const c = caps[i] as Reactive;
    const value = view.kind === "frequency" && view.replace?.index === i ? view.replace.value : c.value;
    if (c.branch === GROUND) {
      // A device capacitance: an admittance jωC, nothing at midband.
      if (view.kind === "midband") continue;
      const b = omega * value;
      add(c.a, c.a, 0, b);
      add(c.b, c.b, 0, b);
      add(c.a, c.b, 0, -b);
      add(c.b, c.a, 0, -b);
      continue;
    }
    stampBranchKcl(c.a, c.b, c.branch);
    if (view.kind === "midband") {
      if (c.redundantShort || view.open?.[i] === 1) add(c.branch, c.branch, 1);
      else stampBranchVoltage(c.branch, c.a, c.b);
    } else {
      add(c.branch, c.a, 0, omega * value);
      add(c.branch, c.b, 0, -omega * value);
      add(c.branch, c.branch, -1);
    }
  }
  for (const l of net.inductors) {
    stampBranchKcl(l.a, l.b, l.branch);
    if (view.kind === "midband") {
      add(l.branch, l.branch, 1);
    } else {
      stampBranchVoltage(l.branch, l.a, l.b);
      add(l.branch, l.branch, -l.resistance, -omega * l.value);
    }
  }
  for (const e of net.voltageControlled) {
    if (e.branch !== GROUND) {
      // vcvs: V(plus) − V(minus) − gain·Vc = 0.
      stampBranchKcl(e.plus, e.minus, e.branch);
      stampBranchVoltage(e.branch, e.plus, e.minus);
      stampBranchVoltage(e.branch, e.controlPlus, e.controlMinus, -e.gain);
    } else {
      // vccs: gain·Vc flows into node plus, so it is a current leaving plus of −gain·Vc.
      add(e.plus, e.controlPlus, -e.gain);
      add(e.plus, e.controlMinus, e.gain);
      add(e.minus, e.controlPlus, e.gain);
      add(e.minus, e.controlMinus, -e.gain);
    }
  }
  for (const f of net.currentControlled) {
    // I = the sensed current (first pin → second); a sensed source's drive goes in the
    // right-hand side (see src/smallsignal/index.ts).
    const s = f.sense;
    if (f.branch !== GROUND) {
      // ccvs: V(plus) − V(minus) − gain·I = 0.
      stampBranchKcl(f.plus, f.minus, f.branch);
      stampBranchVoltage(f.branch, f.plus, f.minus);
      if (s.kind === "branch") add(f.branch, s.index, -f.gain);
      else if (s.kind === "conductance") stampBranchVoltage(f.branch, s.a, s.b, -f.gain * s.g);
    } else if (s.kind === "branch") {
      // cccs: gain·I flows into node plus (a current −gain·I leaving it).
      add(f.plus, s.index, -f.gain);
      add(f.minus, s.index, f.gain);
    } else if (s.kind === "conductance") {
      const k = f.gain * s.g;
      add(f.plus, s.a, -k);
      add(f.plus, s.b, k);
      add(f.minus, s.a, k);
      add(f.minus, s.b, -k);
    }
  }
  for (const d of net.devices) {
    const n = d.pins.length;
    for (let i = 0; i < n; i++) {
      const row = d.pins[i] as number;
      if (row === GROUND) continue;
      for (let j = 0; j < n; j++) {
        const v = d.y[i * n + j] as number;
        if (v !== 0) add(row, d.pins[j] as number, v);
      }
    }
  }
}

function describeView(view: View): string {
  return view.kind === "midband"
    ? view.open?.includes(1)
      ? "at midband (coupling and bypass capacitors short, band-edge capacitors open, inductors open)"
      : "at midband (capacitors short, inductors open)"
    : `at ${formatHz(view.frequency)}`;
}

function formatHz(f: number): string {
  return `${Number(f.toPrecision(4))} Hz`;
}

/**
 * Names what makes a view singular: first a group of nodes with no conducting path to ground
 * in this view (the usual cause, and the one an engineer can act on), else the unknown whose
 * pivot vanished.
 */
function explainSingular(net: SmallSignalNetwork, view: View, failedColumn: number): string {
  const nodeCount = net.nodeIndex.size;
  const islands = new Islands(nodeCount);
  for (const r of net.conductances) islands.union(r.a, r.b);
  for (const v of net.voltageSources) islands.union(v.plus, v.minus);
  net.capacitors.forEach((c, i) => {
    const joins = view.kind === "midband" ? c.branch !== GROUND && view.open?.[i] !== 1 : view.frequency > 0;
    if (joins) islands.union(c.a, c.b);
  });
  if (view.kind === "frequency") for (const l of net.inductors) islands.union(l.a, l.b);
  for (const e of net.voltageControlled) if (e.branch !== GROUND) islands.union(e.plus, e.minus);
  for (const f of net.currentControlled) if (f.branch !== GROUND) islands.union(f.plus, f.minus);
  for (const d of net.devices) {
    const n = d.pins.length;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (i !== j && (d.y[i * n + j] as number) !== 0) islands.union(d.pins[i] as number, d.pins[j] as number);
      }
    }
  }
  const floating = [...net.nodeIndex.entries()].filter(([, k]) => !islands.grounded(k)).map(([name]) => name);
  const where = describeView(view);
  if (floating.length > 0) {
    const [first, ...rest] = floating;
    const others = rest.length > 0 ? ` (with ${rest.slice(0, 5).map((n) => `\`${n}\``).join(", ")}${rest.length > 5 ? ", …" : ""})` : "";
    return `the small-signal network is singular ${where}: node \`${first}\`${others} has no path to ground; connect a bias resistor or check the wiring`;
  }
  const name = net.unknownNames[failedColumn] ?? `#${failedColumn}`;
  const label = failedColumn < nodeCount ? `node \`${name}\`` : `the branch current of ${name}`;
  return `the small-signal network is singular ${where} at ${label}; look for a loop of voltage sources or a node driven only by current sources`;
}

/**
 * At midband, a voltage input whose two pins are joined through a node by capacitor shorts
 * (C1 from the input to x, C2 from x back) is contradictory: the view fixes x twice, and which
 * capacitor "wins" would be arbitrary. A capacitor straight across the input (or across it
 * through other, zeroed, sources) is harmless: the ideal source wins, as at every frequency.
 * Returns the message for that gain, or null when the input is free.
 */
export function midbandInputShort(net: SmallSignalNetwork, inputBranch: number, open?: Uint8Array): string | null {
  const source = net.voltageSources.find((v) => v.branch === inputBranch);
  if (!source) return null;
  const islands = new Islands(net.nodeIndex.size);
  for (const v of net.voltageSources) if (v !== source) islands.union(v.plus, v.minus);
  for (const e of net.voltageControlled) if (e.branch !== GROUND) islands.union(e.plus, e.minus);
  for (const f of net.currentControlled) if (f.branch !== GROUND) islands.union(f.plus, f.minus);
  const plus = islands.find(source.plus);
  const minus = islands.find(source.minus);
  const shorted = (i: number): boolean => (net.capacitors[i] as Reactive).branch !== GROUND && open?.[i] !== 1;
  const across = net.capacitors.map((c, i) => {
    if (!shorted(i)) return false;
    const a = islands.find(c.a);
    const b = islands.find(c.b);
    return (a === plus && b === minus) || (a === minus && b === plus);
  });
  net.capacitors.forEach((c, i) => {
    if (shorted(i) && !across[i]) islands.union(c.a, c.b);
  });
  if (islands.find(source.plus) !== islands.find(source.minus)) return null;
  const id = net.unknownNames[inputBranch] ?? "the input";
  return `at midband (capacitors short) a chain of capacitors joins the two pins of input \`${id}\`, so the midband gain is undefined; give the gain a \`frequency\` or check the capacitors around the input`;
}

/** Assembles and factors one view; returns null on success, else a message naming the node at fault. */
export function factorView(net: SmallSignalNetwork, view: View): string | null {
  assemble(net, view);
  const failed = net.lu.factor();
  return failed < 0 ? null : explainSingular(net, view, failed);
}

export { GROUND };
