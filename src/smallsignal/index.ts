// Small-signal analysis entry points: gains, input and output impedances at midband and at the
// band edges, and frequency sweeps with their −3 dB corners. Pure functions of (Circuit,
// OperatingPoint); all numerical work happens on one preallocated network per call.

import type { Circuit, Component, CurrentSource, GainSpec, VoltageSource } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { buildNetwork, factorView, GROUND, MIDBAND, midbandInputShort, type SmallSignalNetwork, type View } from "./network.js";
import type { ComplexValue, FrequencyPoint, GainResult, SmallSignalResult, SweepResult } from "./types.js";

export type { View } from "./network.js";

/**
 * The corner search on the log-frequency axis stops when the bracket is this narrow (in ln f,
 * i.e. a relative width): 1e-9 is a million times finer than the 0.1 % a designer reads.
 */
const CORNER_RELATIVE_WIDTH = 1e-9;
/** A corner evaluation this close to the −3 dB level (in dB) is the corner. */
const CORNER_DB_RESOLUTION = 1e-12;
/** Bound on corner-search evaluations; bisection alone would need ~40 for any sweep bracket. */
const CORNER_MAX_ITERATIONS = 60;
/** The gain input is driven with 1 V (or 1 A): a gain is per unit of input, and a source's `signal` amplitude never scales it. */
const UNIT_DRIVE = 1;
/** The −3 dB level: |H| = reference / √2. */
const HALF_POWER = Math.SQRT1_2;

interface ResolvedGain {
  readonly spec: GainSpec;
  readonly source: VoltageSource | CurrentSource;
  readonly plus: number;
  readonly minus: number;
}

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

function resolveGain(circuit: Circuit, net: SmallSignalNetwork, spec: GainSpec): ResolvedGain | string {
  const source = circuit.components.find((c: Component) => c.id === spec.input);
  if (!source) return `input \`${spec.input}\` is not a component of the circuit`;
  if (source.kind !== "voltage-source" && source.kind !== "current-source") {
    return `input \`${spec.input}\` is a ${source.kind}; a gain input must be an independent voltage or current source`;
  }
  const index = (name: string): number | undefined =>
    name === circuit.ground ? GROUND : net.nodeIndex.get(name);
  const plus = index(spec.output.plus);
  const minus = index(spec.output.minus);
  if (plus === undefined) return `output node \`${spec.output.plus}\` is not in the circuit`;
  if (minus === undefined) return `output node \`${spec.output.minus}\` is not in the circuit`;
  return { spec, source, plus, minus };
}

function inputShort(net: SmallSignalNetwork, g: ResolvedGain): string | null {
  return g.source.kind === "voltage-source" ? midbandInputShort(net, net.branchIndex.get(g.source.id) as number) : null;
}

function valueAt(x: Float64Array, k: number): number {
  return k === GROUND ? 0 : (x[k] as number);
}

/** Puts the gain's input drive into the right-hand side (everything else zeroed). */
function drive(net: SmallSignalNetwork, g: ResolvedGain): void {
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  if (g.source.kind === "voltage-source") {
    net.rhsRe[net.branchIndex.get(g.source.id) as number] = UNIT_DRIVE;
  } else {
    // The source's current flows through it from `from` to `to`, out into node `to`.
    inject(net, net.nodeIndex.get(g.source.pins.to) ?? GROUND, net.nodeIndex.get(g.source.pins.from) ?? GROUND, UNIT_DRIVE);
  }
}

function inject(net: SmallSignalNetwork, into: number, outOf: number, current: number): void {
  if (into !== GROUND) net.rhsRe[into] = (net.rhsRe[into] as number) + current;
  if (outOf !== GROUND) net.rhsRe[outOf] = (net.rhsRe[outOf] as number) - current;
}

/** Solves the factored view for the gain's drive: (V(plus) − V(minus)) per unit of drive. */
function solveGain(net: SmallSignalNetwork, g: ResolvedGain): ComplexValue {
  drive(net, g);
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
  return {
    re: (valueAt(net.xRe, g.plus) - valueAt(net.xRe, g.minus)) / UNIT_DRIVE,
    im: (valueAt(net.xIm, g.plus) - valueAt(net.xIm, g.minus)) / UNIT_DRIVE,
  };
}

/** Input impedance from the last solveGain (same drive still in x): source voltage / delivered current. */
function inputImpedance(net: SmallSignalNetwork, g: ResolvedGain): number {
  if (g.source.kind === "voltage-source") {
    // The branch current flows into the plus pin; the source delivers its negative.
    const delivered = -(net.xRe[net.branchIndex.get(g.source.id) as number] as number);
    return delivered === 0 ? Infinity : UNIT_DRIVE / delivered;
  }
  const to = net.nodeIndex.get(g.source.pins.to) ?? GROUND;
  const from = net.nodeIndex.get(g.source.pins.from) ?? GROUND;
  return (valueAt(net.xRe, to) - valueAt(net.xRe, from)) / UNIT_DRIVE;
}

/** Output impedance: input zeroed (its branch stays a 0 V short, a current input stays open), 1 A test current. */
function outputImpedance(net: SmallSignalNetwork, g: ResolvedGain): number {
  net.rhsRe.fill(0);
  net.rhsIm.fill(0);
  inject(net, g.plus, g.minus, 1);
  net.lu.solve(net.rhsRe, net.rhsIm, net.xRe, net.xIm);
  return valueAt(net.xRe, g.plus) - valueAt(net.xRe, g.minus);
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

  let pending: ResolvedGain[] = [];
  for (const spec of specs) {
    const r = resolveGain(circuit, net, spec);
    if (typeof r === "string") errors.push({ gain: spec.name, message: r });
    else pending.push(r);
  }

  const midband = new Map<ResolvedGain, { gain: number; zin: number; zout: number }>();
  if (pending.length > 0) {
    const singular = factorView(net, MIDBAND);
    if (singular !== null) {
      for (const g of pending) errors.push({ gain: g.spec.name, message: singular });
      pending = [];
    }
    for (const g of pending) {
      const shorted = inputShort(net, g);
      if (shorted !== null) {
        errors.push({ gain: g.spec.name, message: shorted });
        continue;
      }
      const gain = solveGain(net, g).re;
      const zin = inputImpedance(net, g);
      const zout = outputImpedance(net, g);
      if (!finite(gain, zout) || Number.isNaN(zin)) {
        errors.push({ gain: g.spec.name, message: "the midband solve gave a non-finite value; the network is ill-conditioned" });
      } else {
        midband.set(g, { gain, zin, zout });
      }
    }
    pending = pending.filter((g) => midband.has(g));
  }

  // Frequencies each gain is reported at; one factorisation per distinct frequency.
  const wanted = new Map<ResolvedGain, number[]>();
  const band = circuit.specs.band;
  for (const g of pending) {
    const fs = band ? [band.low, band.high] : [];
    if (g.spec.frequency !== undefined) fs.push(g.spec.frequency);
    wanted.set(g, [...new Set(fs)].sort((a, b) => a - b));
  }
  const allFrequencies = [...new Set([...wanted.values()].flat())].sort((a, b) => a - b);
  const points = new Map<ResolvedGain, FrequencyPoint[]>(pending.map((g) => [g, []]));
  const failed = new Set<ResolvedGain>();
  for (const f of allFrequencies) {
    const users = pending.filter((g) => !failed.has(g) && (wanted.get(g) ?? []).includes(f));
    if (users.length === 0) continue;
    const singular = factorView(net, { kind: "frequency", frequency: f });
    for (const g of users) {
      if (singular !== null) {
        errors.push({ gain: g.spec.name, message: singular });
        failed.add(g);
        continue;
      }
      const p = frequencyPoint(f, solveGain(net, g));
      if (!finite(p.re, p.im)) {
        errors.push({ gain: g.spec.name, message: `the solve at ${f} Hz gave a non-finite value; the network is ill-conditioned` });
        failed.add(g);
      } else {
        points.get(g)?.push(p);
      }
    }
  }

  const gains: GainResult[] = [];
  for (const g of pending) {
    if (failed.has(g)) continue;
    const m = midband.get(g);
    if (!m) continue;
    const pts = points.get(g) ?? [];
    const own = g.spec.frequency === undefined ? undefined : pts.find((p) => p.frequency === g.spec.frequency);
    const magnitude = Math.abs(m.gain);
    gains.push({
      name: g.spec.name,
      midband: m.gain,
      magnitude,
      db: 20 * Math.log10(magnitude),
      points: pts,
      judged: own ? (own.re < 0 ? -own.magnitude : own.magnitude) : m.gain,
      inputImpedance: m.zin,
      outputImpedance: m.zout,
    });
  }
  // Keep the file's order in both lists.
  const order = new Map(specs.map((s, i) => [s.name, i]));
  gains.sort((a, b) => (order.get(a.name) ?? 0) - (order.get(b.name) ?? 0));
  errors.sort((a, b) => (order.get(a.gain) ?? 0) - (order.get(b.gain) ?? 0));
  return { gains, errors };
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
 * to the reference magnitude: the midband magnitude, or the sweep's largest magnitude when that
 * is larger (a capacitor that sets the upper band edge is shorted by the midband view, which
 * then understates the passband; a low-pass RC has a midband gain of 0).
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

  const singularMid = factorView(net, MIDBAND);
  const midband = singularMid === null && inputShort(net, g) === null ? solveGain(net, g).re : null;

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

  let reference = midband === null || !Number.isFinite(midband) ? 0 : Math.abs(midband);
  for (const p of points) if (p.magnitude > reference) reference = p.magnitude;
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
