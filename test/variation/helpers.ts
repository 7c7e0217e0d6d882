// Shared by the variation tests: load a circuit snippet, run the worst-case (or Monte Carlo)
// pipeline with a chosen set of rules, and brute-force the full factorial over the same parameters.
import { loadCircuitText } from "../../src/circuit/index.js";
import type { Circuit } from "../../src/circuit/types.js";
import { runVariation, type VariationOutcome } from "../../src/pipeline/variation.js";
import type { CheckContext } from "../../src/pipeline/check-file.js";
import { RuleSession, type ConfiguredRule } from "../../src/review/engine.js";
import type { RuleResults } from "../../src/review/engine.js";
import type { Rule } from "../../src/review/rule.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint } from "../../src/solve/types.js";
import { circuitAt, hasBand, variationParameters, type Parameter } from "../../src/variation/parameters.js";
import type { VariationSettings } from "../../src/variation/types.js";

export function load(text: string): Circuit {
  const full = `format: opgate-circuit/1\nname: t\n${text}`;
  const r = loadCircuitText(full, "t.yaml");
  if (!r.ok) throw new Error(r.errors.map((e) => `${e.line}:${e.column} ${e.message}`).join("\n"));
  return r.circuit;
}

export const builtin = (rule: Rule, options: Record<string, unknown> = {}): ConfiguredRule => ({ rule, severity: "error", options, source: "builtin" });

export async function run(circuit: Circuit, rules: readonly ConfiguredRule[], settings: VariationSettings): Promise<RuleResults & { v: VariationOutcome }> {
  const session = new RuleSession({ circuit, rules });
  const v = await runVariation(circuit, settings, session, 2);
  return { ...session.finish(), v };
}

/** Every combination of band ends of the banded parameters (2^n solves), each read by `read`. */
export function factorial(circuit: Circuit, settings: Pick<VariationSettings, "temperature">, read: (op: OperatingPoint) => number): { min: number; max: number; n: number } {
  const params: Parameter[] = variationParameters(circuit, settings);
  const banded = params.map((p, i) => (hasBand(p) ? i : -1)).filter((i) => i >= 0);
  let min = Infinity;
  let max = -Infinity;
  const values = Float64Array.from(params, (p) => p.nominal);
  for (let mask = 0; mask < 1 << banded.length; mask++) {
    banded.forEach((i, k) => (values[i] = (mask >> k) & 1 ? params[i]!.max : params[i]!.min));
    const op = solveOperatingPoint(circuitAt(circuit, params, values));
    if (!op.ok) throw new Error(`corner ${mask} did not solve: ${op.reason}`);
    const m = read(op);
    min = Math.min(min, m);
    max = Math.max(max, m);
  }
  return { min, max, n: banded.length };
}

export const CELSIUS = 273.15;

/** A check context with no config file: these rules and this variation, failing on errors. */
export function checkContext(configured: CheckContext["configured"], variation: VariationSettings): CheckContext {
  return {
    config: { file: null, root: ".", include: [], exclude: [], rules: {}, plugins: [], libraries: [], failOn: "error", variation, outputs: {} },
    rules: [],
    configured,
    root: ".",
  };
}

/**
 * A degenerated common-emitter stage (RC 6k8, RE 1k5, no bypass): gain ≈ −RC/RE ≈ −4.5, the
 * textbook approximation (from memory). Shared by the sensitivity tests of the analysis and of
 * `inspect --sensitivity`.
 */
export const DEGENERATED_CE = `models:
  q: { kind: npn, beta: 300, saturationCurrent: 1e-14 A }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 15 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V, signal: 1 mV }
  - { id: CIN, kind: capacitor, pins: [in, b], value: 100u }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 68k, tolerance: 1% }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 15k, tolerance: 1% }
  - { id: RC, kind: resistor, pins: [vcc, c], value: 6k8, tolerance: 1% }
  - { id: RE, kind: resistor, pins: [e, gnd], value: 1k5, tolerance: 1% }
  - { id: Q1, kind: npn, model: q, pins: { collector: c, base: b, emitter: e } }
specs:
  gains:
    - { name: av, input: VIN, output: c, target: -4.4, tolerance: 20% }
`;
