// Number and text formatting shared by the human-facing reporters (markdown, console, JUnit, SARIF):
// SI prefixes with units ("6.8 mA"), margins as percentages, one-line finding details.
import { SI_DISPLAY_PREFIXES, siPrefixIndex } from "../units/si-format.js";
import type { Finding, PassedCheck } from "./document.js";

/** Three significant digits: enough to compare against a spec, short enough for a table cell. */
const SIGNIFICANT_DIGITS = 3;

/** Units that take SI prefixes; anything else (V/V, dB, %, °C) is printed as a plain number. */
const PREFIXED_UNITS = new Set(["A", "V", "W", "Ω", "ohm", "F", "H", "Hz", "s", "S"]);

/** A number to SIGNIFICANT_DIGITS significant digits, without trailing zeros or exponent noise. */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? "NaN" : value > 0 ? "∞" : "-∞";
  if (value === 0) return "0";
  const abs = Math.abs(value);
  if (abs >= 1e6 || abs < 1e-3) {
    const [mantissa, exponent] = value.toExponential(SIGNIFICANT_DIGITS - 1).split("e");
    return `${trimZeros(mantissa ?? "0")}e${Number(exponent)}`;
  }
  return String(Number(value.toPrecision(SIGNIFICANT_DIGITS)));
}

function trimZeros(text: string): string {
  // Only the mantissa: "2.50e-25" must not lose the exponent's digits.
  const [mantissa, exponent] = text.split(/(?=e)/i) as [string, string | undefined];
  if (!mantissa.includes(".")) return text;
  return mantissa.replace(/0+$/, "").replace(/\.$/, "") + (exponent ?? "");
}

/** "6.8 mA", "4.7 kΩ", "0.98 V/V"; a null value prints as "—". */
export function formatQuantity(value: number | null, unit: string | null): string {
  if (value === null) return "—";
  const u = unit ?? "";
  if (!PREFIXED_UNITS.has(u) || !Number.isFinite(value) || value === 0) {
    return u ? `${formatNumber(value)} ${u}` : formatNumber(value);
  }
  // The largest prefix not above the value; should rounding still carry to 1000 (999.96 → "1000"),
  // the next prefix up reads better.
  const i = siPrefixIndex(Math.abs(value));
  const [scale, prefix] = SI_DISPLAY_PREFIXES[i]!;
  let scaled = Number((value / scale).toPrecision(SIGNIFICANT_DIGITS));
  let p = prefix;
  if (Math.abs(scaled) >= 1000 && i > 0) {
    const [upScale, upPrefix] = SI_DISPLAY_PREFIXES[i - 1]!;
    scaled = Number((value / upScale).toPrecision(SIGNIFICANT_DIGITS));
    p = upPrefix;
  }
  return `${trimZeros(String(scaled))} ${p}${u}`;
}

/** Signed relative margin as a percentage: -0.133 → "-13.3%"; null → "—". */
export function formatMargin(margin: number | null): string {
  if (margin === null || !Number.isFinite(margin)) return "—";
  const pct = margin * 100;
  const text = Math.abs(pct) >= 100 ? pct.toFixed(0) : trimZeros(pct.toPrecision(SIGNIFICANT_DIGITS));
  return `${pct > 0 ? "+" : ""}${text === "-0" ? "0" : text}%`;
}

/**
 * "measured 6.8 mA vs limit 6 mA, margin -800 µA" (the margin in the quantity's own unit: a
 * percentage of dB or of a signed voltage says nothing), or "" when the check is not numeric.
 */
export function measuredVsLimit(item: Finding | PassedCheck): string {
  if (item.measured === null && item.limit === null) return "";
  if (item.measured === null) return `limit ${formatQuantity(item.limit, item.unit)}`;
  return `measured ${measuredLimitMargin(item)}`;
}

/**
 * Each number once, in its own unit: "687 µA vs limit 800 µA, margin -113 µA" (the margin is the
 * distance to the limit, negative when violated); "" when the check is not numeric. The unit is
 * the finding's (a team rule may give any text; callers neutralise it for their sink).
 */
export function measuredLimitMargin(item: Finding | PassedCheck): string {
  if (item.measured === null) return "";
  const measured = formatQuantity(item.measured, item.unit);
  if (item.limit === null) return measured;
  const text = `${measured} vs limit ${formatQuantity(item.limit, item.unit)}`;
  const distance = Math.abs(item.measured - item.limit);
  if (item.margin === null || !Number.isFinite(distance)) return text;
  const sign = item.margin < 0 && distance > 0 ? "-" : item.margin > 0 && distance > 0 ? "+" : "";
  return `${text}, margin ${sign}${formatQuantity(distance, item.unit)}`;
}

/** `file:line:col` of a finding. */
export function findingLocation(f: Finding): string {
  return `${f.file}:${f.line}:${f.column}`;
}

/** Plural helper: "1 circuit", "3 circuits". */
export function count(n: number, noun: string): string {
  return `${n} ${noun}${n === 1 ? "" : "s"}`;
}
