// Hand-built circuits and operating points for engine and rule tests that must not depend on
// the loader or solver (exact measured values at a boundary, failures on demand).
import type { Bjt, Capacitor, Circuit, Component, Model, Mosfet, Resistor, SourcePos, Specs } from "../../src/circuit/types.js";
import type { ScenarioAnalysis } from "../../src/pipeline/types.js";
import type { BjtPoint, DevicePoint, MosPoint, OperatingPoint, SolveFailure, SourcePoint } from "../../src/solve/types.js";
import type { GainResult, SmallSignalResult } from "../../src/smallsignal/types.js";

export const FILE = "boards/tide-gauge.yaml";

export function at(line: number, column = 3): SourcePos {
  return { file: FILE, line, column };
}

const NO_SPECS: Specs = { gains: [], supplies: [], devices: [] };

export function circuit(parts: { components?: Component[]; models?: Model[]; specs?: Partial<Specs>; temperature?: number; overrides?: Circuit["overrides"]; name?: string } = {}): Circuit {
  return {
    file: FILE,
    name: parts.name ?? "tide-gauge-front-end",
    temperature: parts.temperature ?? 298.15,
    ground: "gnd",
    parameters: new Map(),
    models: new Map((parts.models ?? []).map((m) => [m.id, m])),
    components: parts.components ?? [],
    nodes: [],
    specs: { ...NO_SPECS, ...parts.specs },
    overrides: parts.overrides ?? [],
    warnings: [],
    pos: at(1, 1),
  };
}

export function bjt(id: string, kind: "npn" | "pnp", line: number, model = "q"): Bjt {
  return { id, kind, model, pins: { collector: "c", base: "b", emitter: "e" }, pos: at(line) };
}

export function mos(id: string, kind: "nmos" | "pmos", line: number, model = "m"): Mosfet {
  return { id, kind, model, pins: { drain: "d", gate: "g", source: "s", body: "s" }, pos: at(line) };
}

export function resistor(id: string, line: number, extra: Partial<Resistor> = {}): Resistor {
  return { id, kind: "resistor", pins: { a: "a", b: "b" }, value: { nominal: 1000, min: 1000, max: 1000 }, pos: at(line), ...extra };
}

export function capacitor(id: string, line: number, voltageRating?: number): Capacitor {
  return { id, kind: "capacitor", pins: { a: "a", b: "b" }, value: { nominal: 1e-6, min: 1e-6, max: 1e-6 }, pos: at(line), ...(voltageRating !== undefined ? { voltageRating } : {}) };
}

const LINEAR = { pins: [], y: [] };

export function bjtPoint(kind: "npn" | "pnp", p: Partial<BjtPoint> = {}): BjtPoint {
  return { kind, collectorCurrent: 1e-3, baseCurrent: 1e-5, emitterCurrent: 1.01e-3, baseEmitterVoltage: 0.65, collectorEmitterVoltage: 5, region: "active", headroom: 4.7, power: 5e-3, transconductance: 0.0387, inputResistance: 2600, emitterResistance: 25.6, outputResistance: Infinity, linear: LINEAR, ...p };
}

export function mosPoint(kind: "nmos" | "pmos", p: Partial<MosPoint> = {}): MosPoint {
  return { kind, drainCurrent: 1e-3, gateSourceVoltage: 1.5, drainSourceVoltage: 5, overdrive: 0.5, threshold: 1, region: "saturation", headroom: 4.5, power: 5e-3, transconductance: 4e-3, bodyTransconductance: 0, outputResistance: Infinity, linear: LINEAR, ...p };
}

export function op(devices: Record<string, DevicePoint>, sources: Record<string, SourcePoint> = {}): OperatingPoint {
  return { ok: true, nodes: { gnd: 0 }, sources, devices, stats: { iterations: 5, residual: 1e-12, aid: "none" } };
}

export function failure(reason: string, parts: string[] = [], nodes: string[] = []): SolveFailure {
  return { ok: false, reason, parts, nodes, stats: { iterations: 100, residual: 1, aid: "source-stepping" } };
}

export function gain(name: string, judged: number, extra: Partial<GainResult> = {}): GainResult {
  const magnitude = Math.abs(judged);
  return { name, midband: judged, everyCapacitorShort: judged, openAtMidband: [], magnitude, db: 20 * Math.log10(magnitude), points: [], judged, inputImpedance: 1e4, outputImpedance: 100, ...extra };
}

export function small(gains: GainResult[], errors: SmallSignalResult["errors"] = []): SmallSignalResult {
  return { gains, errors };
}

export function analysis(c: Circuit, solve: OperatingPoint | SolveFailure, scenario = "nominal", smallSignal: SmallSignalResult | null = null): ScenarioAnalysis {
  return { scenario: { id: scenario, label: scenario, circuit: c }, solve, smallSignal: solve.ok ? (smallSignal ?? small([])) : null };
}
