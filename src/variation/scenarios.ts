// Builds a fixed list of scenarios: nominal, or nominal and Monte Carlo samples (for the rule
// tester and library users). The check itself streams its scenarios (src/pipeline/variation.ts),
// and worst-case corners are not a fixed list: each follows from the sensitivities of the rules'
// readings (src/variation/worst-case.ts).
import type { Circuit } from "../circuit/types.js";
import type { Scenario, VariationSettings } from "./types.js";
import { sampleValues } from "./monte-carlo.js";
import { circuitAt, variationParameters } from "./parameters.js";
import { seededRandom } from "./random.js";
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

function monteCarloScenarios(circuit: Circuit, settings: VariationSettings): Scenario[] {
  // The same parameters, sampler and seed use as the streamed check (src/pipeline/variation.ts).
  const params = variationParameters(circuit, settings);
  const random = seededRandom(settings.seed);
  const count = Math.min(MAX_SAMPLES, Math.max(1, Math.floor(settings.samples)));
  const width = Math.max(4, String(count).length);
  const values = new Float64Array(params.length);
  const t = params.findIndex((p) => p.kind === "temperature");
  const out: Scenario[] = [];
  for (let i = 0; i < count; i++) {
    sampleValues(params, random, values);
    const temperature = t >= 0 ? values[t]! : circuit.temperature;
    out.push({ id: `mc-${pad(i + 1, width)}`, label: `sample ${i + 1} of ${count}, ${celsius(temperature)}`, circuit: circuitAt(circuit, params, values) });
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
      // Corners are not a fixed list: each follows from the sensitivities of the rules' readings
      // (src/variation/worst-case.ts, run by src/pipeline/variation.ts).
      throw new Error("worst-case corners are built from the rules' readings: run them through runVariation (src/pipeline/variation.ts)");
    case "monte-carlo":
      return [nominal, ...monteCarloScenarios(circuit, settings)];
  }
}
