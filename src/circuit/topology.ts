// Topology checks on a resolved circuit: ids, model references, DC paths to ground, loops of
// voltage sources and DC shorts, nodes fed only by current sources, and spec references.
import { shortestPath } from "./graph-path.js";
import { isSensable, SENSED_KINDS_TEXT } from "./sense.js";
import { didYouMean } from "./suggest.js";
import type { Circuit, Component, InputError, SourcePos } from "./types.js";

export interface TopologyResult {
  readonly errors: InputError[];
  readonly warnings: InputError[];
}

/** Union–find over node names, for connectivity. */
class Groups {
  private parent = new Map<string, string>();
  find(x: string): string {
    let p = this.parent.get(x) ?? x;
    if (p !== x) {
      p = this.find(p);
      this.parent.set(x, p);
    }
    return p;
  }
  join(a: string, b: string): boolean {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return false;
    this.parent.set(ra, rb);
    return true;
  }
}

const at = (pos: SourcePos) => ({ file: pos.file, line: pos.line, column: pos.column });

/** Pin pairs that conduct at DC (capacitors open; MOSFET gates and control inputs draw no current). */
function conductingPairs(c: Component): [string, string][] {
  switch (c.kind) {
    case "resistor":
    case "inductor":
      return [[c.pins.a, c.pins.b]];
    case "voltage-source":
      return [[c.pins.plus, c.pins.minus]];
    case "diode":
      return [[c.pins.anode, c.pins.cathode]];
    case "npn":
    case "pnp":
      return [
        [c.pins.base, c.pins.emitter],
        [c.pins.collector, c.pins.emitter],
      ];
    case "nmos":
    case "pmos":
      return [
        [c.pins.drain, c.pins.source],
        [c.pins.body, c.pins.source],
      ];
    case "vcvs":
    case "ccvs":
      return [[c.pins.plus, c.pins.minus]];
    default:
      return [];
  }
}

/** Pin pairs that are fixed-voltage branches at DC: a loop of them has no solution. */
function voltageBranch(c: Component): [string, string] | undefined {
  if (c.kind === "voltage-source" || c.kind === "vcvs" || c.kind === "ccvs") return [c.pins.plus, c.pins.minus];
  if (c.kind === "inductor" && c.seriesResistance === 0) return [c.pins.a, c.pins.b];
  return undefined;
}

export function checkTopology(circuit: Circuit): TopologyResult {
  const errors: InputError[] = [];
  const warnings: InputError[] = [];
  const g = circuit.ground;
  const byId = new Map<string, Component>();

  for (const c of circuit.components) {
    const first = byId.get(c.id);
    if (first) {
      errors.push({ ...at(c.pos), message: `duplicate component id \`${c.id}\` (first used on line ${first.pos.line})`, hint: "give every component a unique id", parts: [c.id] });
    } else byId.set(c.id, c);
  }

  for (const c of circuit.components) {
    if (c.kind === "diode" || c.kind === "npn" || c.kind === "pnp" || c.kind === "nmos" || c.kind === "pmos") {
      const m = circuit.models.get(c.model);
      if (!m) {
        const suggestion = didYouMean(c.model, circuit.models.keys());
        const known = [...circuit.models.keys()];
        errors.push({ ...at(c.pos), message: `component ${c.id} uses unknown model \`${c.model}\``, hint: suggestion ?? (known.length ? `models in this file: ${known.join(", ")}` : `define it under \`models:\` with kind ${c.kind}`), parts: [c.id] });
      } else if (m.kind !== c.kind) {
        errors.push({ ...at(c.pos), message: `component ${c.id} is ${c.kind === "npn" || c.kind === "nmos" ? "an" : "a"} ${c.kind} but model \`${c.model}\` is of kind ${m.kind}`, hint: `use a model of kind ${c.kind}`, parts: [c.id] });
      }
    }
    if (c.kind === "cccs" || c.kind === "ccvs") {
      const sensed = byId.get(c.sense);
      const candidates = [...byId.values()].filter(isSensable).map((x) => x.id);
      if (!sensed) errors.push({ ...at(c.pos), message: `component ${c.id}: sense \`${c.sense}\` is not a component in this file`, hint: didYouMean(c.sense, candidates) ?? `name the ${SENSED_KINDS_TEXT} whose current controls this source`, parts: [c.id] });
      else if (!isSensable(sensed)) errors.push({ ...at(c.pos), message: `component ${c.id}: sense \`${c.sense}\` is a ${sensed.kind}; a controlled source senses the current of a ${SENSED_KINDS_TEXT}`, hint: "sense a resistor in series with it instead", parts: [c.id, c.sense] });
    }
  }

  // Pin usage: ground must be used; single-connection nodes are suspicious.
  const uses = new Map<string, string[]>();
  for (const c of circuit.components) for (const [pin, n] of Object.entries(c.pins)) {
    if (c.kind === "nmos" || c.kind === "pmos") if (pin === "body" && n === c.pins.source) continue;
    if (!uses.has(n)) uses.set(n, []);
    uses.get(n)!.push(`${c.id}.${pin}`);
  }
  if (!uses.has(g)) {
    errors.push({ file: circuit.file, line: circuit.pos.line, column: circuit.pos.column, message: `no component connects to the ground node \`${g}\``, hint: (uses.has("0") ? "set `ground: 0` if node 0 is your reference" : undefined) ?? didYouMean(g, uses.keys()) ?? "connect the reference node, or set `ground:` to the name you use", nodes: [g] });
    return { errors, warnings };
  }
  for (const [n, list] of uses) {
    if (n !== g && list.length === 1) {
      const [id] = list[0]!.split(".");
      const c = byId.get(id!);
      warnings.push({ ...(c ? at(c.pos) : { file: circuit.file }), message: `node \`${n}\` has only one connection (${list[0]})`, hint: "an open pin carries no current; check the node name for a typo", nodes: [n], parts: [id!] });
    }
  }

  // DC paths: conducting parts plus current sources; anything not reaching ground floats.
  const dc = new Groups();
  const all = new Groups();
  for (const c of circuit.components) {
    for (const [a, b] of conductingPairs(c)) {
      dc.join(a, b);
      all.join(a, b);
    }
    if (c.kind === "current-source" || c.kind === "vccs" || c.kind === "cccs") {
      const [a, b] = c.kind === "current-source" ? [c.pins.from, c.pins.to] : [c.pins.plus, c.pins.minus];
      all.join(a, b);
    }
  }
  const gather = (groups: Groups, root: string) => circuit.nodes.filter((n) => groups.find(n) === root);
  const floatingRoots = new Set(circuit.nodes.filter((n) => all.find(n) !== all.find(g)).map((n) => all.find(n)));
  for (const root of floatingRoots) {
    const nodes = gather(all, root);
    const set = new Set(nodes);
    const isolating = circuit.components.filter((c) => Object.values(c.pins).some((n) => set.has(n)) && Object.values(c.pins).some((n) => !set.has(n)));
    const names = isolating.map((c) => (c.kind === "capacitor" ? `capacitor ${c.id}` : c.kind === "nmos" || c.kind === "pmos" ? `the gate of ${c.id}` : `${c.kind} ${c.id}`));
    const first = circuit.components.find((c) => Object.values(c.pins).some((n) => set.has(n)));
    errors.push({
      ...(first ? at(first.pos) : { file: circuit.file }),
      message: `node${nodes.length > 1 ? "s" : ""} ${nodes.map((n) => `\`${n}\``).join(", ")} ${nodes.length > 1 ? "have" : "has"} no DC path to ground \`${g}\`${names.length ? ` (isolated by ${names.join(", ")})` : ""}`,
      hint: "a capacitor is open at DC and a MOSFET gate draws no current: add a bias resistor to a defined node",
      nodes,
      parts: isolating.map((c) => c.id),
    });
  }
  // Connected only through current sources: the node voltage is undefined at DC.
  const csRoots = new Set(circuit.nodes.filter((n) => all.find(n) === all.find(g) && dc.find(n) !== dc.find(g)).map((n) => dc.find(n)));
  for (const root of csRoots) {
    const nodes = gather(dc, root);
    const set = new Set(nodes);
    const sources = circuit.components.filter((c) => (c.kind === "current-source" || c.kind === "vccs" || c.kind === "cccs") && Object.values(c.pins).some((n) => set.has(n)) && Object.values(c.pins).some((n) => !set.has(n)));
    const first = sources[0] ?? circuit.components.find((c) => Object.values(c.pins).some((n) => set.has(n)));
    errors.push({
      ...(first ? at(first.pos) : { file: circuit.file }),
      message: `node${nodes.length > 1 ? "s" : ""} ${nodes.map((n) => `\`${n}\``).join(", ")} ${nodes.length > 1 ? "are" : "is"} fed only by current sources (${sources.map((c) => c.id).join(", ")}); ${nodes.length > 1 ? "their voltages are" : "its voltage is"} undefined at DC`,
      hint: "give the node a DC path to ground through a resistor, a device or a voltage source",
      nodes,
      parts: sources.map((c) => c.id),
    });
  }

  // Loops of voltage sources and DC shorts.
  const vg = new Groups();
  const edges: { id: string; a: string; b: string }[] = [];
  for (const c of circuit.components) {
    const br = voltageBranch(c);
    if (!br) continue;
    const [a, b] = br;
    if (a === b) {
      errors.push({ ...at(c.pos), message: `${c.kind} ${c.id} has both pins on node \`${a}\``, hint: "connect its pins to two different nodes", parts: [c.id], nodes: [a] });
      continue;
    }
    if (!vg.join(a, b)) {
      const found = [...shortestPath(edges, (e) => [e.a, e.b], b, a).map((e) => e.id), c.id];
      // Start the cycle at the part that comes first in the file, so the message reads naturally.
      const order = circuit.components.map((x) => x.id);
      const first = found.reduce((best, id, i) => (order.indexOf(id) < order.indexOf(found[best]!) ? i : best), 0);
      const loop = [...found.slice(first), ...found.slice(0, first)];
      errors.push({
        ...at(c.pos),
        message: `loop of voltage sources and DC shorts: ${loop.join(" → ")} → ${loop[0]}`,
        hint: "their voltages cannot all hold; remove one or put a resistance (e.g. an inductor's seriesResistance) in the loop",
        parts: loop,
        nodes: [a, b],
      });
    }
    edges.push({ id: c.id, a, b });
  }

  // Specs must reference things that exist.
  const known = new Set([...circuit.nodes, g]);
  for (const s of circuit.specs.gains) {
    const input = byId.get(s.input);
    if (!input) errors.push({ ...at(s.pos), message: `gain spec \`${s.name}\`: input \`${s.input}\` is not a component in this file`, hint: didYouMean(s.input, byId.keys()) ?? "name the voltage or current source that drives the input", parts: [s.input] });
    else if (input.kind !== "voltage-source" && input.kind !== "current-source") errors.push({ ...at(s.pos), message: `gain spec \`${s.name}\`: input \`${s.input}\` is a ${input.kind}, not an independent source`, hint: "name the voltage or current source that drives the input", parts: [s.input] });
    for (const n of [s.output.plus, s.output.minus]) {
      if (!known.has(n)) errors.push({ ...at(s.pos), message: `gain spec \`${s.name}\`: output node \`${n}\` does not exist`, hint: didYouMean(n, known) ?? `nodes: ${[...known].join(", ")}`, nodes: [n] });
    }
  }
  for (const s of circuit.specs.supplies) {
    const src = byId.get(s.source);
    if (!src) errors.push({ ...at(s.pos), message: `supply spec: source \`${s.source}\` is not a component in this file`, hint: didYouMean(s.source, byId.keys()) ?? "name a voltage source", parts: [s.source] });
    else if (src.kind !== "voltage-source" && src.kind !== "current-source") errors.push({ ...at(s.pos), message: `supply spec: \`${s.source}\` is a ${src.kind}, not a source`, hint: "name a voltage source", parts: [s.source] });
  }
  const deviceKinds = new Set(["diode", "npn", "pnp", "nmos", "pmos"]);
  for (const d of circuit.specs.devices) {
    const c = byId.get(d.device);
    if (!c) errors.push({ ...at(d.pos), message: `device spec: \`${d.device}\` is not a component in this file`, hint: didYouMean(d.device, byId.keys()) ?? "name a transistor or diode", parts: [d.device] });
    else if (!deviceKinds.has(c.kind)) errors.push({ ...at(d.pos), message: `device spec: \`${d.device}\` is a ${c.kind}, not a transistor or diode`, parts: [d.device] });
    else if (d.region !== undefined) {
      const ok = c.kind === "nmos" || c.kind === "pmos" ? ["saturation", "triode", "cutoff"] : c.kind === "diode" ? [] : ["active", "saturation", "cutoff", "reverse"];
      if (!ok.includes(d.region)) errors.push({ ...at(d.pos), message: `device spec \`${d.device}\`: region \`${d.region}\` does not apply to a ${c.kind}`, hint: ok.length ? `regions of a ${c.kind}: ${ok.join(", ")}` : "a diode has no region spec; use minCurrent/maxCurrent", parts: [d.device] });
    }
  }
  return { errors, warnings };
}
