// What a current-controlled source may sense: the current through a two-terminal part, from its
// first pin to its second. Shared by the topology check, the bias solve and the small-signal network.
import type { Component } from "./types.js";

/** Part kinds whose current a cccs/ccvs can sense, with their first and second pin. */
export const SENSED_PINS = {
  resistor: ["a", "b"],
  capacitor: ["a", "b"],
  inductor: ["a", "b"],
  "voltage-source": ["plus", "minus"],
  "current-source": ["from", "to"],
} as const;

export type SensedKind = keyof typeof SENSED_PINS;

export function isSensable(c: Component): c is Extract<Component, { kind: SensedKind }> {
  return Object.hasOwn(SENSED_PINS, c.kind);
}

/** "resistor, capacitor, inductor, voltage-source or current-source", for messages. */
export const SENSED_KINDS_TEXT = ((k: readonly string[]) => `${k.slice(0, -1).join(", ")} or ${k[k.length - 1]}`)(Object.keys(SENSED_PINS));
