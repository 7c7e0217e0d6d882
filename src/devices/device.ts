// The one interface every device kind implements for the bias solve: what unknowns it needs,
// how it stamps the MNA matrix from a trial solution (companion-model Newton form), how it keeps
// its junction-limiting state, and what operating-point record it reports.
import type { Circuit, Component, Model } from "../circuit/types.js";
import type { DevicePoint, SourcePoint } from "../solve/types.js";

/** Index of the ground node in stamps: rows and columns of ground are dropped (eliminated). */
export const GROUND = -1;

/** Handed to a device once, while the plan is compiled: it asks for the unknowns it needs. */
export interface SetupContext {
  readonly circuit: Circuit;
  /** Absolute temperature of the solve, K. */
  readonly temperature: number;
  /** Unknown index of a circuit node (GROUND for the ground node). */
  node(name: string): number;
  /** A new internal node unknown (e.g. behind a diode's series resistance). */
  internalNode(label: string, owner: string): number;
  /** A new branch-current unknown owned by this device. */
  branch(owner: string): number;
  model(id: string): Model | undefined;
}

/**
 * How the current through a sensed two-terminal part (first pin → second) is read from the
 * unknowns: a conductance times its pin voltage difference (resistor), a branch unknown
 * (inductor, voltage source), a constant (current source, at full source value) or nothing
 * (capacitor: open at DC).
 */
export type SensedCurrent =
  | { readonly kind: "conductance"; readonly a: number; readonly b: number; readonly g: number }
  | { readonly kind: "branch"; readonly index: number }
  | { readonly kind: "constant"; readonly current: number }
  | { readonly kind: "none" };

/** Second phase of setup: references between devices (what a current-controlled source senses). */
export interface BindContext {
  /** How to read the current through part `id`, or undefined when it cannot be sensed. */
  sensedCurrent(id: string): SensedCurrent | undefined;
}

/**
 * The system being stamped: `a` is the n×n Jacobian (row-major), `b` the right-hand side, so
 * that the Newton update solves a·x_new = b. Rows are KCL (sum of currents leaving a node into
 * devices = 0) for node unknowns and the branch equation for branch unknowns.
 */
export interface StampTarget {
  readonly a: Float64Array;
  readonly b: Float64Array;
  readonly n: number;
  /**
   * When present, addA appends every flat index it writes: the plan learns where the static
   * stamps can be non-zero without scanning all n² entries (and every static stamp goes
   * through addA, so none is missed).
   */
  readonly touched?: TouchedList;
  /**
   * Sparse storage (large systems): `a` holds only the pattern's entries and this gives the
   * index of entry (row, col) in it. Absent: `a` is dense, entry (row, col) at row·n + col.
   */
  readonly entryOf?: (row: number, col: number) => number;
  /**
   * Present while a sparse plan stamps its static part, before the pattern is known: addA
   * records each entry here instead of writing `a`.
   */
  readonly entries?: EntryList;
}

/** (row, col, value) of every static stamp of a sparse plan, in typed arrays that grow as needed. */
export class EntryList {
  count = 0;
  rows: Int32Array;
  cols: Int32Array;
  vals: Float64Array;
  constructor(capacity: number) {
    this.rows = new Int32Array(capacity);
    this.cols = new Int32Array(capacity);
    this.vals = new Float64Array(capacity);
  }
  add(row: number, col: number, v: number): void {
    if (this.count === this.rows.length) {
      const size = 2 * this.count + 32;
      const rows = new Int32Array(size);
      const cols = new Int32Array(size);
      const vals = new Float64Array(size);
      rows.set(this.rows);
      cols.set(this.cols);
      vals.set(this.vals);
      this.rows = rows;
      this.cols = cols;
      this.vals = vals;
    }
    this.rows[this.count] = row;
    this.cols[this.count] = col;
    this.vals[this.count++] = v;
  }
}

/**
 * Flat indices written by static stamps, each with its row (pairs [k, row]: the row saves a
 * division per entry later), in a typed array that grows as needed (no boxing, no array growth per entry).
 */
export class TouchedList {
  /** Entries recorded (pairs). */
  count = 0;
  constructor(public list: Int32Array) {}
  add(k: number, row: number): void {
    if (2 * this.count + 2 > this.list.length) {
      const bigger = new Int32Array(2 * this.list.length + 32);
      bigger.set(this.list);
      this.list = bigger;
    }
    this.list[2 * this.count] = k;
    this.list[2 * this.count + 1] = row;
    this.count++;
  }
}

/** Per-iteration flags shared by all devices during one stamping pass. */
export interface IterationState {
  /** First evaluation of a stage: junction devices use their initial-guess voltages, not x. */
  init: boolean;
  /** Set by a device when it limited one of its controlling voltages on this pass. */
  limited: boolean;
}

/** One terminal of a device: the pin name, the node it is wired to, and that node's unknown. */
export interface Terminal {
  readonly pin: string;
  readonly node: string;
  readonly index: number;
}

/** The empty link list, shared: most devices fix no voltage, and a plan builds every device per solve. */
export const NO_LINKS: readonly (readonly [Terminal, Terminal])[] = Object.freeze([]);

export interface DeviceInstance {
  readonly id: string;
  readonly kind: Component["kind"];
  readonly terminals: readonly Terminal[];
  /** True when the device's stamp depends on the trial solution. */
  readonly nonlinear: boolean;
  /** How the device joins nodes for the DC topology check (pairs of its terminals). */
  readonly dcLinks: readonly (readonly [Terminal, Terminal])[];
  /** Terminal pairs joined by a branch that fixes their voltage difference (for source-loop diagnosis). */
  readonly voltageLinks: readonly (readonly [Terminal, Terminal])[];
  /** Two-terminal parts a cccs/ccvs may sense: how their current (first pin → second) is read. */
  readonly sensed?: SensedCurrent;
  /** Resolves references to other devices; returns an error sentence, or undefined. */
  bind?(ctx: BindContext): string | undefined;
  /** Constant matrix entries (linear devices), stamped once per plan. */
  stampStatic?(m: StampTarget): void;
  /** Right-hand side of independent sources at full value (the solver scales it). */
  stampSource?(b: Float64Array): void;
  /** Unknowns a nonlinear device's stamp couples (every pair may become non-zero). */
  readonly stampIndices?: readonly number[];
  /** Newton companion stamp of a nonlinear device at trial solution x (adds to a and b). */
  stampNonlinear?(x: Float64Array, m: StampTarget, st: IterationState): void;
  /** Forget limiting state (start of a new continuation from the initial guess). */
  reset?(): void;
  /**
   * Numbers the device keeps from a solved point for later warm starts (its junction currents),
   * written by saveWarm at out[at …] and handed back to prime.
   */
  readonly warmSize?: number;
  saveWarm?(x: Float64Array, out: Float64Array, at: number): void;
  /**
   * Take the controlling voltages at x as the limiting reference (a warm start from a nearby
   * solved point), so that the first Newton pass is not limited back toward the reset state.
   * With `saved` (what saveWarm kept at that point): a conducting junction is first evaluated
   * at the voltage that carries the saved current under this circuit's own model (temperature,
   * saturation current), instead of at x's voltage, where a sample at another temperature
   * would find its current off by decades.
   */
  prime?(x: Float64Array, saved?: Float64Array, at?: number): void;
  /** The operating-point record at the solved x (sourceScale is 1 at the end of a solve). */
  point(x: Float64Array): DevicePoint | SourcePoint;
}

/** Adds v at (row, col), skipping the eliminated ground row/column. */
export function addA(m: StampTarget, row: number, col: number, v: number): void {
  if (row >= 0 && col >= 0) {
    if (m.entries) {
      m.entries.add(row, col, v);
      return;
    }
    const k = m.entryOf ? m.entryOf(row, col) : row * m.n + col;
    m.a[k]! += v;
    m.touched?.add(k, row);
  }
}

/** Adds v to the right-hand side of row, skipping ground. */
export function addB(b: Float64Array, row: number, v: number): void {
  if (row >= 0) b[row]! += v;
}

/** Stamps a conductance g between unknowns i and j. */
export function stampConductance(m: StampTarget, i: number, j: number, g: number): void {
  addA(m, i, i, g);
  addA(m, j, j, g);
  addA(m, i, j, -g);
  addA(m, j, i, -g);
}

/** Value of unknown i in x (0 for ground). */
export function volt(x: Float64Array, i: number): number {
  return i >= 0 ? x[i]! : 0;
}

/**
 * Offsets in m.a of a k-pin device's entries: off[i·k+j] is where ∂I(pin i)/∂V(pin j) goes, −1
 * where either pin is ground. Worked out once per plan so the stamp in the Newton loop is a
 * plain indexed add (dense storage: row·n + col; sparse: the entry's index in the pattern).
 */
export function pinOffsets(idx: readonly number[], m: StampTarget, off: number[]): void {
  const k = idx.length;
  const n = m.n;
  const entryOf = m.entryOf;
  for (let i = 0; i < k; i++) {
    const r = idx[i]!;
    for (let j = 0; j < k; j++) {
      const c = idx[j]!;
      off[i * k + j] = r >= 0 && c >= 0 ? (entryOf ? entryOf(r, c) : r * n + c) : -1;
    }
  }
}

/**
 * Stamps a nonlinear device given, over its k pins (unknown indices idx, matrix offsets off
 * from pinOffsets), the pin Jacobian g[i·k+j] = ∂I(pin i, into the device)/∂V(pin j) and the
 * companion current ieq[i] (the current into pin i at the linearisation point minus g·v there).
 */
export function stampPinsAt(m: StampTarget, idx: readonly number[], off: readonly number[], g: readonly number[], ieq: readonly number[]): void {
  const a = m.a;
  const b = m.b;
  const k = idx.length;
  for (let i = 0; i < k; i++) {
    const r = idx[i]!;
    if (r < 0) continue;
    for (let j = 0; j < k; j++) {
      const o = off[i * k + j]!;
      if (o >= 0) a[o]! += g[i * k + j]!;
    }
    b[r]! -= ieq[i]!;
  }
}

export function terminal(ctx: SetupContext, pin: string, node: string): Terminal {
  return { pin, node, index: ctx.node(node) };
}

/** Thrown during setup for a device the solver cannot represent; becomes a SolveFailure. */
export class DeviceSetupError extends Error {
  constructor(
    message: string,
    readonly parts: readonly string[],
  ) {
    super(message);
  }
}

/**
 * A small-signal capacitance of a device at its operating point, between two of its pin nodes.
 * It is linear around the point and enters every frequency-domain result; midband views treat
 * it as open (it sets the upper band edge).
 */
export interface DeviceCapacitance {
  /** The device id. */
  readonly device: string;
  /** Which capacitance, in words: "base–emitter", "gate–drain". */
  readonly between: string;
  readonly a: string;
  readonly b: string;
  /** F, ≥ 0. */
  readonly value: number;
}
