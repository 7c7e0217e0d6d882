// Small builders for circuit texts in tests.
import { loadCircuitText } from "../../src/circuit/index.js";
import type { Circuit, InputError } from "../../src/circuit/types.js";

export const HEADER = "format: opgate-circuit/1\nname: t\n";

/** A YAML circuit from a components block (and optional other top-level blocks). */
export function yaml(components: string, extra = ""): string {
  return `${HEADER}${extra}components:\n${components}`;
}

export function load(text: string, file = "t.yaml"): Circuit {
  const r = loadCircuitText(text, file);
  if (!r.ok) throw new Error(`expected the circuit to load:\n${r.errors.map((e) => `${e.line}:${e.column} ${e.message}`).join("\n")}`);
  return r.circuit;
}

export function errorsOf(text: string, file = "t.yaml"): readonly InputError[] {
  const r = loadCircuitText(text, file);
  if (r.ok) throw new Error("expected the circuit to be rejected");
  return r.errors;
}

export const VCC = "  - { id: V1, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }\n";
