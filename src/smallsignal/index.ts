// Small-signal analysis entry points: gains, input and output impedances at midband and at the
// band edges, and frequency sweeps with their −3 dB corners. Pure functions of (Circuit,
// OperatingPoint); all numerical work happens on one preallocated network per call.

import type { Circuit } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { bandEdges } from "./edges.js";
import { classifyCapacitors, midbandGain } from "./midband.js";
import { buildNetwork, factorView, type SmallSignalNetwork, type View } from "./network.js";
import { gainAt, inputImpedance, inputShort, outputImpedance, resolveGain, solveGain, type ResolvedGain } from "./probe.js";
import type { ComplexValue, FrequencyPoint, GainResult, SmallSignalResult, SweepResult } from "./types.js";

export type { View } from "./network.js";
export { capacitorForEdge } from "./edges.js";

/**
 * The corner search on the log-frequency axis stops when the bracket is this narrow (in ln f,
 * i.e. a relative width): 1e-9 is a million times finer than the 0.1 % a designer reads.
 */
const CORNER_RELATIVE_WIDTH = 1e-9;
/** A corner evaluation this close to the −3 dB level (in dB) is the corner. */
const CORNER_DB_RESOLUTION = 1e-12;
/** Bound on corner-search evaluations; bisection alone would need ~40 for any sweep bracket. */
const CORNER_MAX_ITERATIONS = 60;
/** The −3 dB level: |H| = reference / √2. */
const HALF_POWER = Math.SQRT1_2;

export function frequencyPoint(frequency: number, value: ComplexValue): FrequencyPoint {
  const magnitude = Math.hypot(value.re, value.im);
  return {
    frequency,
    re: value.re,
    im: value.im,
    magnitude,
    db: 20 * Math.log10(magnitude),
    phaseDeg: (Math.atan2(value.im, value.re) * 180) / Math.PI,
  };
}

function finite(...values: number[]): boolean {
  return values.every(Number.isFinite);
}

export function analyseSmallSignal(circuit: Circuit, op: OperatingPoint): SmallSignalResult {
  const specs = circuit.specs.gains;
  if (specs.length === 0) return { gains: [], errors: [] };
  const errors: { gain: string; message: string }[] = [];
  const built = buildNetwork(circuit, op);
  if (!built.ok) {
    return { gains: [], errors: specs.map((s) => ({ gain: s.name, message: built.message })) };
  }
  const net = built.network;
  const band = circuit.specs.band;
  const gains: GainResult[] = [];
  for (const spec of specs) {
    const g = resolveGain(circuit, net, spec);
    if (typeof g === "string") {
      errors.push({ gain: spec.name, message: g });
      continue;
    }
    const r = analyseGain(circuit, net, g, band);
    if (typeof r === "string") errors.push({ gain: spec.name, message: r });
    else gains.push(r);
  }
  return { gains, errors };
}

/** Midband (flat-band) gain and impedances, the points at the band edges and the spec's frequency, the band-edge analysis. */
function analyseGain(
  circuit: Circuit,
  net: SmallSignalNetwork,
  g: ResolvedGain,
  band: Circuit["specs"]["band"],
): GainResult | string {
  // A view that is singular with every capacitor short, or capacitors chained across the input
  // (a capacitive divider: no flat band to speak of), is reported as before any classification.
  const singularShort = factorView(net, { kind: "midband" });
  if (singularShort !== null) return singularShort;
  const shortedInput = inputShort(net, g);
  if (shortedInput !== null) return shortedInput;
  const open = classifyCapacitors(net, g);
  const shorted = inputShort(net, g, open);
  if (shorted !== null) return shorted;
  const singular = factorView(net, { kind: "midband", open });
  if (singular !== null) return singular;
  const gain = solveGain(net, g).re;
  const zin = inputImpedance(net, g);
  const zout = outputImpedance(net, g);
  if (!finite(gain, zout) || Number.isNaN(zin)) return "the midband solve gave a non-finite value; the network is ill-conditioned";
  const everyCapacitorShort = open.includes(1) ? midbandGain(net, g) : gain;

  const fs = band ? [band.low, band.high] : [];
  if (g.spec.frequency !== undefined) fs.push(g.spec.frequency);
  const points: FrequencyPoint[] = [];
  for (const f of [...new Set(fs)].sort((a, b) => a - b)) {
    const v = gainAt(net, g, f);
    if (typeof v === "string") return v;
    points.push(frequencyPoint(f, v));
  }
  const own = g.spec.frequency === undefined ? undefined : points.find((p) => p.frequency === g.spec.frequency);
  const magnitude = Math.abs(gain);
  const openAtMidband = net.capacitors.filter((_, i) => open[i] === 1).map((c) => c.id);
  return {
    name: g.spec.name,
    midband: gain,
    everyCapacitorShort,
    openAtMidband,
    ...(band ? { edges: bandEdges(net, g, open, gain, band) } : {}),
    magnitude,
    db: 20 * Math.log10(magnitude),
    points,
    judged: own ? (gain < 0 ? -own.magnitude : own.magnitude) : gain,
    inputImpedance: zin,
    outputImpedance: zout,
  };
}

export interface SweepOptions {
  readonly start: number;
  readonly stop: number;
  readonly points: number;
}

function sweepFailure(gain: string, error: string): SweepResult {
  return { gain, points: [], lowCorner: null, highCorner: null, midband: null, reference: null, error };
}

/**
 * Log-spaced frequency response of one gain, with its −3 dB corners. The corners are relative
 * to the flat-band (midband) magnitude, or to the sweep's largest magnitude when the midband
 * gain is 0 or undefined.
 */
export function sweepGain(circuit: Circuit, op: OperatingPoint, gainName: string, options: SweepOptions): SweepResult {
  const { start, stop } = options;
  const count = Math.floor(options.points);
  if (!(start > 0 && stop > start && Number.isFinite(stop))) {
    return sweepFailure(gainName, `the sweep needs 0 < start < stop (got ${start} Hz to ${stop} Hz)`);
  }
  if (!(count >= 2)) return sweepFailure(gainName, `the sweep needs at least 2 points (got ${options.points})`);
  const spec = circuit.specs.gains.find((s) => s.name === gainName);
  if (!spec) {
    const names = circuit.specs.gains.map((s) => s.name).join(", ") || "none";
    return sweepFailure(gainName, `no gain named \`${gainName}\` in specs.gains (known: ${names})`);
  }
  const built = buildNetwork(circuit, op);
  if (!built.ok) return sweepFailure(gainName, built.message);
  const net = built.network;
  const g = resolveGain(circuit, net, spec);
  if (typeof g === "string") return sweepFailure(gainName, g);

  const midband = midbandGain(net, g, classifyCapacitors(net, g));

  const evaluate = (f: number): FrequencyPoint | string => {
    const view: View = { kind: "frequency", frequency: f };
    const singular = factorView(net, view);
    if (singular !== null) return singular;
    return frequencyPoint(f, solveGain(net, g));
  };

  const points: FrequencyPoint[] = [];
  const ratio = Math.log(stop / start) / (count - 1);
  for (let i = 0; i < count; i++) {
    const f = i === count - 1 ? stop : start * Math.exp(ratio * i);
    const p = evaluate(f);
    if (typeof p === "string") return { ...sweepFailure(gainName, p), midband };
    if (!finite(p.re, p.im)) return { ...sweepFailure(gainName, `the solve at ${f} Hz gave a non-finite value`), midband };
    points.push(p);
  }

  // The flat-band gain; only when it is 0 or undefined, the sweep's largest magnitude.
  let reference = midband === null || !Number.isFinite(midband) ? 0 : Math.abs(midband);
  if (!(reference > 0)) for (const p of points) if (p.magnitude > reference) reference = p.magnitude;
  if (!(reference > 0)) return { gain: gainName, points, lowCorner: null, highCorner: null, midband, reference };
  const level = reference * HALF_POWER;

  const corner = (i: number): number => {
    // Bracket [i, i+1] straddles the level. Regula falsi with the Illinois modification on
    // (log f, dB − level dB): superlinear on these smooth curves, and it keeps the bracket.
    const levelDb = 20 * Math.log10(level);
    let a = Math.log((points[i] as FrequencyPoint).frequency);
    let b = Math.log((points[i + 1] as FrequencyPoint).frequency);
    let ga = (points[i] as FrequencyPoint).db - levelDb;
    let gb = (points[i + 1] as FrequencyPoint).db - levelDb;
    for (let it = 0; it < CORNER_MAX_ITERATIONS && Math.abs(b - a) > CORNER_RELATIVE_WIDTH; it++) {
      let x = b - (gb * (b - a)) / (gb - ga);
      if (!(x > Math.min(a, b) && x < Math.max(a, b))) x = (a + b) / 2;
      const p = evaluate(Math.exp(x));
      if (typeof p === "string" || !Number.isFinite(p.db)) break;
      const gx = p.db - levelDb;
      if (Math.abs(gx) < CORNER_DB_RESOLUTION) return Math.exp(x);
      if (gx * gb < 0) {
        a = b;
        ga = gb;
      } else {
        ga /= 2; // Illinois: halve the stale end's value so the search cannot stall on it
      }
      b = x;
      gb = gx;
    }
    return Math.exp((a + b) / 2);
  };

  const firstIn = points.findIndex((p) => p.magnitude >= level);
  let lowCorner: number | null = null;
  let highCorner: number | null = null;
  if (firstIn > 0) lowCorner = corner(firstIn - 1);
  if (firstIn >= 0) {
    for (let i = firstIn + 1; i < points.length; i++) {
      if ((points[i] as FrequencyPoint).magnitude < level) {
        highCorner = corner(i - 1);
        break;
      }
    }
  }
  return { gain: gainName, points, lowCorner, highCorner, midband, reference };
}

/** Sweep points per decade when the caller gives no count: smooth enough to read a Bode plot. */
export const DEFAULT_POINTS_PER_DECADE = 10;
/** Decades a default sweep extends beyond the spec band on each side, so both corners show. */
const DEFAULT_MARGIN_DECADES = 2;
/** Range of a default sweep when the circuit gives no band: audio and well beyond, Hz. */
const DEFAULT_START = 1;
const DEFAULT_STOP = 100e6;

/** The sweep `opgate inspect --sweep` runs when no range is given: the spec band ± two decades. */
export function defaultSweepRange(circuit: Circuit): SweepOptions {
  const band = circuit.specs.band;
  const margin = 10 ** DEFAULT_MARGIN_DECADES;
  const start = band && band.low > 0 ? band.low / margin : DEFAULT_START;
  const stop = band && band.high > start ? band.high * margin : DEFAULT_STOP;
  const decades = Math.log10(stop / start);
  return { start, stop, points: Math.max(2, Math.round(decades * DEFAULT_POINTS_PER_DECADE) + 1) };
}
