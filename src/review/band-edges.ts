// What the two band-edge rules share: the gain at band.low and band.high against the flat-band
// midband, the capacitor that sets each corner (its share by short-/open-circuit time
// constants) and the value of it that would meet the allowed deviation. The rules differ only
// in the limit they judge and their severity (band-edges: 3 dB, error; band-flatness: the
// flatness option, warning).
import type { Circuit, GainSpec } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { capacitorForEdge } from "../smallsignal/index.js";
import type { CapacitorShare, GainResult } from "../smallsignal/types.js";
import { formatQuantity, intendedRegion, isTransistorKind, REGIONS } from "./quantities.js";

/** Frequencies within this relative distance are the same point (they come from the same spec value). */
const SAME_FREQUENCY = 1e-9;

/** The half-power level: the band spec is not met beyond it (the −3 dB corner is the band edge by definition). */
export const BAND_EDGE_DB = 3;

export type Edge = "low" | "high";

export interface EdgeMeasure {
  readonly spec: GainSpec;
  readonly result: GainResult;
  readonly edge: Edge;
  readonly frequency: number;
  /** Gain at the edge relative to midband, dB (negative: below midband). */
  readonly relativeDb: number;
  /** Subject of the finding: "<gain> at band.low". */
  readonly subject: string;
}

/**
 * The gain at each band edge, per gain; gains without a result or band points are skipped
 * (gain-window reports them). None while a transistor meant to amplify is outside its
 * amplifying region: the band of a stage that does not amplify is not the designed band, and
 * naming the capacitor that "sets" it misleads (a saturated transistor makes an emitter bypass
 * capacitor look like one that limits the top of the band). The region rule, and gain-window
 * for the gain itself, report such a scenario; the band is judged in the scenarios where the
 * stage amplifies.
 */
export function edgeMeasures(circuit: Circuit, op: OperatingPoint, gains: readonly GainResult[] | undefined): EdgeMeasure[] {
  const band = circuit.specs.band;
  if (!band || !gains) return [];
  if (notAmplifying(circuit, op).length > 0) return [];
  const out: EdgeMeasure[] = [];
  for (const spec of circuit.specs.gains) {
    const result = gains.find((g) => g.name === spec.name);
    if (!result || !(result.magnitude > 0)) continue;
    for (const edge of ["low", "high"] as const) {
      const frequency = band[edge];
      const p = result.points.find((x) => Math.abs(x.frequency - frequency) <= SAME_FREQUENCY * frequency);
      if (!p || !Number.isFinite(p.db)) continue;
      out.push({ spec, result, edge, frequency, relativeDb: p.db - result.db, subject: `${spec.name} at band.${edge}` });
    }
  }
  return out;
}

export function capacitorName(c: { readonly id: string; readonly between?: string }): string {
  return c.between ? `${c.id}'s ${c.between} capacitance` : c.id;
}

/**
 * Transistors meant to amplify (no other region named in specs.devices) that are outside their
 * amplifying region at this operating point. While one is, the small-signal network describes
 * a stage that does not amplify, and which capacitor "sets" a band edge says nothing about the
 * designed amplifier: a saturated transistor makes an emitter bypass capacitor look like one
 * that limits the top of the band.
 */
export function notAmplifying(circuit: Circuit, op: OperatingPoint): { id: string; region: string; wanted: string }[] {
  const out: { id: string; region: string; wanted: string }[] = [];
  for (const c of circuit.components) {
    if (!isTransistorKind(c.kind)) continue;
    const point = op.devices[c.id];
    if (!point || !("region" in point)) continue;
    const wanted = intendedRegion(circuit, c.id, c.kind);
    if (wanted === REGIONS[c.kind][0] && point.region !== wanted) out.push({ id: c.id, region: point.region, wanted });
  }
  return out;
}

/** The parts of a finding's message after the measured deviation: corner, dominant capacitor, value that meets `allowedDb`. */
export function explainEdge(circuit: Circuit, op: OperatingPoint, m: EdgeMeasure, allowedDb: number): { text: string; hint: string } {
  const edges = m.result.edges;
  const corner = m.edge === "low" ? edges?.lowCorner : edges?.highCorner;
  const cornerText =
    corner === null || corner === undefined
      ? `no −3 dB ${m.edge === "low" ? "lower" : "upper"} corner found near the band`
      : `the −3 dB ${m.edge === "low" ? "lower" : "upper"} corner is at ${formatQuantity(corner, "Hz")}`;
  const shares: readonly CapacitorShare[] = (m.edge === "low" ? edges?.low : edges?.high) ?? [];
  const top = shares[0];
  if (!top) {
    return {
      text: `${cornerText}; no capacitor sets this corner (an inductor or a device without capacitances does)`,
      hint: m.edge === "low" ? "check the inductors and DC paths that limit the low end, or raise band.low" : "check what limits the high end, or lower band.high",
    };
  }
  const kind = m.edge === "low" ? "short-circuit" : "open-circuit";
  const who = capacitorName(top);
  const share = `${who} (${formatQuantity(top.value, "F")}) sets ${formatQuantity(top.share * 100, "%")} of that corner (${kind} time constant ${formatQuantity(top.timeConstant, "s")}, sees ${formatQuantity(top.resistance, "Ω")})`;
  const needed = capacitorForEdge(circuit, op, m.spec.name, top, m.frequency, m.edge, allowedDb);
  let fix: string;
  if (!needed) fix = "";
  else if (!needed.reachable)
    fix = `; no value of ${who} alone keeps band.${m.edge} within ${formatQuantity(allowedDb, "dB")} (the next capacitor in line limits it: ${shares[1] ? capacitorName(shares[1]) : "the device"})`;
  else fix = `; ${who} ${m.edge === "low" ? "≥" : "≤"} ${formatQuantity(needed.value, "F")} would keep band.${m.edge} within ${formatQuantity(allowedDb, "dB")}`;
  const hint =
    m.edge === "low"
      ? `enlarge ${who}${needed?.reachable ? ` to at least ${formatQuantity(needed.value, "F")}` : ""}, or raise band.low if the band was specified too wide`
      : top.between
        ? `lower the resistance ${top.id}'s ${top.between} capacitance sees (source or load resistance), cut the stage's gain, or use a cascode or a faster device`
        : `reduce ${who}${needed?.reachable ? ` to at most ${formatQuantity(needed.value, "F")}` : ""} or the resistance it sees, or lower band.high if the band was specified too wide`;
  return { text: `${cornerText}; ${share}${fix}`, hint };
}
