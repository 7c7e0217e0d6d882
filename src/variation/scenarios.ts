// Builds the scenarios a circuit is checked in: nominal, corners, or Monte Carlo samples.
//
// Corners: a full factorial over n quantities is 2^n solves, too many for a repository run. We
// take (1) nominal, (2) each quantity alone at its min and at its max (finds the sensitivity
// to every part), (3) the 2×2×2×2 combinations of the grouped extremes — every supply low/high,
// every device spread low/high, every passive low/high, temperature low/high — which catches
// the combined supply-and-spread worst cases reviewers ask about. The rule engine keeps the worst
// scenario per rule and subject, so more scenarios only ever find more.
import type { Circuit } from "../circuit/types.js";
import type { Scenario, VariationSettings } from "./types.js";
import { variedQuantities, withPicks, type Quantity, type QuantityGroup } from "./quantities.js";
import { normal, seededRandom, triangular } from "./random.js";

/** Tolerance bands are read as ±3σ of a normal distribution (common practice for Monte Carlo). */
const SIGMAS_PER_BAND = 3;
/** Upper bound on Monte Carlo samples per circuit, so a config typo cannot stall a nightly run. */
export const MAX_SAMPLES = 10_000;

const KELVIN_OFFSET = 273.15;

function celsius(kelvin: number): string {
  return `${Number((kelvin - KELVIN_OFFSET).toFixed(1))} °C`;
}

function nominalScenario(circuit: Circuit): Scenario {
  return { id: "nominal", label: `nominal, ${celsius(circuit.temperature)}`, circuit };
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, "0");
}

function cornerScenarios(circuit: Circuit, settings: VariationSettings): Scenario[] {
  const quantities = variedQuantities(circuit);
  const temps = settings.temperature ? [settings.temperature.min, settings.temperature.max] : [circuit.temperature];
  const specs: { label: string; picks: Map<string, number>; temperature: number }[] = [];

  for (const q of quantities) {
    specs.push({ label: `${q.label} min`, picks: new Map([[q.key, q.min]]), temperature: circuit.temperature });
    specs.push({ label: `${q.label} max`, picks: new Map([[q.key, q.max]]), temperature: circuit.temperature });
  }
  const groups: QuantityGroup[] = (["supply", "device", "passive"] as const).filter((g) => quantities.some((q) => q.group === g));
  const combos = 1 << groups.length;
  for (const temperature of temps) {
    for (let mask = 0; mask < combos; mask++) {
      const picks = new Map<string, number>();
      const parts: string[] = [];
      groups.forEach((g, i) => {
        const high = (mask >> i) & 1;
        parts.push(`${g === "supply" ? "supplies" : g === "device" ? "devices" : "passives"} ${high ? "max" : "min"}`);
        for (const q of quantities) if (q.group === g) picks.set(q.key, high ? q.max : q.min);
      });
      if (groups.length === 0 && temperature === circuit.temperature) continue;
      specs.push({ label: [...parts, celsius(temperature)].join(", "), picks, temperature });
    }
  }
  if (settings.temperature) {
    for (const temperature of temps) specs.push({ label: `nominal values, ${celsius(temperature)}`, picks: new Map(), temperature });
  }
  const width = String(specs.length).length;
  return specs.map((s, i) => ({
    id: `corner-${pad(i + 1, Math.max(2, width))}`,
    label: s.label,
    circuit: withPicks(circuit, s.picks, s.temperature),
  }));
}

function sample(q: Quantity, random: () => number): number {
  if (q.group === "device") return triangular(random, q.min, q.nominal, q.max);
  const sigmaLow = (q.nominal - q.min) / SIGMAS_PER_BAND;
  const sigmaHigh = (q.max - q.nominal) / SIGMAS_PER_BAND;
  const z = normal(random);
  const v = q.nominal + z * (z < 0 ? sigmaLow : sigmaHigh);
  return Math.min(q.max, Math.max(q.min, v));
}

function monteCarloScenarios(circuit: Circuit, settings: VariationSettings): Scenario[] {
  const quantities = variedQuantities(circuit);
  const random = seededRandom(settings.seed);
  const count = Math.min(MAX_SAMPLES, Math.max(1, Math.floor(settings.samples)));
  const width = Math.max(4, String(count).length);
  const out: Scenario[] = [];
  for (let i = 0; i < count; i++) {
    const picks = new Map<string, number>();
    for (const q of quantities) picks.set(q.key, sample(q, random));
    const t = settings.temperature;
    const temperature = t ? t.min + (t.max - t.min) * random() : circuit.temperature;
    out.push({ id: `mc-${pad(i + 1, width)}`, label: `sample ${i + 1} of ${count}, ${celsius(temperature)}`, circuit: withPicks(circuit, picks, temperature) });
  }
  return out;
}

/** The nominal scenario first, then the corners or samples the settings ask for. */
export function buildScenarios(circuit: Circuit, settings: VariationSettings): Scenario[] {
  const nominal = nominalScenario(circuit);
  switch (settings.mode) {
    case "nominal":
      return [nominal];
    case "corners":
      return [nominal, ...cornerScenarios(circuit, settings)];
    case "monte-carlo":
      return [nominal, ...monteCarloScenarios(circuit, settings)];
  }
}
