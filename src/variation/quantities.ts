// The quantities of a circuit that can vary: component values inside their tolerance band and
// model parameters inside their datasheet spread. Each knows how to put a picked value back.
import type { Circuit, Component, Model, Spread, Toleranced } from "../circuit/types.js";

export type QuantityGroup = "supply" | "passive" | "device";

export interface Quantity {
  /** Stable key: "R1.value", "VCC.voltage", "small-npn.beta". */
  readonly key: string;
  /** For labels: "R1", "VCC", "small-npn beta". */
  readonly label: string;
  readonly group: QuantityGroup;
  readonly min: number;
  readonly nominal: number;
  readonly max: number;
}

const SPREAD_FIELDS = [
  "beta",
  "reverseBeta",
  "saturationCurrent",
  "earlyVoltage",
  "ideality",
  "breakdownVoltage",
  "threshold",
  "kPrime",
  "channelLengthModulation",
] as const;

function valueField(c: Component): "value" | "voltage" | "current" | null {
  switch (c.kind) {
    case "resistor":
    case "capacitor":
    case "inductor":
      return "value";
    case "voltage-source":
      return "voltage";
    case "current-source":
      return "current";
    default:
      return null;
  }
}

function varies(t: { min: number; max: number }): boolean {
  return Number.isFinite(t.min) && Number.isFinite(t.max) && t.max > t.min;
}

/** Every quantity with a non-zero band, in a stable order (components in file order, then models by id). */
export function variedQuantities(circuit: Circuit): Quantity[] {
  const out: Quantity[] = [];
  for (const c of circuit.components) {
    const field = valueField(c);
    if (!field) continue;
    const t = (c as unknown as Record<string, Toleranced>)[field]!;
    if (!varies(t)) continue;
    const supply = c.kind === "voltage-source" || c.kind === "current-source";
    out.push({ key: `${c.id}.${field}`, label: c.id, group: supply ? "supply" : "passive", min: t.min, nominal: t.nominal, max: t.max });
  }
  for (const id of [...circuit.models.keys()].sort()) {
    const m = circuit.models.get(id)!;
    for (const f of SPREAD_FIELDS) {
      const s = (m as unknown as Record<string, Spread | undefined>)[f];
      if (!s || !varies(s)) continue;
      out.push({ key: `${id}.${f}`, label: `${id} ${f}`, group: "device", min: s.min, nominal: s.typ, max: s.max });
    }
  }
  return out;
}

/** A copy of the circuit with picked values in `nominal` (components) and `typ` (models). */
export function withPicks(circuit: Circuit, picks: ReadonlyMap<string, number>, temperature: number): Circuit {
  if (picks.size === 0 && temperature === circuit.temperature) return circuit;
  const components = circuit.components.map((c) => {
    const field = valueField(c);
    if (!field) return c;
    const v = picks.get(`${c.id}.${field}`);
    if (v === undefined) return c;
    const t = (c as unknown as Record<string, Toleranced>)[field]!;
    return { ...c, [field]: { ...t, nominal: v } } as Component;
  });
  const models = new Map<string, Model>();
  for (const [id, m] of circuit.models) {
    let next: Model = m;
    for (const f of SPREAD_FIELDS) {
      const v = picks.get(`${id}.${f}`);
      if (v === undefined) continue;
      const s = (next as unknown as Record<string, Spread>)[f]!;
      next = { ...next, [f]: { ...s, typ: v } } as Model;
    }
    models.set(id, next);
  }
  return { ...circuit, components, models, temperature };
}
