// The parameters a variation analysis moves: every component value with a tolerance band, every
// model parameter with a datasheet spread, and the ambient temperature when the config gives a
// range. Each moves on its own (no grouping by kind or sign). Design values without a band
// (an exact resistor) are parameters too, with a zero band: they never move in a corner or a
// sample, but their sensitivities tell a reviewer which part to change.
import type { Circuit, Component, Model, Spread, Toleranced } from "../circuit/types.js";
import { SPREAD_FIELDS, valueField, variedQuantities } from "./quantities.js";
import type { VariationSettings } from "./types.js";

export type ParameterKind = "tolerance" | "spread" | "temperature";

export interface Parameter {
  /** "R1.value", "VCC.voltage", "small-npn.beta", "temperature". */
  readonly key: string;
  /** Short name for people: "R1", "VCC", "β(small-npn)", "temperature". */
  readonly name: string;
  readonly kind: ParameterKind;
  /** The component id or model id it belongs to (empty for temperature). */
  readonly owner: string;
  readonly min: number;
  readonly nominal: number;
  readonly max: number;
}

/** Symbols the trade writes for model parameters (datasheets and textbooks). */
const SYMBOL: Readonly<Record<(typeof SPREAD_FIELDS)[number], string>> = {
  beta: "β",
  reverseBeta: "βR",
  saturationCurrent: "Is",
  earlyVoltage: "VA",
  ideality: "n",
  threshold: "Vth",
  kPrime: "k′",
  channelLengthModulation: "λ",
  breakdownVoltage: "VZ",
};

const KELVIN_OFFSET = 273.15;

export function hasBand(p: Parameter): boolean {
  return p.max > p.min;
}

/**
 * Every parameter in a stable order: components in file order (toleranced or a design value),
 * then model spreads by model id, then temperature.
 */
export function variationParameters(circuit: Circuit, settings: Pick<VariationSettings, "temperature">): Parameter[] {
  const banded = new Map(variedQuantities(circuit).map((q) => [q.key, q]));
  const out: Parameter[] = [];
  for (const c of circuit.components) {
    const field = valueField(c);
    if (!field) continue;
    const key = `${c.id}.${field}`;
    const t = (c as unknown as Record<string, { nominal: number; min: number; max: number }>)[field]!;
    if (!Number.isFinite(t.nominal) || t.nominal === 0) continue;
    const q = banded.get(key);
    out.push({ key, name: c.id, kind: "tolerance", owner: c.id, min: q ? q.min : t.nominal, nominal: t.nominal, max: q ? q.max : t.nominal });
  }
  for (const q of banded.values()) {
    if (q.group !== "device") continue;
    const [model, field] = splitKey(q.key);
    out.push({ key: q.key, name: `${SYMBOL[field as keyof typeof SYMBOL] ?? field}(${model})`, kind: "spread", owner: model, min: q.min, nominal: q.nominal, max: q.max });
  }
  const t = settings.temperature;
  if (t && t.max > t.min) {
    out.push({ key: "temperature", name: "temperature", kind: "temperature", owner: "", min: t.min, nominal: Math.min(t.max, Math.max(t.min, circuit.temperature)), max: t.max });
  }
  return out;
}

function splitKey(key: string): [string, string] {
  const dot = key.lastIndexOf(".");
  return [key.slice(0, dot), key.slice(dot + 1)];
}

export function nominalValues(params: readonly Parameter[]): Float64Array {
  return Float64Array.from(params, (p) => p.nominal);
}

/** The circuit with each parameter at the given value (temperature in kelvin). */
export function circuitAt(circuit: Circuit, params: readonly Parameter[], values: Float64Array): Circuit {
  return circuitMaker(circuit, params)(values);
}

/**
 * `circuitAt` for many value sets of one circuit (every corner or sample): where each parameter
 * goes is worked out once, so a sample copies only the components and models it changes (the
 * same circuit as withPicks gives, without a key string and map lookup per component).
 */
export function circuitMaker(circuit: Circuit, params: readonly Parameter[]): (values: Float64Array) => Circuit {
  const componentAt = new Map(circuit.components.map((c, i) => [c.id, i]));
  // Per parameter: a component index with its field, a model id with its field, or temperature.
  const targets = params.map((p) => {
    if (p.kind === "temperature") return { kind: "temperature" as const };
    const dot = p.key.lastIndexOf(".");
    const field = p.key.slice(dot + 1);
    if (p.kind === "tolerance") return { kind: "component" as const, index: componentAt.get(p.owner)!, field };
    return { kind: "model" as const, model: p.owner, field };
  });
  return (values) => {
    let components: Component[] | null = null;
    let models: Map<string, Model> | null = null;
    let temperature = circuit.temperature;
    for (let i = 0; i < params.length; i++) {
      const v = values[i]!;
      const t = targets[i]!;
      if (t.kind === "temperature") {
        temperature = v;
        continue;
      }
      if (v === params[i]!.nominal) continue;
      if (t.kind === "component") {
        components ??= circuit.components.slice();
        // Copied with Object.assign: on Node 20 a spread followed by a computed key costs
        // microseconds per part once the component shapes vary (every corner and sample pays it).
        const c = components[t.index]!;
        const band = Object.assign({}, (c as unknown as Record<string, Toleranced>)[t.field]!, { nominal: v });
        const copy = Object.assign({}, c) as unknown as Record<string, unknown>;
        copy[t.field] = band;
        components[t.index] = copy as unknown as Component;
      } else {
        models ??= new Map(circuit.models);
        const m = models.get(t.model)!;
        const spread = Object.assign({}, (m as unknown as Record<string, Spread>)[t.field]!, { typ: v });
        const copy = Object.assign({}, m) as unknown as Record<string, unknown>;
        copy[t.field] = spread;
        models.set(t.model, copy as unknown as Model);
      }
    }
    if (components === null && models === null && temperature === circuit.temperature) return circuit;
    return { ...circuit, components: components ?? circuit.components, models: models ?? circuit.models, temperature };
  };
}

/** One parameter's place in a set: "min", "max", or its value. */
export interface ParameterSetting {
  readonly parameter: string;
  readonly name: string;
  readonly value: number;
  readonly at: "min" | "max" | "value";
  /** For a component value: its deviation from nominal, %. */
  readonly percent?: number;
}

/** The parameters that are off nominal (temperature whenever a range is given). */
export function settingsOf(params: readonly Parameter[], values: Float64Array): ParameterSetting[] {
  const out: ParameterSetting[] = [];
  for (let i = 0; i < params.length; i++) {
    const p = params[i]!;
    const v = values[i]!;
    if (v === p.nominal && p.kind !== "temperature") continue;
    const at = v === p.min && hasBand(p) ? "min" : v === p.max && hasBand(p) ? "max" : "value";
    out.push({ parameter: p.key, name: p.name, value: v, at, ...(p.kind === "tolerance" ? { percent: ((v - p.nominal) / Math.abs(p.nominal)) * 100 } : {}) });
  }
  return out;
}

function signedNumber(v: number, digits = 3): string {
  const s = Number(Math.abs(v).toPrecision(digits)).toString();
  return `${v < 0 ? "\u2212" : "+"}${s}`;
}

/** "−40 °C" from kelvin. */
export function celsiusLabel(kelvin: number): string {
  const c = Number((kelvin - KELVIN_OFFSET).toFixed(1));
  return `${c < 0 ? "\u2212" : ""}${Math.abs(c)} °C`;
}

/** Compactly, for reports: `R1 −1 %, R2 +1 %, RC +5 %, β(npn) min, 60 °C`; "nominal values" when nothing moved. */
export function describeSettings(settings: readonly ParameterSetting[]): string {
  const parts = settings.map((s) => {
    if (s.parameter === "temperature") return celsiusLabel(s.value);
    if (s.percent !== undefined) return `${s.name} ${signedNumber(s.percent)} %`;
    return s.at === "value" ? `${s.name} ${Number(s.value.toPrecision(4))}` : `${s.name} ${s.at}`;
  });
  return parts.length ? parts.join(", ") : "nominal values";
}
