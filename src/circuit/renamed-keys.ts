// Keys the format used before its vocabulary was made our own. The format changed in place, so
// an old key is an error like any unknown key; this table only makes the hint say what replaced it.

/** Old key → the keys that replaced it, in the order they are tried against the object's own keys. */
const RENAMED: Readonly<Record<string, readonly { readonly key: string; readonly note?: string }[]>> = {
  dc: [{ key: "voltage" }, { key: "current" }],
  ac: [{ key: "signal", note: "a peak amplitude used where a signal level matters; it no longer scales the gain" }],
  surfacePotential: [{ key: "fermiPotential", note: "the Fermi potential φF, half the old value: 2φF = 0.6 V is φF = 0.3 V" }],
  energyGap: [
    { key: "forwardVoltageDrift", note: "temperature behaviour as a datasheet states it: the forward-voltage drift at `driftCurrent`, e.g. -2 mV/°C at 1 mA" },
    { key: "baseEmitterDrift", note: "temperature behaviour as a datasheet states it: the VBE drift at collector current `driftCurrent`, e.g. -2 mV/°C at 1 mA" },
  ],
  saturationCurrentExponent: [
    { key: "forwardVoltageDrift", note: "the saturation current's temperature law now follows from the forward-voltage drift at `driftCurrent`" },
    { key: "baseEmitterDrift", note: "the saturation current's temperature law now follows from the VBE drift at `driftCurrent`" },
  ],
  betaExponent: [{ key: "betaDrift", note: "the current gain's drift in %/°C, e.g. 0.5 %/°C" }],
  lambda: [{ key: "channelLengthModulation", note: "λ in 1/V, spelled out" }],
  control: [{ key: "sense", note: "the id of any resistor, capacitor, inductor or source; the current through it from its first pin to its second" }],
};

/** A hint for an old key when one of its replacements is allowed where it stands, else undefined. */
export function renamedKeyHint(key: string, allowed: readonly string[]): string | undefined {
  for (const r of RENAMED[key] ?? []) {
    if (allowed.includes(r.key)) return `\`${key}\` is now \`${r.key}\`${r.note ? ` (${r.note})` : ""}`;
  }
  return undefined;
}
