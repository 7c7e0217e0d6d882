// Values as people write them: numbers with SI prefixes and unit symbols, IEC 60062 letter-position
// codes, temperatures in °C or K, percentages. Everything comes out in SI base units.

/** What a field measures; decides which unit symbols it accepts. */
export type Quantity =
  | "resistance"
  | "capacitance"
  | "inductance"
  | "voltage"
  | "current"
  | "power"
  | "frequency"
  | "time"
  | "temperature"
  | "length"
  | "energy-ev"
  | "transconductance"
  | "transconductance-parameter"
  | "per-volt"
  | "sqrt-volt"
  | "volt-per-kelvin"
  /** A relative drift: stored as a fraction per kelvin (0.5 %/°C → 0.005). */
  | "percent-per-kelvin"
  | "capacitance-per-area"
  | "gain"
  | "dimensionless"
  /** Parameters: any unit is accepted and dropped (the value is in SI base units). */
  | "any";

interface QuantityInfo {
  readonly units: readonly string[];
  readonly shown: string;
}

const Q: Record<Exclude<Quantity, "any">, QuantityInfo> = {
  resistance: { units: ["\u03A9", "\u2126", "ohm", "Ohm", "ohms"], shown: "Ω (ohm)" },
  capacitance: { units: ["F"], shown: "F (farad)" },
  inductance: { units: ["H"], shown: "H (henry)" },
  voltage: { units: ["V"], shown: "V (volt)" },
  current: { units: ["A"], shown: "A (ampere)" },
  power: { units: ["W"], shown: "W (watt)" },
  frequency: { units: ["Hz"], shown: "Hz (hertz)" },
  time: { units: ["s"], shown: "s (second)" },
  temperature: { units: ["K", "°C"], shown: "°C or K" },
  length: { units: ["m"], shown: "m (metre)" },
  "energy-ev": { units: ["eV"], shown: "eV" },
  transconductance: { units: ["S", "A/V"], shown: "A/V or S" },
  "transconductance-parameter": { units: ["A/V²", "A/V^2", "A/V2"], shown: "A/V²" },
  "per-volt": { units: ["1/V", "/V"], shown: "1/V" },
  "sqrt-volt": { units: ["√V", "V^0.5", "V^(1/2)"], shown: "√V" },
  "volt-per-kelvin": { units: ["V/K", "V/°C"], shown: "V/°C (or V/K)" },
  "percent-per-kelvin": { units: ["%/°C", "%/K"], shown: "%/°C (or %/K)" },
  "capacitance-per-area": { units: ["F/m²", "F/m^2", "F/m2"], shown: "F/m² (5 fF/µm² is 5 mF/m²)" },
  gain: { units: ["V/V", "A/A", "dB"], shown: "V/V (or dB)" },
  dimensionless: { units: [], shown: "a plain number" },
};

/** SI prefixes (SI Brochure, 9th edition, table 7), the subset used on circuit boards; u is the usual ASCII stand-in for µ. */
export const SI_PREFIXES: Readonly<Record<string, number>> = {
  f: 1e-15,
  p: 1e-12,
  n: 1e-9,
  u: 1e-6,
  "µ": 1e-6, // U+00B5 micro sign
  "μ": 1e-6, // U+03BC Greek small mu
  m: 1e-3,
  k: 1e3,
  M: 1e6,
  G: 1e9,
  T: 1e12,
};

/** IEC 60062 letter-position code multipliers: R (and uppercase K) for resistors, p n µ m for capacitors. */
const IEC_CODE_LETTERS: Readonly<Record<string, number>> = { R: 1, K: 1e3, ...SI_PREFIXES };
delete (IEC_CODE_LETTERS as Record<string, number>)["f"];

/** Offset between the Celsius and kelvin scales (SI Brochure: T/K = t/°C + 273.15). */
export const CELSIUS_OFFSET_K = 273.15;

export type ValueResult = { readonly ok: true; readonly value: number } | { readonly ok: false; readonly message: string; readonly hint?: string };

const NUMBER = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/s;
const IEC_CODE = /^([+-]?)(\d*)([RKkMGTpnuµμm])(\d+)$/;
/** Letter at the end (`100R`, `10K`): the IEC 60062 form for whole values; R and K only, as the others are plain SI prefixes. */
const IEC_CODE_WHOLE = /^([+-]?)(\d+)([RK])$/;

const ok = (value: number): ValueResult => ({ ok: true, value });
const fail = (message: string, hint?: string): ValueResult => ({ ok: false, message, ...(hint ? { hint } : {}) });

function unitOwner(suffix: string): Exclude<Quantity, "any"> | undefined {
  for (const [q, info] of Object.entries(Q) as [Exclude<Quantity, "any">, QuantityInfo][]) {
    if (info.units.includes(suffix)) return q;
    const p = suffix.slice(0, 1);
    if (p in SI_PREFIXES && info.units.includes(suffix.slice(1))) return q;
  }
  return undefined;
}

function allUnits(): string[] {
  return Object.values(Q).flatMap((i) => [...i.units]);
}

/** Applies a unit (already split from its prefix) to a number in that unit. */
function applyUnit(n: number, unit: string, quantity: Quantity): number {
  if (unit === "°C") return n + CELSIUS_OFFSET_K;
  if (unit === "%/°C" || unit === "%/K") return n / 100;
  if (unit === "dB" && quantity === "gain") return Math.pow(10, n / 20);
  return n;
}

/**
 * Parses a number or a value string for a field measuring `quantity`. Expressions (`= …`) are
 * not handled here; see expressions.ts.
 */
export function parseValue(raw: unknown, quantity: Quantity): ValueResult {
  if (typeof raw === "number") return Number.isFinite(raw) ? ok(raw) : fail(`${raw} is not a finite number`);
  if (typeof raw !== "string") return fail("expected a number or a value string");
  const text = raw.trim();
  if (text === "") return fail("the value is empty");
  const code = IEC_CODE.exec(text);
  if (code) {
    const [, sign, whole, letter, frac] = code as unknown as [string, string, string, string, string];
    if (letter === "R" && quantity !== "resistance" && quantity !== "any")
      return fail(`the resistor code \`${text}\` (IEC 60062) is for resistances`, `this field expects ${Q[quantity as Exclude<Quantity, "any">]?.shown ?? "another unit"}`);
    if (letter === "K" && quantity !== "resistance" && quantity !== "any") return fail(`\`${text}\`: K is kelvin, kilo is k`, "write k for kilo");
    const mult = IEC_CODE_LETTERS[letter]!;
    const n = Number(`${sign}${whole || "0"}.${frac}`) * mult;
    return ok(n);
  }
  const whole = IEC_CODE_WHOLE.exec(text);
  if (whole && (quantity === "resistance" || quantity === "any")) return ok(Number(`${whole[1]}${whole[2]}`) * IEC_CODE_LETTERS[whole[3]!]!);
  const m = NUMBER.exec(text);
  if (!m) {
    return fail(`\`${text}\` is not a number`, "write a number with an optional SI prefix and unit, e.g. 4.7k, 10 uF, 2.2 kΩ, or an expression `= name`");
  }
  const n = Number(m[1]);
  const suffix = (m[2] ?? "").trim();
  if (!Number.isFinite(n)) return fail(`\`${text}\` is out of range`);
  if (suffix === "") return ok(n);
  if (/^meg/i.test(suffix)) return fail(`\`${text}\`: \`${suffix.slice(0, 3)}\` is not an SI prefix`, `write M for mega, e.g. ${m[1]}M${suffix.slice(3)} (SI prefixes are case-sensitive: m is milli, M is mega)`);
  if (suffix === "%") {
    if (quantity === "dimensionless" || quantity === "any") return ok(n / 100);
    return fail(`\`${text}\`: a percentage does not fit this field`, `write the value in ${Q[quantity as Exclude<Quantity, "any">].shown}`);
  }
  if (quantity === "any") {
    if (suffix in SI_PREFIXES) return ok(n * SI_PREFIXES[suffix]!);
    if (allUnits().includes(suffix)) return ok(applyUnit(n, suffix, quantity));
    const p = suffix.slice(0, 1);
    if (p in SI_PREFIXES && allUnits().includes(suffix.slice(1)) && suffix.slice(1) !== "°C") return ok(n * SI_PREFIXES[p]!);
    return fail(`\`${text}\`: unknown unit or prefix \`${suffix}\``, "use an SI prefix (f p n u µ m k M G T) and unit (Ω V A F H W Hz s K °C)");
  }
  const info = Q[quantity];
  // Whole unit first, so `1 m` on a length is a metre and `2 T`… is tera only without a unit.
  if (info.units.includes(suffix)) return ok(applyUnit(n, suffix, quantity));
  const prefix = suffix.slice(0, 1);
  const rest = suffix.slice(1);
  if (prefix in SI_PREFIXES) {
    if (rest === "" && quantity !== "temperature" && quantity !== "gain") return ok(n * SI_PREFIXES[prefix]!);
    if (info.units.includes(rest)) {
      if (rest === "°C" || rest === "dB") return fail(`\`${text}\`: ${rest} takes no prefix`, `write the number in ${rest}`);
      return ok(n * SI_PREFIXES[prefix]!);
    }
  }
  if (prefix === "K" && quantity !== "temperature" && (rest === "" || info.units.includes(rest)))
    return fail(`\`${text}\`: K is kelvin, not a prefix`, `write k for kilo, e.g. ${m[1]}k${rest}`);
  if (suffix === "C" && quantity === "temperature") return fail(`\`${text}\`: C is coulomb`, `write ${m[1]} °C`);
  const owner = unitOwner(suffix);
  if (owner && owner !== quantity) {
    return fail(`\`${text}\` is ${article(owner)} ${owner.replace(/-/g, " ")}, but this field is ${article(quantity)} ${quantity.replace(/-/g, " ")}`, `expected unit: ${info.shown}`);
  }
  return fail(`\`${text}\`: unknown unit or prefix \`${suffix}\``, `expected ${info.shown}, with an optional SI prefix (f p n u µ m k M G T)`);
}

function article(word: string): string {
  return /^[aeiou]/.test(word) ? "an" : "a";
}

/** The unit a quantity is shown in, for messages. */
export function unitShown(quantity: Quantity): string {
  return quantity === "any" ? "any unit" : Q[quantity].shown;
}

/** A relative tolerance as a fraction: `"5%"` → 0.05, 0.05 → 0.05; 5 is rejected with a hint. */
export function parseFraction(raw: unknown): ValueResult {
  if (typeof raw === "number") {
    if (!Number.isFinite(raw) || raw < 0) return fail(`tolerance ${raw} must be a fraction between 0 and 1`);
    if (raw > 1) return fail(`tolerance ${raw} is more than 1 (100 %)`, `write "${raw}%" for a percentage, or the fraction ${raw / 100}`);
    return ok(raw);
  }
  if (typeof raw === "string") {
    const t = raw.trim();
    const m = /^\+?(\d+(?:\.\d*)?|\.\d+)\s*%$/.exec(t);
    if (m) {
      // The same limit as for a bare fraction: a symmetric band over 100 % reaches below zero.
      const pct = Number(m[1]);
      if (pct > 100) return fail(`tolerance ${t} is more than 100 %: a symmetric band would reach below zero`, "give the limits instead, e.g. { min: \"-50%\", max: \"+300%\" }");
      return ok(pct / 100);
    }
    if (/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(t)) return parseFraction(Number(t));
    if (/^[±]/.test(t)) return parseFraction(t.slice(1));
    return fail(`tolerance \`${t}\` is not a percentage`, 'write e.g. "5%" or { min, max }');
  }
  return fail("tolerance must be a percentage such as \"5%\" or { min, max }");
}

/** A signed percentage used inside {min, max} tolerances (`"-20%"` → −0.2), or undefined when not a percentage. */
export function parseSignedPercent(raw: unknown): number | undefined {
  if (typeof raw !== "string") return undefined;
  const m = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+))\s*%$/.exec(raw.trim());
  return m ? Number(m[1]) / 100 : undefined;
}
