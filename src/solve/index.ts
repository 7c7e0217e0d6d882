// Public entry of the bias solve: the DC operating point of a resolved Circuit by Newton–Raphson
// on modified nodal analysis, with conductance stepping and then source stepping when plain Newton
// fails. Pure and deterministic: the same circuit gives bit-identical results.
import type { Circuit } from "../circuit/types.js";
import { diagnoseTopology } from "./diagnose.js";
import { PLAIN_ITERATION_CAP } from "./convergence.js";
import { gminStepping } from "./gmin-stepping.js";
import { denseLu, type LinearSolverFactory } from "./linear-solver.js";
import { newRecord, newton, type NewtonRecord } from "./newton.js";
import { compilePlan, describeUnknown, type MatrixStorage, type Plan } from "./plan.js";
import { readOperatingPoint } from "./point.js";
import { sourceStepping } from "./source-stepping.js";
import { sparseLu } from "./sparse-lu.js";
import type { ConvergenceAid, SolveFailure, SolveResult } from "./types.js";

export type * from "./types.js";
export { formatSi, renderOperatingPoint, renderSolveResult } from "./table.js";

export interface SolveOptions {
  /**
   * Linear solver of the Newton step (default: our LU, dense or sparse by size). The benchmark
   * swaps it; a given solver always gets dense storage (n×n, row-major).
   */
  readonly linearSolver?: LinearSolverFactory;
  /** Matrix storage (default "auto": sparse from SPARSE_MIN_UNKNOWNS unknowns). Tests and the bench force one. */
  readonly storage?: MatrixStorage;
  /** Skip the stages before this aid (tests use it to exercise each aid on its own). */
  readonly startWith?: ConvergenceAid;
  /** Lower every stage's iteration cap to this (tests use it to provoke non-convergence). */
  readonly maxIterations?: number;
  /**
   * Warm start (variation scenarios): with `x` null, a successful solve stores its unknowns there;
   * with `x` set (same circuit structure, other values), plain Newton starts from it and the
   * usual aids follow only if that fails. A tolerance corner or sample sits a few percent from
   * nominal, so this takes 2–4 Newton iterations instead of ~10–30 from zero.
   */
  readonly warmStart?: WarmStart;
}

export interface WarmStart {
  x: Float64Array | null;
  /**
   * What the nonlinear devices kept from that point (their junction currents, DeviceInstance
   * saveWarm), in plan order; set with x. A sample at another temperature finds its junction
   * currents off by decades at x's voltages, and Newton then spent 5–15 iterations on the way
   * back; evaluated first at the voltages that carry these currents, it lands within a few mV.
   */
  state?: Float64Array | null;
}

/** Iterations a warm start may take before the solve falls back to the cold path. */
export const WARM_ITERATION_CAP = 30;

const AIDS: readonly ConvergenceAid[] = ["none", "conductance-stepping", "source-stepping"];

export function solveOperatingPoint(circuit: Circuit, options: SolveOptions = {}): SolveResult {
  try {
    return solve(circuit, options);
  } catch (err) {
    // A defect here must not crash a review run: report it as a failure of this circuit.
    const message = err instanceof Error ? err.message : String(err);
    return failure(`internal error in the bias solver (${message}); please report it with this circuit`, [], [], "none", 0, Infinity);
  }
}

function solve(circuit: Circuit, options: SolveOptions): SolveResult {
  const compiled = compilePlan(circuit, options.linearSolver ? "dense" : (options.storage ?? "auto"));
  if (!compiled.ok) return failure(compiled.reason, compiled.parts, [], "none", 0, Infinity);
  const plan = compiled.plan;
  const topo = diagnoseTopology(plan);
  if (topo) return failure(topo.reason, topo.parts, topo.nodes, "none", 0, Infinity);

  const solver = plan.sparse
    ? sparseLu(plan.n, { rowStart: plan.patternRowStart, cols: plan.patternCols })
    : (options.linearSolver ?? denseLu)(plan.n, plan.pattern);
  const rec = newRecord();
  const total = { iterations: 0 };
  const first = AIDS.indexOf(options.startWith ?? "none");
  const cap = options.maxIterations ?? Infinity;
  let lastStatus: NewtonRecord["status"] = "not-converged";
  let singular = -1;
  const warm = options.warmStart;
  if (warm?.x && warm.x.length === plan.n && first === 0) {
    plan.x.set(warm.x);
    const saved = warm.state && warm.state.length === warmStateSize(plan) ? warm.state : undefined;
    let at = 0;
    for (const d of plan.nonlinear) {
      d.reset?.();
      d.prime?.(plan.x, saved, at);
      at += d.warmSize ?? 0;
    }
    newton(plan, solver, { gmin: 0, sourceScale: 1, init: false, maxIterations: Math.min(WARM_ITERATION_CAP, cap), polish: true }, rec);
    total.iterations += rec.iterations;
    if (rec.status === "converged") {
      const op = readOperatingPoint(plan, { iterations: total.iterations, residual: rec.residual, aid: "none" });
      if (!("bad" in op)) return implausible(circuit, plan, op) ?? op;
    }
  }
  for (let k = first; k < AIDS.length; k++) {
    const aid = AIDS[k]!;
    let ok: boolean;
    if (aid === "none") {
      plan.x.fill(0);
      for (const d of plan.nonlinear) d.reset?.();
      newton(plan, solver, { gmin: 0, sourceScale: 1, init: true, maxIterations: Math.min(PLAIN_ITERATION_CAP, cap), polish: true }, rec);
      total.iterations += rec.iterations;
      ok = rec.status === "converged";
    } else if (aid === "conductance-stepping") {
      ok = gminStepping(plan, solver, rec, total, cap);
    } else {
      ok = sourceStepping(plan, solver, rec, total, cap);
    }
    lastStatus = rec.status;
    if (rec.status === "singular" && singular < 0) singular = rec.singularColumn;
    if (ok) {
      const op = readOperatingPoint(plan, { iterations: total.iterations, residual: rec.residual, aid });
      if ("bad" in op) return failure(`the solve produced a non-finite value at ${op.bad}`, [], [], aid, total.iterations, rec.residual);
      if (warm && !warm.x) {
        warm.x = Float64Array.from(plan.x);
        warm.state = saveWarmState(plan);
      }
      return implausible(circuit, plan, op) ?? op;
    }
  }
  return nonConvergence(plan, rec, lastStatus, singular, total.iterations);
}

function warmStateSize(plan: Plan): number {
  let size = 0;
  for (const d of plan.nonlinear) size += d.warmSize ?? 0;
  return size;
}

function saveWarmState(plan: Plan): Float64Array {
  const out = new Float64Array(warmStateSize(plan));
  let at = 0;
  for (const d of plan.nonlinear) {
    d.saveWarm?.(plan.x, out, at);
    at += d.warmSize ?? 0;
  }
  return out;
}

function failure(
  reason: string,
  parts: readonly string[],
  nodes: readonly string[],
  aid: ConvergenceAid,
  iterations: number,
  residual: number,
): SolveFailure {
  return { ok: false, reason, parts, nodes, stats: { iterations, residual, aid } };
}

/**
 * No board-level circuit this tool reviews has a node beyond this (V). A converged point past it
 * means a current source is pushing its current through nothing but the 1e-12 S junction and
 * channel leakage of the models — a reverse-biased junction or a transistor in cutoff — where the
 * real part would break down. Reporting that point as right would be a wrong answer.
 */
const PLAUSIBLE_VOLTAGE = 100e3;
/** Sources themselves may set large voltages; a node may sit this many times beyond the largest. */
const SOURCE_VOLTAGE_FACTOR = 10;

function implausible(circuit: Circuit, plan: Plan, op: SolveResult & { ok: true }): SolveFailure | null {
  let largestSource = 0;
  const components = circuit.components;
  for (let k = 0; k < components.length; k++) {
    const c = components[k]!;
    if (c.kind === "voltage-source") largestSource = Math.max(largestSource, Math.abs(c.voltage.nominal));
  }
  const bound = Math.max(PLAUSIBLE_VOLTAGE, SOURCE_VOLTAGE_FACTOR * largestSource);
  // A first look on the unknowns op.nodes was read from (ground is 0, always within bound):
  // nearly every point passes here, without walking the record.
  const { x, nodeSlots } = plan;
  let beyond = false;
  for (let k = 0; k < nodeSlots.length && !beyond; k++) beyond = Math.abs(x[nodeSlots[k]!]!) > bound;
  if (!beyond) return null;
  const far = Object.entries(op.nodes).filter(([, v]) => Math.abs(v) > bound).map(([n]) => n).sort();
  if (far.length === 0) return null;
  const currentSources = circuit.components.filter((c) => c.kind === "current-source" || c.kind === "cccs" || c.kind === "vccs").map((c) => c.id);
  const worst = far.reduce((a, b) => (Math.abs(op.nodes[b]!) > Math.abs(op.nodes[a]!) ? b : a));
  const volts = op.nodes[worst]!;
  return failure(
    `no physical operating point: node \`${worst}\` would sit at ${volts.toExponential(2)} V, because ${currentSources.length ? `a current source (${currentSources.join(", ")})` : "a source"} forces current into a path that cannot carry it (a reverse-biased junction or a transistor in cutoff); give that current a path, or check the source's direction`,
    currentSources,
    far,
    op.stats.aid,
    op.stats.iterations,
    op.stats.residual,
  );
}

/** Names the unknowns where the solve struggled most and the parts attached to them. */
function nonConvergence(plan: Plan, rec: NewtonRecord, status: NewtonRecord["status"], singular: number, iterations: number): SolveFailure {
  const worst = [singular, rec.worstUpdate, rec.worstResidual].filter((i) => i >= 0);
  const unknowns = [...new Set(worst)].map((i) => plan.unknowns[i]!);
  const nodes = [...new Set(unknowns.filter((u) => u.kind === "node").map((u) => u.name))];
  const owners = new Set(unknowns.filter((u) => u.owner).map((u) => u.owner!));
  const touching = plan.devices.filter((d) => owners.has(d.id) || d.terminals.some((t) => nodes.includes(t.node)));
  const nonlinear = touching.filter((d) => d.nonlinear);
  const parts = (nonlinear.length ? nonlinear : touching).map((d) => d.id);
  const near = parts.length ? ` near ${parts.join(", ")}` : "";
  if (singular >= 0 && status === "singular") {
    const at = describeUnknown(plan.unknowns[singular]!);
    return failure(
      `the DC equations are singular at ${at}${near}: its value is not determined (look for a controlled source cancelling a conductance, or a part that leaves it without a DC reference)`,
      parts,
      nodes,
      "source-stepping",
      iterations,
      rec.residual,
    );
  }
  const where = unknowns.map(describeUnknown).join(" and ");
  const at = where ? `; the largest changes and residuals were at ${where}` : "";
  return failure(`the operating point did not converge (plain Newton, conductance stepping and source stepping all failed)${at}${near}; check the bias network there`, parts, nodes, "source-stepping", iterations, rec.residual);
}
