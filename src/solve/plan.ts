// The compiled plan of one circuit: node names mapped to unknown indices once, one device
// instance per component, and every array the Newton loop needs, preallocated.
import type { Circuit, Component } from "../circuit/types.js";
import { bjt } from "../devices/bjt.js";
import { capacitor } from "../devices/capacitor.js";
import { currentControlled, voltageControlled } from "../devices/controlled.js";
import { currentSource } from "../devices/current-source.js";
import { DeviceSetupError, TouchedList, type DeviceInstance, type SetupContext, type StampTarget } from "../devices/device.js";
import { diode } from "../devices/diode.js";
import { inductor } from "../devices/inductor.js";
import { mosfet } from "../devices/mosfet.js";
import { resistor } from "../devices/resistor.js";
import { voltageSource, type VoltageSourceInstance } from "../devices/voltage-source.js";
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
  /** Flat indices of every matrix entry the stamps can make non-zero (static, devices, gmin diagonal). */
  readonly pattern: Int32Array;
  /** Row i's entries of `pattern` are pattern[patternRowStart[i] … patternRowStart[i+1]). */
  readonly patternRowStart: Int32Array;
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

export function compilePlan(circuit: Circuit): CompileResult {
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
  const ctx: SetupContext = {
    circuit,
    temperature: circuit.temperature,
    node(name) {
      if (name === circuit.ground) return -1;
      let i = nodeIndex.get(name);
      if (i === undefined) {
        // A pin on a node the loader did not list: still solvable, so give it an unknown.
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
  const vsources = new Map<string, VoltageSourceInstance>();
  try {
    for (const c of circuit.components) {
      const d = instantiate(c, ctx);
      devices.push(d);
      if (c.kind === "voltage-source") vsources.set(c.id, d as VoltageSourceInstance);
    }
  } catch (err) {
    if (err instanceof DeviceSetupError) return { ok: false, reason: err.message, parts: err.parts };
    throw err;
  }
  for (const d of devices) {
    const msg = d.bind?.({ voltageSourceBranch: (id) => vsources.get(id)?.branchIndex });
    if (msg !== undefined) return { ok: false, reason: msg, parts: [d.id] };
  }
  const n = unknowns.length;
  // Every working array of the plan is borrowed (see scratch.ts; a solve of the same size gets
  // the same views back); the static parts are zeroed here, the rest is written before it is read.
  const aStatic = scratchFloat64("plan-a-static", n * n);
  const a = scratchFloat64("plan-a", n * n);
  const bSource = scratchFloat64("plan-b-source", n);
  const b = scratchFloat64("plan-b", n);
  const x = scratchFloat64("plan-x", n);
  const xNew = scratchFloat64("plan-x-new", n);
  const xSpare = scratchFloat64("plan-x-spare", n);
  aStatic.fill(0);
  bSource.fill(0);
  // The static stamps record where they write (see stampPattern). Room for the usual four
  // entries per device; a device kind with more makes the list grow.
  const touched = new TouchedList(scratchInt32("plan-touched", 2 * (4 * devices.length + 16)));
  const staticTarget: StampTarget = { a: aStatic, b: bSource, n, touched };
  for (const d of devices) {
    d.stampStatic?.(staticTarget);
    d.stampSource?.(bSource);
  }
  // Borrowed like the rest: allocating even a small typed array costs about a Newton iteration.
  const isNodeRow = scratchUint8("plan-node-rows", n);
  for (let i = 0; i < n; i++) isNodeRow[i] = unknowns[i]!.kind === "branch" ? 0 : 1;
  const patternRowStart = scratchInt32("plan-pattern-rows", n + 1);
  const nonlinear: DeviceInstance[] = [];
  for (let k = 0; k < devices.length; k++) if (devices[k]!.nonlinear) nonlinear.push(devices[k]!);
  const pattern = stampPattern(n, aStatic, touched, isNodeRow, nonlinear, patternRowStart);
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
      aStatic,
      bSource,
      a,
      b,
      x,
      xNew,
      xSpare,
      pattern,
      patternRowStart,
      isNodeRow,
      target: { a, b, n },
    },
  };
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
