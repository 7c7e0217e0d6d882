// Signal excursions per unit of input: for one gain, the peak change of every transistor's
// terminal voltages and channel current, and of every node, when the input moves by 1 V (or
// 1 A). Taken at midband (flat-band view) and at the band edges, keeping the largest magnitude
// of each, so a rule can scale them by the input's stated amplitude and compare them with the
// distance to saturation/triode, to cutoff and to the rails.

import type { Circuit } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { classifyCapacitors } from "./midband.js";
import { buildNetwork, factorView, GROUND, type SmallSignalNetwork } from "./network.js";
import { inputShort, resolveGain, solveGain, type ResolvedGain } from "./probe.js";

export interface DeviceExcursion {
  readonly device: string;
  /** Peak |Δ(VCE)| (BJT) or |Δ(VDS − VGS)| (MOSFET: the triode edge moves with the gate), per unit input. */
  readonly edgeVoltage: number;
  /** Peak |ΔIC| or |ΔID| per unit input. */
  readonly current: number;
}

export interface Excursions {
  readonly gain: string;
  /** Where the figures were taken: "midband" and the band-edge frequencies that were reachable. */
  readonly views: readonly string[];
  readonly devices: readonly DeviceExcursion[];
  /** Peak |ΔV| per unit input by node name. */
  readonly nodes: ReadonlyMap<string, number>;
}

interface Phasors {
  readonly re: Float64Array;
  readonly im: Float64Array;
}

function read(net: SmallSignalNetwork, k: number, x: Phasors): [number, number] {
  return k === GROUND ? [0, 0] : [x.re[k] as number, x.im[k] as number];
}

/** The per-unit excursions of one gain, or a message when its network cannot be solved. */
export function excursions(circuit: Circuit, op: OperatingPoint, gainName: string): Excursions | string {
  const spec = circuit.specs.gains.find((s) => s.name === gainName);
  if (!spec) return `no gain named \`${gainName}\``;
  const built = buildNetwork(circuit, op);
  if (!built.ok) return built.message;
  const net = built.network;
  const g = resolveGain(circuit, net, spec);
  if (typeof g === "string") return g;
  const solutions: { view: string; x: Phasors }[] = [];
  const take = (view: string): void => {
    solveGain(net, g);
    solutions.push({ view, x: { re: net.xRe.slice(), im: net.xIm.slice() } });
  };
  const open = classifyCapacitors(net, g);
  if (inputShort(net, g, open) === null && factorView(net, { kind: "midband", open }) === null) take("midband");
  const band = circuit.specs.band;
  for (const f of band ? [band.low, band.high] : []) {
    if (factorView(net, { kind: "frequency", frequency: f }) === null) take(`${f} Hz`);
  }
  if (solutions.length === 0) return "the small-signal network is singular at midband and at the band edges";
  return collect(net, g, solutions);
}

function collect(net: SmallSignalNetwork, g: ResolvedGain, solutions: readonly { view: string; x: Phasors }[]): Excursions {
  const nodes = new Map<string, number>();
  for (const [name, k] of net.nodeIndex) {
    let peak = 0;
    for (const s of solutions) peak = Math.max(peak, Math.hypot(...read(net, k, s.x)));
    nodes.set(name, peak);
  }
  const devices: DeviceExcursion[] = [];
  for (const d of net.devices) {
    const c = net.circuit.components.find((x) => x.id === d.id);
    if (!c || (c.kind !== "npn" && c.kind !== "pnp" && c.kind !== "nmos" && c.kind !== "pmos")) continue;
    const n = d.pins.length;
    let edge = 0;
    let current = 0;
    for (const s of solutions) {
      // Pins: BJT [collector, base, emitter]; MOSFET [drain, gate, source, body].
      const v = Array.from(d.pins, (k) => read(net, k, s.x));
      let iRe = 0;
      let iIm = 0;
      for (let j = 0; j < n; j++) {
        const y = d.y[j] as number; // row 0: the collector/drain current
        iRe += y * v[j]![0];
        iIm += y * v[j]![1];
      }
      current = Math.max(current, Math.hypot(iRe, iIm));
      const bjt = c.kind === "npn" || c.kind === "pnp";
      // BJT: Δ(VC − VE). MOSFET: Δ(VD − VS) − Δ(VG − VS) = Δ(VD − VG).
      const other = bjt ? v[2]! : v[1]!;
      edge = Math.max(edge, Math.hypot(v[0]![0] - other[0], v[0]![1] - other[1]));
    }
    devices.push({ device: d.id, edgeVoltage: edge, current });
  }
  return { gain: g.spec.name, views: solutions.map((s) => s.view), devices, nodes };
}
