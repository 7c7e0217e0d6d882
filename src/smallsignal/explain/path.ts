// The signal path of a gain at midband, as a hand analysis reads it: capacitors are shorts,
// zeroed supplies are AC ground, and the signal travels from the input source's node to the
// output node through resistors (passive links) and through transistors from an input terminal
// to an output terminal (base→collector, base→emitter, emitter→collector; gate→drain,
// gate→source, source→drain). The path of least cost is taken, where a transistor costs far
// less than a resistor, so the signal is read as going *through* the devices, not around them
// through bias or feedback resistors. Consecutive base→emitter / emitter→collector steps of two
// like transistors sharing an emitter node, and a base→collector step whose emitter node is
// shared with a like transistor, are read as a differential pair.

import type { Bjt, Circuit, Component, Mosfet } from "../../circuit/types.js";
import type { StageConfiguration, Terminal } from "./types.js";

/** Cost of a passive link (a resistor) on the path. */
const PASSIVE_COST = 1;
/** Cost of passing through a transistor: small, so the path prefers devices, and fewer of them. */
const DEVICE_COST = 0.01;

export type Transistor = Bjt | Mosfet;

export interface PathStage {
  readonly device: Transistor;
  readonly partner: Transistor | null;
  readonly configuration: StageConfiguration;
  readonly input: { readonly terminal: Terminal; readonly node: string; readonly device: Transistor };
  readonly output: { readonly terminal: Terminal; readonly node: string; readonly device: Transistor };
  /** Differential pair: +1 when the output is the partner's collector/drain, −1 for the input device's own. */
  readonly pairSign: 1 | -1 | 0;
}

/** Union–find over node names. */
class NodeSets {
  private readonly parent = new Map<string, string>();
  find(a: string): string {
    let x = a;
    for (let p = this.parent.get(x); p !== undefined && p !== x; p = this.parent.get(x)) {
      const gp = this.parent.get(p) ?? p;
      this.parent.set(x, gp);
      x = gp;
    }
    return x;
  }
  union(a: string, b: string): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra !== rb) this.parent.set(ra, rb);
  }
}

export interface AcNodes {
  /** The AC node (midband) a circuit node belongs to. */
  readonly of: (node: string) => string;
  readonly isGround: (node: string) => boolean;
}

/** Midband AC nodes for a gain whose input source is `inputId`: shorts merged, zeroed sources to ground. */
export function acNodes(circuit: Circuit, inputId: string): AcNodes {
  const sets = new NodeSets();
  for (const c of circuit.components) {
    if (c.id === inputId) continue;
    if (c.kind === "voltage-source") sets.union(c.pins.plus, c.pins.minus);
    if (c.kind === "vcvs" || c.kind === "ccvs") continue; // their outputs are not AC ground
  }
  const input = circuit.components.find((c) => c.id === inputId);
  const inputPins = input && input.kind === "voltage-source" ? [input.pins.plus, input.pins.minus] : [];
  for (const c of circuit.components) {
    if (c.kind !== "capacitor") continue;
    const [a, b] = [sets.find(c.pins.a), sets.find(c.pins.b)];
    // A capacitor across the input source does not short it: the ideal source wins.
    if (inputPins.length === 2) {
      const ends = new Set([sets.find(inputPins[0] as string), sets.find(inputPins[1] as string)]);
      if (ends.has(a) && ends.has(b)) continue;
    }
    sets.union(c.pins.a, c.pins.b);
  }
  const ground = (): string => sets.find(circuit.ground);
  return { of: (n) => sets.find(n), isGround: (n) => sets.find(n) === ground() };
}

export function isTransistor(c: Component): c is Transistor {
  return c.kind === "npn" || c.kind === "pnp" || c.kind === "nmos" || c.kind === "pmos";
}

const BJT_STEPS: readonly [Terminal, Terminal, StageConfiguration][] = [
  ["base", "collector", "common-emitter"],
  ["base", "emitter", "common-collector"],
  ["emitter", "collector", "common-base"],
];
const MOS_STEPS: readonly [Terminal, Terminal, StageConfiguration][] = [
  ["gate", "drain", "common-source"],
  ["gate", "source", "common-drain"],
  ["source", "drain", "common-gate"],
];

export function terminalNode(t: Transistor, terminal: Terminal): string {
  return (t.pins as unknown as Record<string, string>)[terminal] as string;
}

interface Edge {
  readonly to: string;
  readonly cost: number;
  readonly step?: { readonly device: Transistor; readonly from: Terminal; readonly to: Terminal; readonly configuration: StageConfiguration };
}

/** The stages from `fromNode` to `toNode`, or null when no path through the network exists. */
export function findStages(circuit: Circuit, ac: AcNodes, fromNode: string, toNode: string): PathStage[] | null {
  const edges = new Map<string, Edge[]>();
  const link = (a: string, e: Edge): void => {
    if (ac.isGround(a) || ac.isGround(e.to) || a === e.to) return;
    const list = edges.get(a) ?? [];
    list.push(e);
    edges.set(a, list);
  };
  for (const c of circuit.components) {
    if (c.kind === "resistor") {
      const [a, b] = [ac.of(c.pins.a), ac.of(c.pins.b)];
      link(a, { to: b, cost: PASSIVE_COST });
      link(b, { to: a, cost: PASSIVE_COST });
    } else if (isTransistor(c)) {
      const steps = c.kind === "npn" || c.kind === "pnp" ? BJT_STEPS : MOS_STEPS;
      for (const [from, to, configuration] of steps) {
        link(ac.of(terminalNode(c, from)), { to: ac.of(terminalNode(c, to)), cost: DEVICE_COST, step: { device: c, from, to, configuration } });
      }
    }
  }
  const start = ac.of(fromNode);
  const goal = ac.of(toNode);
  if (ac.isGround(start) || ac.isGround(goal)) return null;
  // Dijkstra; the graphs are small (a node per AC node), so a linear scan for the minimum will do.
  const dist = new Map<string, number>([[start, 0]]);
  const back = new Map<string, { from: string; edge: Edge }>();
  const done = new Set<string>();
  for (;;) {
    let best: string | null = null;
    for (const [n, d] of dist) if (!done.has(n) && (best === null || d < (dist.get(best) as number))) best = n;
    if (best === null) return null;
    if (best === goal) break;
    done.add(best);
    for (const e of edges.get(best) ?? []) {
      const d = (dist.get(best) as number) + e.cost;
      if (d < (dist.get(e.to) ?? Infinity)) {
        dist.set(e.to, d);
        back.set(e.to, { from: best, edge: e });
      }
    }
  }
  const steps: NonNullable<Edge["step"]>[] = [];
  for (let n = goal; n !== start; ) {
    const b = back.get(n) as { from: string; edge: Edge };
    if (b.edge.step) steps.unshift(b.edge.step);
    n = b.from;
  }
  return toStages(circuit, ac, steps);
}

function sameFamily(a: Transistor, b: Transistor): boolean {
  return a.kind === b.kind;
}

function toStages(circuit: Circuit, ac: AcNodes, steps: readonly NonNullable<Edge["step"]>[]): PathStage[] {
  const stages: PathStage[] = [];
  const common = (t: Transistor): Terminal => (t.kind === "npn" || t.kind === "pnp" ? "emitter" : "source");
  const control = (t: Transistor): Terminal => (t.kind === "npn" || t.kind === "pnp" ? "base" : "gate");
  const out = (t: Transistor): Terminal => (t.kind === "npn" || t.kind === "pnp" ? "collector" : "drain");
  for (let i = 0; i < steps.length; i++) {
    const s = steps[i]!;
    const next = steps[i + 1];
    const d = s.device;
    // Follower into a grounded-base/gate device through a shared emitter/source node: one pair.
    if (
      next &&
      s.from === control(d) &&
      s.to === common(d) &&
      next.from === common(next.device) &&
      next.to === out(next.device) &&
      sameFamily(d, next.device) &&
      ac.of(terminalNode(d, common(d))) === ac.of(terminalNode(next.device, common(next.device)))
    ) {
      stages.push({
        device: d,
        partner: next.device,
        configuration: "differential-pair",
        input: { terminal: s.from, node: terminalNode(d, s.from), device: d },
        output: { terminal: next.to, node: terminalNode(next.device, next.to), device: next.device },
        pairSign: 1,
      });
      i++;
      continue;
    }
    // Base→collector whose emitter node is shared with a like transistor: one side of a pair.
    if (s.from === control(d) && s.to === out(d)) {
      const shared = ac.of(terminalNode(d, common(d)));
      const partner = ac.isGround(shared)
        ? undefined
        : circuit.components.find(
            (c): c is Transistor =>
              isTransistor(c) && c.id !== d.id && sameFamily(c, d) && ac.of(terminalNode(c, common(c))) === shared &&
              ac.of(terminalNode(c, control(c))) !== ac.of(terminalNode(d, control(d))),
          );
      if (partner) {
        stages.push({
          device: d,
          partner,
          configuration: "differential-pair",
          input: { terminal: s.from, node: terminalNode(d, s.from), device: d },
          output: { terminal: s.to, node: terminalNode(d, s.to), device: d },
          pairSign: -1,
        });
        continue;
      }
    }
    stages.push({
      device: d,
      partner: null,
      configuration: s.configuration,
      input: { terminal: s.from, node: terminalNode(d, s.from), device: d },
      output: { terminal: s.to, node: terminalNode(d, s.to), device: d },
      pairSign: 0,
    });
  }
  return stages;
}
