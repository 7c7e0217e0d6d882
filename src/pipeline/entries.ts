// Turns stage values (OperatingPoint, GainResult) into the plain entries of the results
// document: no internal matrices, and no non-finite numbers (JSON has none; null = unbounded).
import type { Circuit } from "../circuit/types.js";
import type { DeviceEntry, GainEntry, OperatingPointEntry } from "../report/document.js";
import type { SmallSignalResult } from "../smallsignal/types.js";
import type { OperatingPoint } from "../solve/types.js";

/** Fields of the solver's device records that are internal to the solve. */
const INTERNAL_FIELDS = new Set(["linear"]);

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

export function operatingPointEntry(op: OperatingPoint): OperatingPointEntry {
  const devices: Record<string, DeviceEntry> = {};
  for (const id of Object.keys(op.devices).sort()) {
    const record = op.devices[id] as unknown as Record<string, unknown>;
    const entry: Record<string, number | string | null> = {};
    for (const [key, value] of Object.entries(record)) {
      if (INTERNAL_FIELDS.has(key)) continue;
      if (typeof value === "number") entry[key] = finiteOrNull(value);
      else if (typeof value === "string") entry[key] = value;
    }
    devices[id] = entry as DeviceEntry;
  }
  const sources: Record<string, { current: number; power: number; voltage: number }> = {};
  for (const id of Object.keys(op.sources).sort()) {
    const s = op.sources[id]!;
    sources[id] = { current: s.current, power: s.power, voltage: s.voltage };
  }
  const nodes: Record<string, number> = {};
  for (const name of Object.keys(op.nodes).sort()) nodes[name] = op.nodes[name]!;
  return {
    nodes,
    sources,
    devices,
    solve: { iterations: op.stats.iterations, residual: op.stats.residual, aid: op.stats.aid },
  };
}

export function gainEntries(circuit: Circuit, result: SmallSignalResult): GainEntry[] {
  const out: GainEntry[] = [];
  for (const g of result.gains) {
    const spec = circuit.specs.gains.find((s) => s.name === g.name);
    if (!spec) continue;
    out.push({
      name: g.name,
      midband: g.midband,
      magnitude: g.magnitude,
      db: g.db,
      target: spec.target,
      window: { min: spec.window.min, max: spec.window.max },
      points: g.points.map((p) => ({ ...p })),
      inputImpedance: finiteOrNull(g.inputImpedance),
      outputImpedance: finiteOrNull(g.outputImpedance),
    });
  }
  return out;
}
