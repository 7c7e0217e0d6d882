// Small helpers rules share: numbers for people (SI prefixes), temperatures, intended regions.
import type { Circuit, Component, ComponentKind } from "../circuit/types.js";
import { siPrefix, type SiPrefix } from "../units/si-format.js";

/** Kelvin of 0 °C (SI definition). */
export const ZERO_CELSIUS_K = 273.15;

/** `0.0041, "A"` → "4.1 mA"; three significant digits, units the trade writes. */
export function formatQuantity(value: number, unit: string): string {
  if (!Number.isFinite(value)) return `${value} ${unit}`.trim();
  if (unit === "dB" || unit === "%" || unit === "V/V" || unit === "°C") return `${trim(value.toPrecision(3))} ${unit}`;
  const mag = Math.abs(value);
  const [scale, prefix]: SiPrefix = mag === 0 ? [1, ""] : siPrefix(mag);
  return `${trim((value / scale).toPrecision(3))} ${prefix}${unit}`.trim();
}

function trim(s: string): string {
  return s.includes("e") ? s : s.includes(".") ? s.replace(/\.?0+$/, "") : s;
}

export function toCelsius(kelvin: number): number {
  return kelvin - ZERO_CELSIUS_K;
}

/** Regions a transistor kind can be in, the amplifying one first. */
export const REGIONS: Readonly<Record<"npn" | "pnp" | "nmos" | "pmos", readonly string[]>> = {
  npn: ["active", "saturation", "cutoff", "reverse"],
  pnp: ["active", "saturation", "cutoff", "reverse"],
  nmos: ["saturation", "triode", "cutoff"],
  pmos: ["saturation", "triode", "cutoff"],
};

export function isTransistorKind(kind: ComponentKind): kind is "npn" | "pnp" | "nmos" | "pmos" {
  return kind === "npn" || kind === "pnp" || kind === "nmos" || kind === "pmos";
}

/** A transistor wired as a diode: collector tied to base (BJT), drain tied to gate (MOSFET). */
export function isDiodeConnected(c: Component): boolean {
  if (c.kind === "npn" || c.kind === "pnp") return c.pins.collector === c.pins.base;
  if (c.kind === "nmos" || c.kind === "pmos") return c.pins.drain === c.pins.gate;
  return false;
}

/** The region the specs name for a device, else the amplifying region of its kind. */
export function intendedRegion(circuit: Circuit, id: string, kind: "npn" | "pnp" | "nmos" | "pmos"): string {
  return circuit.specs.devices.find((d) => d.device === id)?.region ?? REGIONS[kind][0]!;
}

/**
 * Allowed fraction of a rating at an ambient temperature, for a linear derating curve: full
 * up to `fullUntil`, falling linearly to zero at `zeroAt` (both °C).
 */
export function deratingFactor(ambientC: number, fullUntil: number, zeroAt: number): number {
  if (ambientC <= fullUntil) return 1;
  if (ambientC >= zeroAt) return 0;
  return (zeroAt - ambientC) / (zeroAt - fullUntil);
}
