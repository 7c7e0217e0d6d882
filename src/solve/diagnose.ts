// Why a DC system is singular, in words an engineer can act on: nodes without a DC path to
// ground, and loops of branches that each fix a voltage (sources, zero-resistance inductors,
// voltage-output controlled sources). Run on the compiled plan before Newton, and used to
// explain a singular factorisation.
import { shortestPath } from "../circuit/graph-path.js";
import type { DeviceInstance, Terminal } from "../devices/device.js";
import type { Plan } from "./plan.js";
import { scratchInt32 } from "./scratch.js";

export interface Diagnosis {
  readonly reason: string;
  readonly parts: readonly string[];
  readonly nodes: readonly string[];
}

/**
 * Union–find over node unknown indices, with ground as one extra slot (index n). Its array is
 * borrowed scratch (see scratch.ts): the check runs on every solve, and creating a typed array
 * costs about as much as the whole check on a small circuit.
 */
class UnionFind {
  private readonly parent: Int32Array;
  constructor(size: number, slot: string) {
    this.parent = scratchInt32(slot, size);
    for (let i = 0; i < size; i++) this.parent[i] = i;
  }
  find(a: number): number {
    let r = a;
    while (this.parent[r] !== r) r = this.parent[r]!;
    while (this.parent[a] !== r) {
      const next = this.parent[a]!;
      this.parent[a] = r;
      a = next;
    }
    return r;
  }
  union(a: number, b: number): boolean {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return false;
    // Deterministic: the smaller root wins.
    if (ra < rb) this.parent[rb] = ra;
    else this.parent[ra] = rb;
    return true;
  }
}

/** Slot of a terminal's node in the union–find (ground, index −1, is slot plan.n). */
function slotOf(plan: Plan, t: Terminal): number {
  return t.index < 0 ? plan.n : t.index;
}

function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join("");
  return `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;
}

/** Nodes with no DC path to ground (through resistors, junctions, channels, sources, inductors). */
export function findFloatingNodes(plan: Plan): Diagnosis | undefined {
  const uf = new UnionFind(plan.n + 1, "diagnose-floating");
  const devices = plan.devices;
  for (let k = 0; k < devices.length; k++) {
    const links = devices[k]!.dcLinks;
    for (let l = 0; l < links.length; l++) {
      const link = links[l]!;
      uf.union(slotOf(plan, link[0]), slotOf(plan, link[1]));
    }
  }
  const groundRoot = uf.find(plan.n);
  let floating: string[] | undefined;
  const { nodeNames, nodeSlots } = plan;
  for (let k = 0; k < nodeNames.length; k++) if (uf.find(nodeSlots[k]!) !== groundRoot) (floating ??= []).push(nodeNames[k]!);
  if (floating === undefined) return undefined;
  floating.sort();
  const set = new Set(floating);
  const parts = plan.devices.filter((d) => d.terminals.some((t) => set.has(t.node))).map((d) => d.id);
  const what = floating.length === 1 ? `node \`${floating[0]}\` has` : `nodes ${listWords(floating.map((f) => `\`${f}\``))} have`;
  const via = parts.length ? ` (it meets only ${listWords(parts)}, which carry no DC current to fix its voltage)` : "";
  return {
    reason: `${what} no DC path to ground${via}; add a DC path (e.g. a bias resistor) to ${floating.length === 1 ? "it" : "them"}`,
    parts,
    nodes: floating,
  };
}

/** A loop made only of voltage-fixing branches (two sources in parallel, a source shorted by an inductor…). */
export function findVoltageLoop(plan: Plan): Diagnosis | undefined {
  const uf = new UnionFind(plan.n + 1, "diagnose-loop");
  const edges: { d: DeviceInstance; p: string; q: string }[] = [];
  for (const d of plan.devices) {
    if (d.voltageLinks.length === 0) continue;
    for (const [tp, tq] of d.voltageLinks) {
      const p = tp.node;
      const q = tq.node;
      if (p === q || !uf.union(slotOf(plan, tp), slotOf(plan, tq))) {
        const path = p === q ? [] : shortestPath(edges, (e) => [e.p, e.q], p, q);
        const members = [...path.map((e) => e.d), d];
        const ids = members.map((m) => m.id);
        const nodes = [...new Set(members.flatMap((m) => m.voltageLinks.flat().map((t) => t.node)))].sort();
        const allSources = members.every((m) => m.kind === "voltage-source");
        const noun = allSources ? "voltage sources" : "voltage-fixing branches (sources, zero-resistance inductors, controlled voltage sources)";
        const reason =
          p === q
            ? `${d.id} has both pins on node \`${p}\`, so its voltage equation cannot hold; connect it across two different nodes`
            : `${noun} ${listWords(ids)} form a loop through ${listWords(nodes.map((nd) => `\`${nd}\``))}, so their voltages cannot all hold; remove one or put a resistance in the loop`;
        return { reason, parts: ids, nodes };
      }
      edges.push({ d, p, q });
    }
  }
  return undefined;
}

export function diagnoseTopology(plan: Plan): Diagnosis | undefined {
  return findVoltageLoop(plan) ?? findFloatingNodes(plan);
}
