// The parts of a gain's entry drawn for reviewers rather than judged: the nominal frequency
// response (chart data) and the hand-analysis chain. Both come from the nominal operating point
// only; a failure in either leaves a note in the entry and never stops the check.
import type { Circuit } from "../circuit/types.js";
import type { ExplanationEntry, GainEntry, JsonSafe, ResponseEntry } from "../report/document.js";
import { explainGain } from "../smallsignal/explain/index.js";
import { defaultSweepRange, sweepGain } from "../smallsignal/index.js";
import type { OperatingPoint } from "../solve/types.js";

/**
 * Above this many nodes the extras are skipped: each costs tens of dense complex factorisations
 * (a sweep of ~75 points, a few probes per stage), which is nothing for a board-level stage and
 * seconds for a generated thousand-node network, where a hand-analysis chain reads nobody anyway.
 */
export const EXTRAS_MAX_NODES = 400;

/** Deep copy with every non-finite number replaced by null (JSON has none). */
export function jsonSafe<T>(value: T): JsonSafe<T> {
  const walk = (v: unknown): unknown => {
    if (typeof v === "number") return Number.isFinite(v) ? v : null;
    if (Array.isArray(v)) return v.map(walk);
    if (v && typeof v === "object") return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, walk(x)]));
    return v;
  };
  return walk(value) as JsonSafe<T>;
}

function response(circuit: Circuit, op: OperatingPoint, name: string): ResponseEntry {
  const band = circuit.specs.band ? { low: circuit.specs.band.low, high: circuit.specs.band.high } : null;
  const sweep = sweepGain(circuit, op, name, defaultSweepRange(circuit));
  return {
    points: sweep.points.map((p) => jsonSafe({ frequency: p.frequency, re: p.re, im: p.im, magnitude: p.magnitude, db: p.db, phaseDeg: p.phaseDeg })) as ResponseEntry["points"],
    lowCorner: sweep.lowCorner,
    highCorner: sweep.highCorner,
    reference: sweep.reference !== null && Number.isFinite(sweep.reference) ? sweep.reference : null,
    band,
    ...(sweep.error ? { error: sweep.error } : {}),
  };
}

function explanation(circuit: Circuit, op: OperatingPoint, name: string): ExplanationEntry | null {
  const spec = circuit.specs.gains.find((s) => s.name === name);
  const e = spec ? explainGain(circuit, op, spec) : null;
  return e ? jsonSafe(e) : null;
}

export function withGainExtras(entries: readonly GainEntry[], circuit: Circuit, op: OperatingPoint): GainEntry[] {
  if (circuit.nodes.length > EXTRAS_MAX_NODES) {
    const skipped: ResponseEntry = { points: [], lowCorner: null, highCorner: null, reference: null, band: null, error: `skipped: ${circuit.nodes.length} nodes (charts and explanations up to ${EXTRAS_MAX_NODES})` };
    return entries.map((g) => ({ ...g, response: skipped, explanation: null }));
  }
  return entries.map((g) => {
    let r: ResponseEntry;
    let x: ExplanationEntry | null;
    try {
      r = response(circuit, op, g.name);
    } catch (err) {
      r = { points: [], lowCorner: null, highCorner: null, reference: null, band: null, error: `internal error: ${err instanceof Error ? err.message : String(err)}` };
    }
    try {
      x = explanation(circuit, op, g.name);
    } catch {
      x = null;
    }
    return { ...g, response: r, explanation: x };
  });
}
