// Benchmark of the small-signal stage: median time of the midband analysis (gain, input and
// output impedance) of a generated 30-node transistor circuit, and of a 100-point sweep of it.
// Run alone with `npx tsx bench/smallsignal.ts`; `npm run bench` calls benchSmallSignal().

import { pathToFileURL } from "node:url";
import type { Circuit, Component, SourcePos } from "../src/circuit/types.js";
import { analyseSmallSignal, sweepGain } from "../src/smallsignal/index.js";
import { solveOperatingPoint } from "../src/solve/index.js";

/** Stages in the generated cascade: 4 nodes each plus vcc and in gives 30 nodes. */
const STAGES = 7;
/** Runs before timing, so the JIT has compiled the hot path. */
const WARMUP_RUNS = 300;
/** Timed runs of the midband analysis; the median of this many is stable to a few %. */
const MIDBAND_RUNS = 3000;
/** Timed 100-point sweeps. */
const SWEEP_RUNS = 100;
const SWEEP_POINTS = 100;
/** Target from the issue: midband gain under 50 µs on the 30-node circuit. */
export const MIDBAND_TARGET_MICROS = 50;

const POS: SourcePos = { file: "bench.yaml", line: 1, column: 1 };
const exact = (v: number) => ({ nominal: v, min: v, max: v });
const spread = (v: number) => ({ min: v, typ: v, max: v });

/**
 * A cascade of capacitor-coupled common-emitter stages, each with a bypassed and an unbypassed
 * emitter resistor (gain ≈ −3 per stage, ≈ 2000 overall: a Tidewater sensor preamp chain).
 */
export function cascadeCircuit(stages = STAGES): Circuit {
  const parts: Component[] = [];
  const r = (id: string, a: string, b: string, v: number) => parts.push({ id, pos: POS, kind: "resistor", pins: { a, b }, value: exact(v) });
  const cap = (id: string, a: string, b: string, v: number) => parts.push({ id, pos: POS, kind: "capacitor", pins: { a, b }, value: exact(v) });
  parts.push({ id: "VCC", pos: POS, kind: "voltage-source", pins: { plus: "vcc", minus: "gnd" }, voltage: exact(12) });
  parts.push({ id: "VIN", pos: POS, kind: "voltage-source", pins: { plus: "in", minus: "gnd" }, voltage: exact(0) });
  cap("CIN", "in", "b0", 10e-6);
  for (let i = 0; i < stages; i++) {
    r(`R1_${i}`, "vcc", `b${i}`, 82e3);
    r(`R2_${i}`, `b${i}`, "gnd", 15e3);
    r(`RC_${i}`, "vcc", `c${i}`, 6.8e3);
    r(`RE1_${i}`, `e${i}`, `s${i}`, 1e3);
    r(`RE2_${i}`, `s${i}`, "gnd", 560);
    cap(`CE_${i}`, `s${i}`, "gnd", 22e-6);
    parts.push({ id: `Q${i}`, pos: POS, kind: "npn", pins: { collector: `c${i}`, base: `b${i}`, emitter: `e${i}` }, model: "preamp-npn" });
    if (i + 1 < stages) cap(`CC_${i}`, `c${i}`, `b${i + 1}`, 1e-6);
  }
  const nodes = new Set<string>();
  for (const p of parts) for (const n of Object.values(p.pins) as string[]) if (n !== "gnd") nodes.add(n);
  return {
    file: "bench.yaml",
    name: "preamp-cascade",
    temperature: 298.15,
    ground: "gnd",
    parameters: new Map(),
    models: new Map([
      [
        "preamp-npn",
        {
          id: "preamp-npn",
          kind: "npn",
          pos: POS,
          beta: spread(180),
          reverseBeta: spread(1),
          saturationCurrent: spread(2e-14),
          earlyVoltage: spread(90),
          saturationEdge: 0.3,
          drift: { voltage: -0.002, current: 1e-3 },
          betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 },
        },
      ],
    ]),
    components: parts,
    nodes: [...nodes].sort(),
    specs: {
      gains: [{ name: "chain", input: "VIN", output: { plus: `c${stages - 1}`, minus: "gnd" }, target: 1, window: { min: -Infinity, max: Infinity }, pos: POS }],
      supplies: [],
      devices: [],
    },
    overrides: [],
    warnings: [],
    pos: POS,
  };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
}

function timeMicros(fn: () => void, runs: number): number {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    times.push((performance.now() - t0) * 1000);
  }
  return median(times);
}

export interface SmallSignalBench {
  readonly nodes: number;
  readonly midbandMicros: number;
  readonly sweep100Micros: number;
  readonly perSweepPointMicros: number;
  readonly midbandTargetMicros: number;
  /** The DC solve of the same circuit, timed in the same run, for a side-by-side ratio. */
  readonly dcSolveMicros: number;
}

export async function benchSmallSignal(): Promise<SmallSignalBench> {
  const circuit = cascadeCircuit();
  const op = solveOperatingPoint(circuit);
  if (!op.ok) throw new Error(`bench circuit has no operating point: ${op.reason}`);
  const check = analyseSmallSignal(circuit, op);
  if (check.errors.length > 0 || check.gains.length !== 1) throw new Error(`bench circuit failed: ${JSON.stringify(check.errors)}`);
  let sink = 0;
  const midband = () => {
    sink += analyseSmallSignal(circuit, op).gains[0]?.midband ?? NaN;
  };
  const sweep = () => {
    sink += sweepGain(circuit, op, "chain", { start: 1, stop: 1e6, points: SWEEP_POINTS }).points.length;
  };
  for (let i = 0; i < WARMUP_RUNS; i++) midband();
  const midbandMicros = timeMicros(midband, MIDBAND_RUNS);
  for (let i = 0; i < 5; i++) sweep();
  const sweep100Micros = timeMicros(sweep, SWEEP_RUNS);
  const dc = () => {
    sink += solveOperatingPoint(circuit).ok ? 0 : 1;
  };
  for (let i = 0; i < 20; i++) dc();
  const dcSolveMicros = timeMicros(dc, SWEEP_RUNS);
  const result: SmallSignalBench = {
    nodes: circuit.nodes.length,
    midbandMicros,
    sweep100Micros,
    perSweepPointMicros: sweep100Micros / SWEEP_POINTS,
    midbandTargetMicros: MIDBAND_TARGET_MICROS,
    dcSolveMicros,
  };
  if (!Number.isFinite(sink)) throw new Error("bench produced a non-finite gain");
  console.log(
    `small-signal (${result.nodes}-node cascade): midband gain + impedances ${midbandMicros.toFixed(1)} µs median ` +
      `(target < ${MIDBAND_TARGET_MICROS} µs: ${midbandMicros < MIDBAND_TARGET_MICROS ? "met" : "MISSED"}); ` +
      `${SWEEP_POINTS}-point sweep with corners ${sweep100Micros.toFixed(0)} µs median ` +
      `(${result.perSweepPointMicros.toFixed(1)} µs per point, ${(sweep100Micros / midbandMicros).toFixed(1)}× the midband analysis); ` +
      `DC solve of the same circuit ${dcSolveMicros.toFixed(0)} µs (midband analysis = ${(midbandMicros / dcSolveMicros).toFixed(2)}× the DC solve)`,
  );
  return result;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  await benchSmallSignal();
}
