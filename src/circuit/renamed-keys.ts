// Keys the format used before its vocabulary was made our own. The format changed in place, so
// an old key is an error like any unknown key; this table only makes the hint say what replaced it.
//
// Some of the old model keys were another program's parameter names. We do not write those names
// anywhere, so they are looked up by the first 16 hex digits of the SHA-256 of the lower-cased key;
// the hint still names the key the author wrote and the key that replaced it.
import { createHash } from "node:crypto";

interface Replacement {
  readonly key: string;
  readonly note?: string;
}

const DRIFT: readonly Replacement[] = [
  { key: "forwardVoltageDrift", note: "temperature behaviour as a datasheet states it: the forward-voltage drift at `driftCurrent`, e.g. -2 mV/°C at 1 mA" },
  { key: "baseEmitterDrift", note: "temperature behaviour as a datasheet states it: the VBE drift at collector current `driftCurrent`, e.g. -2 mV/°C at 1 mA" },
];

/** Our own earlier keys, by name: old key → its replacements, tried in order against the object's allowed keys. */
const RENAMED: Readonly<Record<string, readonly Replacement[]>> = {
  dc: [{ key: "voltage" }, { key: "current" }],
  ac: [{ key: "signal", note: "a peak amplitude used where a signal level matters; it no longer scales the gain" }],
  lambda: [{ key: "channelLengthModulation", note: "λ in 1/V, spelled out" }],
  control: [{ key: "sense", note: "the id of any resistor, capacitor, inductor or source; the current through it from its first pin to its second" }],
};

/** Earlier keys that were another program's names, by digest (see the header). */
const RENAMED_BY_DIGEST: Readonly<Record<string, readonly Replacement[]>> = {
  "559c525e5b7d6ba6": [{ key: "fermiPotential", note: "the Fermi potential φF, half the old value: 2φF = 0.6 V is φF = 0.3 V" }],
  "1842886579c7f612": DRIFT,
  "8c987f9aad1e2db4": DRIFT,
  a4f421a8bc79f596: [{ key: "betaDrift", note: "the current gain's drift in %/°C, e.g. 0.5 %/°C" }],
};

function digest(key: string): string {
  return createHash("sha256").update(key.toLowerCase()).digest("hex").slice(0, 16);
}

/** A hint for an old key when one of its replacements is allowed where it stands, else undefined. */
export function renamedKeyHint(key: string, allowed: readonly string[]): string | undefined {
  const replacements = Object.hasOwn(RENAMED, key) ? RENAMED[key]! : (RENAMED_BY_DIGEST[digest(key)] ?? []);
  for (const r of replacements) {
    if (allowed.includes(r.key)) return `\`${key}\` is now \`${r.key}\`${r.note ? ` (${r.note})` : ""}`;
  }
  return undefined;
}
