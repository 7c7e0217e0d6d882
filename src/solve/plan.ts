// The compiled plan of one circuit: node names mapped to unknown indices once, one device
// instance per component, and every array the Newton loop needs, preallocated.
import type { Circuit, Component } from "../circuit/types.js";
import { bjt } from "../devices/bjt.js";
import { capacitor } from "../devices/capacitor.js";
import { currentControlled, voltageControlled } from "../devices/controlled.js";
import { currentSource } from "../devices/current-source.js";
import { DeviceSetupError, EntryList, TouchedList, type BindContext, type DeviceInstance, type SetupContext, type StampTarget } from "../devices/device.js";
import { diode } from "../devices/diode.js";
import { inductor } from "../devices/inductor.js";
import { mosfet } from "../devices/mosfet.js";
import { resistor } from "../devices/resistor.js";
import { voltageSource } from "../devices/voltage-source.js";
import { scratchFloat64, scratchInt32, scratchUint8 } from "./scratch.js";

export type UnknownKind = "node" | "internal" | "branch";

export interface Unknown {
  readonly kind: UnknownKind;
  /** Node name, internal node label, or the id of the device owning the branch. */
  readonly name: string;
  /** Device that owns an internal node or branch. */
  readonly owner?: string;
}

export interface Plan {
  readonly circuit: Circuit;
  readonly n: number;
  readonly unknowns: readonly Unknown[];
  readonly nodeIndex: ReadonlyMap<string, number>;
  /** nodeIndex as two parallel arrays in its order (cheaper to walk than the Map's iterator). */
  readonly nodeNames: readonly string[];
  readonly nodeSlots: readonly number[];
  readonly devices: readonly DeviceInstance[];
  readonly nonlinear: readonly DeviceInstance[];
  /**
   * Sparse storage: a and aStatic hold only the pattern's entries (entry t at index t, compressed
   * rows); otherwise they are dense n×n, row-major.
   */
  readonly sparse: boolean;
  /** Linear part of the Jacobian, stamped once. */
  readonly aStatic: Float64Array;
  /** Independent sources at full value. */
  readonly bSource: Float64Array;
  /** Working arrays of the Newton loop. */
  readonly a: Float64Array;
  readonly b: Float64Array;
  readonly x: Float64Array;
  readonly xNew: Float64Array;
  /** Spare copy of x (the polishing step keeps the accepted point here). */
  readonly xSpare: Float64Array;
  /**
   * Index in `a` of every matrix entry the stamps can make non-zero (static, devices, gmin
   * diagonal), rows ascending and columns ascending within a row: the flat index row·n + col
   * (dense), or 0, 1, 2, … (sparse).
   */
  readonly pattern: Int32Array;
  /** Row i's entries of `pattern` are pattern[patternRowStart[i] … patternRowStart[i+1]). */
  readonly patternRowStart: Int32Array;
  /** Column of each pattern entry. */
  readonly patternCols: Int32Array;
  /** Index in `a` of each unknown's diagonal entry (node rows; −1 for a branch row without one). */
  readonly diagonal: Int32Array;
  /** 1 for a KCL row, 0 for a branch-equation row. */
  readonly isNodeRow: Uint8Array;
  readonly target: StampTarget;
}

export type CompileResult =
  | { readonly ok: true; readonly plan: Plan }
  | { readonly ok: false; readonly reason: string; readonly parts: readonly string[] };

function instantiate(c: Component, ctx: SetupContext): DeviceInstance {
  switch (c.kind) {
    case "resistor":
      return resistor(c, ctx);
    case "capacitor":
      return capacitor(c, ctx);
    case "inductor":
      return inductor(c, ctx);
    case "voltage-source":
      return voltageSource(c, ctx);
    case "current-source":
      return currentSource(c, ctx);
    case "diode":
      return diode(c, ctx);
    case "npn":
    case "pnp":
      return bjt(c, ctx);
    case "nmos":
    case "pmos":
      return mosfet(c, ctx);
    case "vcvs":
    case "vccs":
      return voltageControlled(c, ctx);
    case "cccs":
    case "ccvs":
      return currentControlled(c, ctx);
  }
}

/**
 * From this many unknowns on, a plan stores its matrices sparse (sparse-lu.ts); below it dense.
 * Measured side by side on the bench chains (CPU per solve, dense/sparse, 2026-12-02): 0.97× at
 * 11 unknowns, 1.00–1.02× at 20–50, 1.06× at 65, 1.12× at 101, 1.49× at 302 — sparse wins by
 * more than the noise from here on. (It was 250 while the sparse path rebuilt its layout on every
 * solve and took 17 Newton iterations at 300 nodes: sparse was then 0.84× dense at 302.)
 */
export const SPARSE_MIN_UNKNOWNS = 64;

export type MatrixStorage = "dense" | "sparse" | "auto";

/** The node unknowns of a circuit's node list: what every plan of that list starts from. */
interface NodeTable {
  readonly ground: string;
  readonly nodeIndex: ReadonlyMap<string, number>;
  readonly nodeNames: readonly string[];
  readonly nodeSlots: readonly number[];
  readonly unknowns: readonly Unknown[];
}

/**
 * Node tables by node list. A circuit's node list is immutable and every scenario of it (a
 * corner, a Monte Carlo sample: other values, same topology) shares it, so the name → unknown
 * map is built once per list (at 3,000 nodes it was ~5 % of a solve). A plan that meets a pin on
 * a node the list lacks copies the table before adding to it.
 */
const nodeTables = new WeakMap<readonly string[], NodeTable>();

function nodeTableOf(circuit: Circuit): NodeTable {
  const known = nodeTables.get(circuit.nodes);
  if (known && known.ground === circuit.ground) return known;
  const unknowns: Unknown[] = [];
  const nodeIndex = new Map<string, number>();
  const nodeNames: string[] = [];
  const nodeSlots: number[] = [];
  for (const name of circuit.nodes) {
    if (name === circuit.ground || nodeIndex.has(name)) continue;
    nodeIndex.set(name, unknowns.length);
    nodeNames.push(name);
    nodeSlots.push(unknowns.length);
    unknowns.push({ kind: "node", name });
  }
  const table: NodeTable = { ground: circuit.ground, nodeIndex, nodeNames, nodeSlots, unknowns };
  nodeTables.set(circuit.nodes, table);
  return table;
}

export function compilePlan(circuit: Circuit, storage: MatrixStorage = "auto"): CompileResult {
  const table = nodeTableOf(circuit);
  const unknowns: Unknown[] = table.unknowns.slice();
  let nodeIndex = table.nodeIndex as Map<string, number>;
  let nodeNames = table.nodeNames as string[];
  let nodeSlots = table.nodeSlots as number[];
  let shared = true;
  const ctx: SetupContext = {
    circuit,
    temperature: circuit.temperature,
    node(name) {
      if (name === circuit.ground) return -1;
      let i = nodeIndex.get(name);
      if (i === undefined) {
        // A pin on a node the loader did not list: still solvable, so give it an unknown (in a
        // copy of the shared node table).
        if (shared) {
          nodeIndex = new Map(nodeIndex);
          nodeNames = nodeNames.slice();
          nodeSlots = nodeSlots.slice();
          shared = false;
        }
        i = unknowns.length;
        nodeIndex.set(name, i);
        nodeNames.push(name);
        nodeSlots.push(i);
        unknowns.push({ kind: "node", name });
      }
      return i;
    },
    internalNode(label, owner) {
      unknowns.push({ kind: "internal", name: label, owner });
      return unknowns.length - 1;
    },
    branch(owner) {
      unknowns.push({ kind: "branch", name: owner, owner });
      return unknowns.length - 1;
    },
    model: (id) => circuit.models.get(id),
  };
  const devices: DeviceInstance[] = [];
  try {
    for (const c of circuit.components) devices.push(instantiate(c, ctx));
  } catch (err) {
    if (err instanceof DeviceSetupError) return { ok: false, reason: err.message, parts: err.parts };
    throw err;
  }
  // Devices by id, built only when a current-controlled source asks (most circuits have none).
  let byId: Map<string, DeviceInstance> | undefined;
  const bind: BindContext = {
    sensedCurrent(id) {
      if (!byId) {
        byId = new Map();
        for (let k = 0; k < devices.length; k++) byId.set(circuit.components[k]!.id, devices[k]!);
      }
      return byId.get(id)?.sensed;
    },
  };
  for (const d of devices) {
    const msg = d.bind?.(bind);
    if (msg !== undefined) return { ok: false, reason: msg, parts: [d.id] };
  }
  const n = unknowns.length;
  const sparse = storage === "sparse" || (storage === "auto" && n >= SPARSE_MIN_UNKNOWNS);
  // Every working array of the plan is borrowed (see scratch.ts; a solve of the same size gets
  // the same views back); the static parts are zeroed here, the rest is written before it is read.
  const bSource = scratchFloat64("plan-b-source", n);
  const b = scratchFloat64("plan-b", n);
  const x = scratchFloat64("plan-x", n);
  const xNew = scratchFloat64("plan-x-new", n);
  const xSpare = scratchFloat64("plan-x-spare", n);
  bSource.fill(0);
  // Borrowed like the rest: allocating even a small typed array costs about a Newton iteration.
  const isNodeRow = scratchUint8("plan-node-rows", n);
  for (let i = 0; i < n; i++) isNodeRow[i] = unknowns[i]!.kind === "branch" ? 0 : 1;
  const patternRowStart = scratchInt32("plan-pattern-rows", n + 1);
  const nonlinear: DeviceInstance[] = [];
  for (let k = 0; k < devices.length; k++) if (devices[k]!.nonlinear) nonlinear.push(devices[k]!);
  const diagonal = scratchInt32("plan-diagonal", n);
  let aStatic: Float64Array;
  let a: Float64Array;
  let pattern: Int32Array;
  let patternCols: Int32Array;
  let target: StampTarget;
  if (!sparse) {
    aStatic = scratchFloat64("plan-a-static", n * n);
    a = scratchFloat64("plan-a", n * n);
    aStatic.fill(0);
    // The static stamps record where they write (see stampPattern). Room for the usual four
    // entries per device; a device kind with more makes the list grow.
    const touched = new TouchedList(scratchInt32("plan-touched", 2 * (4 * devices.length + 16)));
    const staticTarget: StampTarget = { a: aStatic, b: bSource, n, touched };
    for (const d of devices) {
      d.stampStatic?.(staticTarget);
      d.stampSource?.(bSource);
    }
    pattern = stampPattern(n, aStatic, touched, isNodeRow, nonlinear, patternRowStart);
    patternCols = scratchInt32("plan-pattern-cols", pattern.length);
    for (let i = 0; i < n; i++) {
      diagonal[i] = i * n + i;
      for (let p = patternRowStart[i]!; p < patternRowStart[i + 1]!; p++) patternCols[p] = pattern[p]! - i * n;
    }
    target = { a, b, n };
  } else {
    const entries = SPARSE_ENTRIES;
    entries.count = 0;
    const staticTarget: StampTarget = { a: EMPTY, b: bSource, n, entries };
    for (const d of devices) {
      d.stampStatic?.(staticTarget);
      d.stampSource?.(bSource);
    }
    const layout = sparseLayout(n, entries, isNodeRow, nonlinear);
    patternRowStart.set(layout.rowStart);
    const nnz = layout.cols.length;
    patternCols = scratchInt32("plan-pattern-cols", nnz);
    patternCols.set(layout.cols);
    pattern = scratchInt32("plan-pattern", nnz);
    for (let t = 0; t < nnz; t++) pattern[t] = t;
    const entryOf = (row: number, col: number): number => findEntry(patternRowStart, patternCols, row, col);
    aStatic = scratchFloat64("plan-a-static", nnz);
    a = scratchFloat64("plan-a", nnz);
    aStatic.fill(0);
    const slots = layout.staticSlots;
    const vals = entries.vals;
    for (let t = 0; t < entries.count; t++) aStatic[slots[t]!]! += vals[t]!;
    diagonal.set(layout.diagonal);
    target = { a, b, n, entryOf };
  }
  return {
    ok: true,
    plan: {
      circuit,
      n,
      unknowns,
      nodeIndex,
      nodeNames,
      nodeSlots,
      devices,
      nonlinear,
      sparse,
      aStatic,
      bSource,
      a,
      b,
      x,
      xNew,
      xSpare,
      pattern,
      patternRowStart,
      patternCols,
      diagonal,
      isNodeRow,
      target,
    },
  };
}

const EMPTY = new Float64Array(0);

/** Index of entry (row, col) among the pattern's entries (binary search within the row); −1 when absent. */
function findEntry(rowStart: Int32Array, cols: Int32Array, row: number, col: number): number {
  let lo = rowStart[row]!;
  let hi = rowStart[row + 1]! - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    const c = cols[mid]!;
    if (c === col) return mid;
    if (c < col) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}

/**
 * Where a sparse plan's entries go: the pattern in compressed rows, the slot of each static
 * entry (in the order the static stamps wrote them) and of each node row's diagonal.
 */
interface SparseLayout {
  readonly n: number;
  /** The candidate entries it was built from (rows, then columns), to recognise the same layout. */
  readonly candRow: Int32Array;
  readonly candCol: Int32Array;
  readonly rowStart: Int32Array;
  readonly cols: Int32Array;
  readonly staticSlots: Int32Array;
  readonly diagonal: Int32Array;
}

/** The static entries of a sparse plan, reused from plan to plan (compiling is synchronous). */
const SPARSE_ENTRIES = new EntryList(256);

/**
 * Layouts built recently (most recent last). Every scenario of a circuit has its topology, so its
 * static stamps write the same entries in the same order: the layout is then looked up by
 * comparing the candidate lists (a linear scan) instead of sorting them and searching each
 * entry's slot (at 3,000 nodes that was ~0.5 ms of a ~10 ms solve).
 */
const RECENT_LAYOUTS = 4;
const recentLayouts: SparseLayout[] = [];

/**
 * The layout of a sparse plan. Its pattern holds node rows' diagonals (gmin), every pair of a
 * nonlinear device's stamp indices, and every entry a static stamp wrote (kept even where the
 * static values cancel: a zero entry is harmless). Work and memory follow the entries, never n².
 */
function sparseLayout(n: number, entries: EntryList, isNodeRow: Uint8Array, nonlinear: readonly DeviceInstance[]): SparseLayout {
  let bound = n + entries.count;
  for (let d = 0; d < nonlinear.length; d++) {
    const k = nonlinear[d]!.stampIndices?.length ?? 0;
    bound += k * k;
  }
  const candRow = scratchInt32("sparse-candidate-rows", bound);
  const candCol = scratchInt32("sparse-candidate-cols", bound);
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (!isNodeRow[i]) continue;
    candRow[count] = i;
    candCol[count++] = i;
  }
  for (let d = 0; d < nonlinear.length; d++) {
    const idx = nonlinear[d]!.stampIndices;
    if (!idx) continue;
    for (let p = 0; p < idx.length; p++) {
      const r = idx[p]!;
      if (r < 0) continue;
      for (let q = 0; q < idx.length; q++) {
        const c = idx[q]!;
        if (c < 0) continue;
        candRow[count] = r;
        candCol[count++] = c;
      }
    }
  }
  const firstStatic = count;
  const { rows, cols: entryCols } = entries;
  for (let t = 0; t < entries.count; t++) {
    candRow[count] = rows[t]!;
    candCol[count++] = entryCols[t]!;
  }
  for (let k = recentLayouts.length - 1; k >= 0; k--) {
    const l = recentLayouts[k]!;
    if (l.n !== n || l.candRow.length !== count || l.staticSlots.length !== entries.count) continue;
    let same = true;
    for (let t = 0; t < count && same; t++) same = l.candRow[t] === candRow[t] && l.candCol[t] === candCol[t];
    if (!same) continue;
    if (k !== recentLayouts.length - 1) {
      recentLayouts.splice(k, 1);
      recentLayouts.push(l);
    }
    return l;
  }
  // Bucket by row, sort each row's columns, drop repeats.
  const start = scratchInt32("sparse-row-fill", n + 1);
  start.fill(0);
  for (let t = 0; t < count; t++) start[candRow[t]! + 1]!++;
  for (let i = 0; i < n; i++) start[i + 1]! += start[i]!;
  const bucket = scratchInt32("sparse-bucket", count);
  const next = scratchInt32("sparse-next", n);
  for (let i = 0; i < n; i++) next[i] = start[i]!;
  for (let t = 0; t < count; t++) bucket[next[candRow[t]!]!++] = candCol[t]!;
  const rowStart = new Int32Array(n + 1);
  let out = 0;
  for (let i = 0; i < n; i++) {
    const s = start[i]!;
    const e = start[i + 1]!;
    if (e - s > 16) bucket.subarray(s, e).sort();
    else {
      for (let p = s + 1; p < e; p++) {
        const v = bucket[p]!;
        let q = p - 1;
        while (q >= s && bucket[q]! > v) {
          bucket[q + 1] = bucket[q]!;
          q--;
        }
        bucket[q + 1] = v;
      }
    }
    rowStart[i] = out;
    let last = -1;
    for (let p = s; p < e; p++) {
      const v = bucket[p]!;
      if (v !== last) bucket[out++] = v;
      last = v;
    }
  }
  rowStart[n] = out;
  const cols = Int32Array.from(bucket.subarray(0, out));
  const staticSlots = new Int32Array(entries.count);
  for (let t = 0; t < entries.count; t++) staticSlots[t] = findEntry(rowStart, cols, candRow[firstStatic + t]!, candCol[firstStatic + t]!);
  const diagonal = new Int32Array(n);
  for (let i = 0; i < n; i++) diagonal[i] = isNodeRow[i] ? findEntry(rowStart, cols, i, i) : -1;
  const layout: SparseLayout = { n, candRow: Int32Array.from(candRow.subarray(0, count)), candCol: Int32Array.from(candCol.subarray(0, count)), rowStart, cols, staticSlots, diagonal };
  recentLayouts.push(layout);
  if (recentLayouts.length > RECENT_LAYOUTS) recentLayouts.shift();
  return layout;
}

/**
 * The pattern in ascending flat-index order; rowStart[i] receives where row i begins in it.
 * An entry belongs to it when it is a node row's diagonal (gmin), a pair of a nonlinear
 * device's stamp indices, or a static entry that ended up non-zero. `touched` lists every
 * entry the static stamps wrote, with its row, so the work follows the stamps rather than the
 * n² entries and needs no division. (A scan of all n² entries was as fast at 11 unknowns and
 * slower from 32 on.)
 */
function stampPattern(
  n: number,
  aStatic: Float64Array,
  touched: TouchedList,
  isNodeRow: Uint8Array,
  nonlinear: readonly DeviceInstance[],
  rowStart: Int32Array,
): Int32Array {
  const list = touched.list;
  const listed = touched.count;
  let bound = n + listed;
  for (let d = 0; d < nonlinear.length; d++) {
    const k = nonlinear[d]!.stampIndices?.length ?? 0;
    bound += k * k;
  }
  const mark = scratchUint8("pattern-mark", n * n);
  mark.fill(0);
  const cand = scratchInt32("pattern-candidates", bound);
  const candRow = scratchInt32("pattern-candidate-rows", bound);
  rowStart.fill(0);
  let count = 0;
  // rowStart[r + 1] counts row r's entries for now.
  for (let i = 0; i < n; i++) {
    const idx = i * n + i;
    if (isNodeRow[i] && !mark[idx]) {
      mark[idx] = 1;
      cand[count] = idx;
      candRow[count++] = i;
      rowStart[i + 1]!++;
    }
  }
  for (let d = 0; d < nonlinear.length; d++) {
    const idx = nonlinear[d]!.stampIndices;
    if (!idx) continue;
    for (let p = 0; p < idx.length; p++) {
      const r = idx[p]!;
      if (r < 0) continue;
      for (let q = 0; q < idx.length; q++) {
        const c = idx[q]!;
        if (c < 0) continue;
        const at = r * n + c;
        if (mark[at]) continue;
        mark[at] = 1;
        cand[count] = at;
        candRow[count++] = r;
        rowStart[r + 1]!++;
      }
    }
  }
  for (let t = 0; t < listed; t++) {
    const at = list[2 * t]!;
    if (mark[at] || aStatic[at] === 0) continue;
    const r = list[2 * t + 1]!;
    mark[at] = 1;
    cand[count] = at;
    candRow[count++] = r;
    rowStart[r + 1]!++;
  }
  for (let i = 0; i < n; i++) rowStart[i + 1]! += rowStart[i]!;
  const found = scratchInt32("pattern", count);
  const next = scratchInt32("pattern-next", n);
  for (let i = 0; i < n; i++) next[i] = rowStart[i]!;
  for (let t = 0; t < count; t++) found[next[candRow[t]!]!++] = cand[t]!;
  // Insertion sort within each row: rows hold a handful of entries.
  for (let i = 0; i < n; i++) {
    const start = rowStart[i]!;
    const end = rowStart[i + 1]!;
    for (let p = start + 1; p < end; p++) {
      const v = found[p]!;
      let q = p - 1;
      while (q >= start && found[q]! > v) {
        found[q + 1] = found[q]!;
        q--;
      }
      found[q + 1] = v;
    }
  }
  return found;
}

/** Human name of an unknown for messages: "node `b`", "the branch of VCC", "node `D1#junction`". */
export function describeUnknown(u: Unknown): string {
  if (u.kind === "node") return `node \`${u.name}\``;
  if (u.kind === "internal") return `the internal node of ${u.owner}`;
  return `the branch current of ${u.name}`;
}
