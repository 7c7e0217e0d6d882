// Benchmark of the bias solve: median µs per operating-point solve and Newton iterations for
// generated transistor chains of 10, 30, 100 and 300 nodes, beside the identical Newton loop
// whose linear step is mathjs `lusolve` (same run, reported as a ratio).
// A second table times dense against sparse storage (10–3,000 nodes) with the same Newton loop.
// Run alone with `node dist/bench/solve.js`; `npm run bench` calls benchSolve().

import { pathToFileURL } from "node:url";
import { lup, lusolve } from "mathjs";
import type { Circuit, Component, Model, SourcePos } from "../src/circuit/types.js";
import { solveOperatingPoint } from "../src/solve/index.js";
import { SPARSE_MIN_UNKNOWNS } from "../src/solve/plan.js";
import type { LinearSolverFactory } from "../src/solve/linear-solver.js";
// Seeded (mulberry32) so every run times the same circuits.
import { seededRandom } from "../src/variation/random.js";

/** Node counts of the generated circuits (issue 3). */
export const SIZES = [10, 30, 100, 300] as const;
/** Target from the issue: a 30-node solve under 100 µs. */
export const TARGET_MICROS_30 = 100;
/** Target from the issue: at least this many times faster than the mathjs-based loop. */
export const TARGET_RATIO = 30;
/** Wall-clock budget per measurement, ms: enough samples for a stable median, bounded for big circuits. */
const BUDGET_MS = 400;
/** Fewest and most timed solves per measurement. */
const MIN_RUNS = 3;
const MAX_RUNS = 5000;

const POS: SourcePos = { file: "bench.yaml", line: 1, column: 1 };
const exact = (v: number) => ({ nominal: v, min: v, max: v });
const spread = (v: number) => ({ min: v, typ: v, max: v });

/**
 * A chain of biased stages (Tidewater's multi-stage sensor front ends): each stage is a
 * divider-biased common-emitter BJT or common-source NMOS with collector/drain and degeneration
 * resistors, DC-coupled to the next stage through a resistor. 3 nodes per stage plus the rail.
 */
export function chainCircuit(nodes: number, seed = 1): Circuit {
  const rnd = seededRandom(seed);
  const vary = (v: number) => v * (0.8 + 0.4 * rnd());
  const parts: Component[] = [];
  const r = (id: string, a: string, b: string, v: number) => parts.push({ id, pos: POS, kind: "resistor", pins: { a, b }, value: exact(v) });
  parts.push({ id: "VCC", pos: POS, kind: "voltage-source", pins: { plus: "vcc", minus: "gnd" }, voltage: exact(12) });
  const stages = Math.max(1, Math.round((nodes - 1) / 3));
  const names: string[] = ["vcc"];
  for (let i = 0; i < stages; i++) {
    const [b, c, e] = [`b${i}`, `c${i}`, `e${i}`];
    names.push(b, c, e);
    r(`R1_${i}`, "vcc", b, vary(82e3));
    r(`R2_${i}`, b, "gnd", vary(22e3));
    r(`RC_${i}`, "vcc", c, vary(4.7e3));
    r(`RE_${i}`, e, "gnd", vary(1e3));
    if (i > 0) r(`RK_${i}`, `c${i - 1}`, b, vary(470e3));
    if (rnd() < 0.5) parts.push({ id: `Q${i}`, pos: POS, kind: "npn", model: "npn", pins: { collector: c, base: b, emitter: e } });
    else parts.push({ id: `M${i}`, pos: POS, kind: "nmos", model: "nmos", pins: { drain: c, gate: b, source: e, body: e } });
  }
  const models = new Map<string, Model>([
    [
      "npn",
      { id: "npn", pos: POS, kind: "npn", beta: spread(150), reverseBeta: spread(1), saturationCurrent: spread(1e-14), earlyVoltage: spread(80), saturationEdge: 0.3, drift: { voltage: -0.002, current: 1e-3 }, betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 } },
    ],
    [
      "nmos",
      { id: "nmos", pos: POS, kind: "nmos", threshold: spread(1), kPrime: spread(100e-6), width: 20e-6, length: 1e-6, channelLengthModulation: spread(0.02), bodyEffect: 0, fermiPotential: 0.3, thresholdTempco: -2e-3, kPrimeExponent: -1.5 },
    ],
  ]);
  return {
    file: "bench.yaml",
    name: `chain-${nodes}`,
    temperature: 298.15,
    ground: "gnd",
    parameters: new Map(),
    models,
    components: parts,
    nodes: names.sort(),
    specs: { gains: [], supplies: [], devices: [] },
    overrides: [],
    warnings: [],
    pos: POS,
  };
}

/** The same Newton loop with mathjs doing the linear step: lup() to factor, lusolve() to solve. */
export const mathjsLinearSolver: LinearSolverFactory = (n) => {
  let factored: ReturnType<typeof lup> | undefined;
  return {
    factor(a) {
      const rows: number[][] = [];
      for (let i = 0; i < n; i++) rows.push(Array.from(a.subarray(i * n, i * n + n)));
      factored = lup(rows);
      return -1;
    },
    solve(x) {
      try {
        const sol = (lusolve(factored!, Array.from(x)).valueOf() as number[][]).map((r) => r[0]!);
        for (let i = 0; i < n; i++) x[i] = sol[i]!;
      } catch {
        x.fill(NaN); // singular: the loop reports a non-finite step
      }
    },
  };
};

/** A batch lasts at least this long, ms, so the clock's resolution does not matter. */
const BATCH_MS = 2;
/**
 * Each measurement first runs its solve for this long, ms, untimed. The engine optimises the
 * solver's functions only after some thousands of calls (60–100 ms of 10-node solves here, longer
 * when the other core is busy); timed from the first call, whichever loop is measured first
 * (ours, at 10 nodes) would have its median taken partly from unoptimised code.
 */
const WARMUP_MS = 150;

/**
 * Median over timed batches of the time per call, µs: wall clock, and the process's CPU time
 * (user + system), which other processes on a busy machine inflate much less.
 */
function medianMicros(run: () => void): { wall: number; cpu: number; best: number; runs: number } {
  const warm = performance.now();
  do run(); // warm-up (JIT), the same for both loops
  while (performance.now() - warm < WARMUP_MS);
  let batch = 1;
  for (;;) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) run();
    if (performance.now() - t0 >= BATCH_MS || batch >= MAX_RUNS) break;
    batch *= 2;
  }
  const wall: number[] = [];
  const cpu: number[] = [];
  const start = performance.now();
  while (wall.length < MIN_RUNS || (performance.now() - start < BUDGET_MS && wall.length * batch < MAX_RUNS)) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) run();
    const t1 = performance.now();
    const c1 = process.cpuUsage(c0);
    wall.push(((t1 - t0) * 1000) / batch);
    cpu.push((c1.user + c1.system) / batch);
  }
  const median = (xs: number[]) => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  return { wall: median(wall), cpu: median(cpu), best: Math.min(...wall), runs: wall.length * batch };
}

export interface SolveBenchRow {
  readonly nodes: number;
  readonly unknowns: number;
  readonly iterations: number;
  readonly aid: string;
  /** Median wall-clock µs per solve. */
  readonly micros: number;
  /** Median CPU µs per solve (less sensitive to other load on the machine). */
  readonly cpuMicros: number;
  /** Fastest batch, µs per solve: closest to an idle machine when others share the cores. */
  readonly bestMicros: number;
  readonly mathjsMicros: number;
  readonly mathjsCpuMicros: number;
  /** mathjs loop time / our time, wall clock. */
  readonly ratio: number;
}

export async function benchSolve(print: (line: string) => void = console.log): Promise<SolveBenchRow[]> {
  const rows = await benchLinearStep(print);
  print("");
  await benchStorage(print);
  return rows;
}

async function benchLinearStep(print: (line: string) => void): Promise<SolveBenchRow[]> {
  const rows: SolveBenchRow[] = [];
  for (const n of SIZES) {
    const c = chainCircuit(n);
    const ours = solveOperatingPoint(c);
    const theirs = solveOperatingPoint(c, { linearSolver: mathjsLinearSolver });
    if (!ours.ok || !theirs.ok) throw new Error(`bench circuit ${c.name} did not solve: ${ours.ok ? "" : ours.reason} ${theirs.ok ? "" : theirs.reason}`);
    const a = medianMicros(() => solveOperatingPoint(c));
    const b = medianMicros(() => solveOperatingPoint(c, { linearSolver: mathjsLinearSolver }));
    rows.push({
      nodes: c.nodes.length,
      unknowns: c.nodes.length + 1,
      iterations: ours.stats.iterations,
      aid: ours.stats.aid,
      micros: a.wall,
      cpuMicros: a.cpu,
      bestMicros: a.best,
      mathjsMicros: b.wall,
      mathjsCpuMicros: b.cpu,
      ratio: b.wall / a.wall,
    });
  }
  print("bias solve (median per operating point; same Newton loop, linear step ours vs mathjs lup/lusolve)");
  print("  nodes  iterations  aid    ours µs (cpu) [fastest batch]   mathjs µs (cpu)    ratio");
  for (const r of rows) {
    print(
      `  ${String(r.nodes).padStart(5)}  ${String(r.iterations).padStart(10)}  ${r.aid.padEnd(5)}  ${r.micros.toFixed(1).padStart(8)} (${r.cpuMicros.toFixed(1).padStart(7)}) [${r.bestMicros.toFixed(1).padStart(7)}]  ${r.mathjsMicros.toFixed(0).padStart(9)} (${r.mathjsCpuMicros.toFixed(0).padStart(7)})  ${r.ratio.toFixed(0).padStart(5)}×`,
    );
  }
  const r30 = rows.find((r) => r.nodes >= 30 && r.nodes <= 32);
  if (r30) {
    print(
      `  targets: 30 nodes under ${TARGET_MICROS_30} µs (median): ${r30.micros < TARGET_MICROS_30 ? "met" : "missed"}; ` +
        `≥${TARGET_RATIO}× mathjs: ${rows.filter((r) => r.ratio >= TARGET_RATIO).length} of ${rows.length} sizes`,
    );
  }
  return rows;
}

/** Node counts of the storage comparison. */
export const STORAGE_SIZES = [10, 30, 100, 300, 1000, 3000] as const;
/** Targets from issue 15: median bias solve at 1,000 and 3,000 nodes, ms. */
export const TARGET_MS_1000 = 3;
export const TARGET_MS_3000 = 10;

export interface StorageBenchRow {
  readonly nodes: number;
  readonly unknowns: number;
  /** Newton iterations of the solve (the same with either storage: the same steps, to rounding). */
  readonly iterations: number;
  /** What the default ("auto") storage picks at this size. */
  readonly auto: "dense" | "sparse";
  readonly denseMicros: number;
  readonly denseCpuMicros: number;
  readonly sparseMicros: number;
  readonly sparseCpuMicros: number;
  readonly sparseBestMicros: number;
}

/**
 * Dense against sparse storage on the same chains, measured alternately (dense, sparse, dense,
 * sparse; the faster median of each kept) so that a slow spell of the shared machine hits both.
 * Prints the targets of issue 15 with met/missed: the 1,000- and 3,000-node medians, and no
 * regression at 10–300 nodes (the default storage there no slower than dense, on CPU time, with
 * NOISE_MARGIN for a shared machine).
 */
export async function benchStorage(print: (line: string) => void = console.log): Promise<StorageBenchRow[]> {
  const rows: StorageBenchRow[] = [];
  for (const n of STORAGE_SIZES) {
    const c = chainCircuit(n);
    const d = solveOperatingPoint(c, { storage: "dense" });
    const s = solveOperatingPoint(c, { storage: "sparse" });
    if (!d.ok || !s.ok) throw new Error(`bench circuit ${c.name} did not solve`);
    const dense = [medianMicros(() => solveOperatingPoint(c, { storage: "dense" }))];
    const sparse = [medianMicros(() => solveOperatingPoint(c, { storage: "sparse" }))];
    dense.push(medianMicros(() => solveOperatingPoint(c, { storage: "dense" })));
    sparse.push(medianMicros(() => solveOperatingPoint(c, { storage: "sparse" })));
    const best = <T extends { wall: number }>(xs: T[]): T => xs.reduce((a, b) => (b.wall < a.wall ? b : a));
    const bd = best(dense);
    const bs = best(sparse);
    const unknowns = c.nodes.length + 1; // every node but ground, and the rail source's branch current
    rows.push({
      nodes: c.nodes.length,
      unknowns,
      iterations: s.stats.iterations,
      auto: unknowns >= SPARSE_MIN_UNKNOWNS ? "sparse" : "dense",
      denseMicros: bd.wall,
      denseCpuMicros: bd.cpu,
      sparseMicros: bs.wall,
      sparseCpuMicros: bs.cpu,
      sparseBestMicros: Math.min(...sparse.map((m) => m.best)),
    });
  }
  print(`bias solve, matrix storage (median per operating point; default: sparse from ${SPARSE_MIN_UNKNOWNS} unknowns)`);
  print("  nodes  iterations  default   dense µs (cpu)        sparse µs (cpu) [fastest batch]   dense/sparse (cpu)");
  for (const r of rows) {
    print(
      `  ${String(r.nodes).padStart(5)}  ${String(r.iterations).padStart(10)}  ${r.auto.padEnd(7)}  ${r.denseMicros.toFixed(0).padStart(8)} (${r.denseCpuMicros.toFixed(0).padStart(8)})  ${r.sparseMicros.toFixed(0).padStart(8)} (${r.sparseCpuMicros.toFixed(0).padStart(8)}) [${r.sparseBestMicros.toFixed(0).padStart(8)}]  ${(r.denseMicros / r.sparseMicros).toFixed(2).padStart(6)}× (${(r.denseCpuMicros / r.sparseCpuMicros).toFixed(2)}×)`,
    );
  }
  const at = (n: number) => rows.find((r) => Math.abs(r.nodes - n) <= 2);
  const r1 = at(1000);
  const r3 = at(3000);
  if (r1 && r3) {
    print(
      `  targets: 1,000 nodes ≤ ${TARGET_MS_1000} ms: ${r1.sparseMicros <= TARGET_MS_1000 * 1000 ? "met" : "missed"} (${(r1.sparseMicros / 1000).toFixed(2)} ms, cpu ${(r1.sparseCpuMicros / 1000).toFixed(2)}); ` +
        `3,000 nodes ≤ ${TARGET_MS_3000} ms: ${r3.sparseMicros <= TARGET_MS_3000 * 1000 ? "met" : "missed"} (${(r3.sparseMicros / 1000).toFixed(2)} ms, cpu ${(r3.sparseCpuMicros / 1000).toFixed(2)})`,
    );
  }
  const small = rows.filter((r) => r.nodes <= 301);
  const slower = small.filter((r) => r.auto === "sparse" && r.sparseCpuMicros > r.denseCpuMicros * (1 + NOISE_MARGIN));
  print(
    `  no regression at 10–300 nodes (default storage vs dense, cpu, ${(100 * NOISE_MARGIN).toFixed(0)} % margin): ${slower.length === 0 ? "met" : `missed at ${slower.map((r) => r.nodes).join(", ")} nodes`}` +
      `; sparse is faster than dense at ${rows.filter((r) => r.sparseCpuMicros < r.denseCpuMicros).map((r) => r.nodes).join(", ") || "no size"} nodes`,
  );
  return rows;
}

/** Run-to-run spread of a median on the shared bench machine; a difference within it is not a regression. */
const NOISE_MARGIN = 0.05;

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  await benchSolve();
}
