// The variation part of one circuit's check, streamed: nominal, then either the worst-case
// analysis (sensitivities → one verified corner per judged quantity and direction) or the Monte
// Carlo samples. Every analysis is judged (or measured) by the rule session as it comes and then
// dropped, so memory holds the rule outcomes and one number per quantity and sample, never a
// scenario's full analysis. A per-circuit budget bounds the work (analyses × components).
import type { Circuit } from "../circuit/types.js";
import type { CornerEntry, MonteCarloEntry, ScenarioEntry, VariationEntry } from "../report/document.js";
import { quantityKey, type RuleSession, type ScenarioReadings } from "../review/engine.js";
import { solveOperatingPoint, type WarmStart } from "../solve/index.js";
import { analyseSmallSignal } from "../smallsignal/index.js";
import { Collector, sampleValues, wilsonInterval } from "../variation/monte-carlo.js";
import {
  celsiusLabel,
  circuitMaker,
  describeSettings,
  hasBand,
  nominalValues,
  settingsOf,
  variationParameters,
  type Parameter,
} from "../variation/parameters.js";
import { seededRandom } from "../variation/random.js";
import { sensitivities, type Readings, type SensitivityTable } from "../variation/sensitivity.js";
import type { Scenario, VariationSettings } from "../variation/types.js";
import { sampleCorners } from "../variation/sample-corners.js";
import { worstCaseCorners, type Judged, type WorstCaseOptions } from "../variation/worst-case.js";
import { MAX_SAMPLES } from "../variation/scenarios.js";
import type { ScenarioAnalysis } from "./types.js";

/**
 * Analyses × components one circuit may spend on variation (about 40 s of solving on the bench
 * machine for a 1,000-part circuit). Past it the Monte Carlo runs fewer samples, or the
 * worst-case search stops, and a `variation-budget` finding says so.
 */
export const VARIATION_BUDGET = 4_000_000;
export const BUDGET_RULE = "variation-budget";

/** Time one circuit's variation spent per stage, ms (for the bench; not part of the results). */
export interface StageTimes {
  solve: number;
  smallSignal: number;
  rules: number;
}

/** Solves and linearises one scenario; a throw inside a stage becomes a solve failure, not a crash. */
export function analyse(scenario: Scenario, warm?: WarmStart, times?: StageTimes): ScenarioAnalysis {
  try {
    const t0 = times ? performance.now() : 0;
    const solve = solveOperatingPoint(scenario.circuit, warm ? { warmStart: warm } : {});
    const t1 = times ? performance.now() : 0;
    const smallSignal = solve.ok ? analyseSmallSignal(scenario.circuit, solve) : null;
    if (times) {
      times.solve += t1 - t0;
      times.smallSignal += performance.now() - t1;
    }
    return { scenario, solve, smallSignal };
  } catch (err) {
    const reason = `internal error while solving: ${err instanceof Error ? err.message : String(err)}`;
    return {
      scenario,
      solve: { ok: false, reason, parts: [], nodes: [], stats: { iterations: 0, residual: NaN, aid: "none" } },
      smallSignal: null,
    };
  }
}

function numbers(r: ScenarioReadings): Map<string, number> {
  const out = new Map<string, number>();
  for (const [k, v] of r.values) out.set(k, v.measured);
  return out;
}

export interface VariationOutcome {
  readonly nominal: ScenarioAnalysis;
  readonly scenarios: ScenarioEntry[];
  /** Parameter set of every judged scenario that has one (corners, and MC samples on request). */
  readonly cornerOf: (scenarioId: string) => CornerEntry | undefined;
  /**
   * The parameter set of each finding's worst scenario, for many findings at once: a corner's
   * own set, or for a Monte Carlo sample the few parameters that moved the finding's quantity
   * (its key, null when it has none) most in that sample (sample-corners.ts).
   */
  readonly cornersOf: (requests: readonly { readonly scenario: string; readonly quantity: string | null }[]) => (CornerEntry | undefined)[];
  readonly table: SensitivityTable | null;
  readonly summary: VariationEntry | null;
  readonly monteCarlo: MonteCarloEntry | null;
  /** Budget remarks: [message, hint]. */
  readonly budget: readonly { message: string; hint: string }[];
  /** Bound per quantity key, as rules reported it at nominal. */
  readonly parameters: readonly Parameter[];
  /** Where the time went (the nominal analysis included). */
  readonly times: StageTimes;
  /** Re-linearisations reused from another quantity's, and disagreeing corners left as verified (far from every limit). */
  readonly search?: { readonly reused: number; readonly farFromLimit: number };
}

/**
 * `search` changes how the worst-case search re-linearises (the bench runs it both ways side by
 * side); the check always uses the defaults.
 */
export async function runVariation(
  circuit: Circuit,
  settings: VariationSettings,
  session: RuleSession,
  failOnRank: number,
  search: Omit<WorstCaseOptions, "maxEvaluations"> = {},
): Promise<VariationOutcome> {
  const warm: WarmStart = { x: null };
  const times: StageTimes = { solve: 0, smallSignal: 0, rules: 0 };
  const nominalScenario: Scenario = { id: "nominal", label: `nominal, ${celsiusLabel(circuit.temperature)}`, circuit };
  const nominal = analyse(nominalScenario, warm, times);
  const nominalReadings = await judged(session, nominal, times);
  const scenarios: ScenarioEntry[] = [{ id: "nominal", label: nominalScenario.label, converged: nominal.solve.ok }];
  const corners = new Map<string, CornerEntry>();
  const budget: { message: string; hint: string }[] = [];
  const base: Omit<VariationOutcome, "nominal" | "scenarios"> = { cornerOf: (id) => corners.get(id), cornersOf: (requests) => requests.map((r) => corners.get(r.scenario)), table: null, summary: null, monteCarlo: null, budget, parameters: [], times };
  if (settings.mode === "nominal" || !nominal.solve.ok) return { ...base, nominal, scenarios };

  const params = variationParameters(circuit, settings);
  const banded = params.filter(hasBand).length;
  const size = Math.max(1, circuit.components.length);
  const maxAnalyses = Math.max(1, Math.floor(VARIATION_BUDGET / size));
  const at = nominalValues(params);
  const make = circuitMaker(circuit, params);
  const scenarioAt = (values: Float64Array, id: string, label: string): Scenario => ({ id, label, circuit: make(values) });

  if (settings.mode === "monte-carlo") {
    const requested = Math.min(MAX_SAMPLES, Math.max(1, Math.floor(settings.samples)));
    const count = Math.min(requested, maxAnalyses);
    if (count < requested)
      budget.push({
        message: `Monte Carlo ran ${count} of ${requested} samples: ${requested} samples × ${size} components is over the per-circuit budget of ${VARIATION_BUDGET.toLocaleString("en")} analyses × components`,
        hint: "the yield below is from fewer samples (its interval is wider); check this circuit in its own job with fewer samples, or split it",
      });
    const mc = await monteCarlo(params, settings.seed, count, session, scenarios, warm, failOnRank, scenarioAt, times);
    return { ...base, nominal, scenarios, parameters: params, monteCarlo: mc.entry, cornerOf: (id) => mc.corners.get(id), cornersOf: mc.cornersOf };
  }

  // Worst case: sensitivities of every reading at nominal, then per quantity and direction its corner.
  let analyses = 0;
  const measure = async (values: Float64Array): Promise<Readings | null> => {
    analyses++;
    const a = analyse(scenarioAt(values, "probe", "sensitivity step"), warm, times);
    if (!a.solve.ok) return null;
    return numbers(await measured(session, a, times));
  };
  // Design values without a band cost two analyses each; they are differentiated (for the hints)
  // only while that leaves most of the budget to the banded ones.
  const designToo = 2 * params.length <= maxAnalyses / 2;
  if (2 * banded > maxAnalyses) {
    budget.push({
      message: `the worst-case analysis did not run: its ${banded} varied parameters need ${2 * banded} sensitivity analyses of ${size} components, over the per-circuit budget of ${VARIATION_BUDGET.toLocaleString("en")} analyses × components; only nominal was judged`,
      hint: "check this circuit with fewer toleranced parts (exact values for parts that do not matter), or split it",
    });
    return { ...base, nominal, scenarios, parameters: params };
  }
  const table = await sensitivities(params, at, numbers(nominalReadings), measure, (i) => designToo || hasBand(params[i]!));
  const sensitivityAnalyses = analyses;
  let cornerCount = 0;
  const width = 3;
  const judge = async (values: Float64Array): Promise<Judged | null> => {
    analyses++;
    const id = `corner-${String(++cornerCount).padStart(width, "0")}`;
    const set = settingsOf(params, values);
    const label = describeSettings(set);
    corners.set(id, { label, parameters: set });
    const a = analyse(scenarioAt(values, id, label), warm, times);
    scenarios.push({ id, label, converged: a.solve.ok });
    const r = await judged(session, a, times);
    return a.solve.ok ? { values: numbers(r), limits: r.values } : null;
  };
  const wc = banded === 0 ? null : await worstCaseCorners(table, judge, measure, { ...search, maxEvaluations: Math.max(0, maxAnalyses - analyses) });
  if (wc?.truncated)
    budget.push({
      message: `the worst-case search stopped after ${analyses} analyses (per-circuit budget of ${VARIATION_BUDGET.toLocaleString("en")} analyses × components); some quantities have no verified corner`,
      hint: "check this circuit with fewer toleranced parts, or split it",
    });
  const summary: VariationEntry = {
    method: "worst-case",
    parameters: params.length,
    variedParameters: banded,
    quantities: table.derivatives.size,
    analyses,
    sensitivityAnalyses,
    corners: wc?.corners ?? 0,
    refinementAnalyses: wc?.refinementEvaluations ?? 0,
    refinedQuantities: wc ? wc.worst.filter((w) => w.refinements > 0).length : 0,
  };
  const searched = wc ? { reused: wc.reusedRelinearisations, farFromLimit: wc.farFromLimit } : undefined;
  return { ...base, nominal, scenarios, parameters: params, table, summary, cornerOf: (id) => corners.get(id), ...(searched ? { search: searched } : {}) };
}

async function judged(session: RuleSession, a: ScenarioAnalysis, times: StageTimes): Promise<ScenarioReadings> {
  const t0 = performance.now();
  const r = await session.judge(a);
  times.rules += performance.now() - t0;
  return r;
}

async function measured(session: RuleSession, a: ScenarioAnalysis, times: StageTimes): Promise<ScenarioReadings> {
  const t0 = performance.now();
  const r = await session.measure(a);
  times.rules += performance.now() - t0;
  return r;
}

async function monteCarlo(
  params: readonly Parameter[],
  seed: number,
  count: number,
  session: RuleSession,
  scenarios: ScenarioEntry[],
  warm: WarmStart,
  failOnRank: number,
  scenarioAt: (values: Float64Array, id: string, label: string) => Scenario,
  times: StageTimes,
): Promise<{ entry: MonteCarloEntry; corners: Map<string, CornerEntry>; cornersOf: VariationOutcome["cornersOf"] }> {
  const random = seededRandom(seed);
  const width = Math.max(4, String(count).length);
  const values = new Float64Array(params.length);
  const collectors = new Map<string, { rule: string; subject: string; unit: string | null; c: Collector }>();
  let failed = 0;
  let nonConverged = 0;
  let iterations = 0;
  let worst = { margin: Infinity, id: "", values: null as Float64Array | null };
  const temperature = params.findIndex((p) => p.kind === "temperature");
  for (let k = 0; k < count; k++) {
    sampleValues(params, random, values);
    const id = `mc-${String(k + 1).padStart(width, "0")}`;
    const label = `sample ${k + 1} of ${count}${temperature >= 0 ? `, ${celsiusLabel(values[temperature]!)}` : ""}`;
    const a = analyse(scenarioAt(values, id, label), warm, times);
    iterations += a.solve.stats.iterations;
    scenarios.push({ id, label, converged: a.solve.ok });
    const r = await judged(session, a, times);
    if (!a.solve.ok) nonConverged++;
    if (r.failRank >= failOnRank || !a.solve.ok) failed++;
    const margin = a.solve.ok ? r.lowestMargin : -Infinity;
    if (margin < worst.margin || worst.values === null) worst = { margin, id, values: Float64Array.from(values) };
    for (const [key, reading] of r.values) {
      let slot = collectors.get(key);
      if (!slot) collectors.set(key, (slot = { rule: reading.rule, subject: reading.subject, unit: reading.unit, c: new Collector(count) }));
      slot.c.add(reading.measured, k);
    }
  }
  const corners = new Map<string, CornerEntry>();
  let worstSample: MonteCarloEntry["worstSample"] = null;
  if (worst.values) {
    const set = settingsOf(params, worst.values);
    const corner = { label: describeSettings(set), parameters: set };
    corners.set(worst.id, corner);
    worstSample = { scenario: worst.id, lowestMargin: Number.isFinite(worst.margin) ? worst.margin : null, ...corner };
  }
  // A finding's worst sample, named by the parameters that moved its quantity most there.
  const index = new Map<string, number>();
  for (let k = 0; k < count; k++) index.set(`mc-${String(k + 1).padStart(width, "0")}`, k);
  const cornersOf: VariationOutcome["cornersOf"] = (requests) => {
    const asked = requests.map((r) => ({ r, k: index.get(r.scenario) }));
    const layouts = new Map<string, Float64Array | null>();
    const quantityOf = (key: string | null): Float64Array | null => {
      if (key === null) return null;
      if (!layouts.has(key)) layouts.set(key, collectors.get(key)?.c.bySample(count) ?? null);
      return layouts.get(key)!;
    };
    const samples = asked.filter((a) => a.k !== undefined).map((a) => ({ sample: a.k!, quantity: quantityOf(a.r.quantity) }));
    const described = samples.length ? sampleCorners(params, seed, count, samples) : [];
    let next = 0;
    return asked.map((a) => (a.k === undefined ? corners.get(a.r.scenario) : described[next++]));
  };
  const passed = count - failed;
  const quantities = [...collectors.entries()]
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([, s]) => ({ rule: s.rule, subject: s.subject, unit: s.unit, ...s.c.summary()! }));
  return {
    entry: {
      samples: count,
      seed,
      failed,
      nonConverged,
      yield: passed / count,
      interval: { method: "Wilson score", level: 0.95, ...wilsonInterval(passed, count) },
      iterations,
      worstSample,
      quantities,
    },
    corners,
    cornersOf,
  };
}

export { quantityKey };
