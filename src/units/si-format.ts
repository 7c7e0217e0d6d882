// SI prefixes for showing values to people ("4.7 kΩ", "1.23 mA"), shared by every stage that
// prints numbers: one prefix table and one rule for picking the prefix. The number in front of
// the prefix is written in one of two explicit styles; how missing, infinite or prefix-less values
// read in rule messages and reports stays with those callers, whose texts differ on purpose.

/** A prefix: its scale and its symbol ("" for none). */
export type SiPrefix = readonly [scale: number, symbol: string];

/** The prefixes used for display (SI Brochure, 9th edition, table 7), tera down to femto, largest first. */
export const SI_DISPLAY_PREFIXES: readonly SiPrefix[] = [
  [1e12, "T"],
  [1e9, "G"],
  [1e6, "M"],
  [1e3, "k"],
  [1, ""],
  [1e-3, "m"],
  [1e-6, "µ"],
  [1e-9, "n"],
  [1e-12, "p"],
  [1e-15, "f"],
];

/**
 * A magnitude takes a prefix from this fraction of the prefix's scale up: a value that would round
 * to 1000 of the smaller prefix at three significant digits (999.5 m) reads as 1 of the larger one.
 */
const PREFIX_ROUNDING_FRACTION = 0.9995;

/** Position in SI_DISPLAY_PREFIXES of the prefix for a magnitude (> 0); femto for anything smaller. */
export function siPrefixIndex(magnitude: number): number {
  const i = SI_DISPLAY_PREFIXES.findIndex(([scale]) => magnitude >= scale * PREFIX_ROUNDING_FRACTION);
  return i === -1 ? SI_DISPLAY_PREFIXES.length - 1 : i;
}

/** The prefix for a magnitude (> 0); femto for anything smaller. */
export function siPrefix(magnitude: number): SiPrefix {
  return SI_DISPLAY_PREFIXES[siPrefixIndex(magnitude)]!;
}

/**
 * How the number in front of the prefix is written:
 * - `{ significant: n }`: n significant digits, trailing zeros dropped, ASCII minus ("4.7 kΩ", "-1.2 mA");
 * - `"by-size"`: two decimals under 10, one under 100, none above, so that columns line up
 *   ("4.70 kΩ", "47.0 kΩ", "470 kΩ"), the typographic minus "−", and an exponent instead of a
 *   prefix outside the table ("1.0e-16 A", "2.00e+15 Ω").
 */
export type SiDigits = { readonly significant: number } | "by-size";

/** Smallest scale in the table: below it "by-size" writes an exponent (numerical noise or leakage). */
const BELOW_TABLE = 1e-15;
/** A thousand of the largest scale: from here "by-size" writes an exponent. */
const ABOVE_TABLE = 1e15;

/** A value for a table cell: "—" when missing or NaN, "∞ Ω" / "−∞ Ω", "0 W", else prefixed. */
export function formatSiPrefixed(value: number | undefined, unit: string, digits: SiDigits): string {
  if (value === undefined || Number.isNaN(value)) return "—";
  if (!Number.isFinite(value)) return `${value < 0 ? "−" : ""}∞ ${unit}`.trim();
  if (value === 0) return `0 ${unit}`.trim();
  const mag = Math.abs(value);
  if (digits === "by-size") {
    if (mag < BELOW_TABLE) return `${value.toExponential(1)} ${unit}`.trim();
    if (mag >= ABOVE_TABLE) return `${value.toExponential(2)} ${unit}`.trim();
  }
  const [scale, prefix] = siPrefix(mag);
  const scaled = value / scale;
  const text = digits === "by-size" ? decimalsBySize(scaled) : String(Number(scaled.toPrecision(digits.significant)));
  return `${text} ${prefix}${unit}`.trim();
}

/** Three significant digits as fixed decimals (the thresholds are where toFixed would round up a digit). */
function decimalsBySize(scaled: number): string {
  const a = Math.abs(scaled);
  const decimals = a >= 99.95 ? 0 : a >= 9.995 ? 1 : 2;
  return scaled.toFixed(decimals).replace("-", "−");
}
