// Sparse storage (large systems) against dense storage: the same Newton loop, the same pivoting
// rule, a different factorisation order of the same arithmetic — the answers must agree to
// 1e-12 relative on every generated size of the bench (10–3,000 nodes) and on the random bias
// circuits of the property tests. The outside check is KCL from the reported currents
// (kcl.ts), which neither storage's matrices enter.
import { describe, expect, it } from "vitest";
import { chainCircuit } from "../../bench/solve.js";
import type { Circuit } from "../../src/circuit/types.js";
import { UPDATE_RELTOL, VOLTAGE_ABSTOL } from "../../src/solve/convergence.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import { SPARSE_MIN_UNKNOWNS } from "../../src/solve/plan.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { randomBiasCircuit } from "./generate.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult, what: string): OperatingPoint {
  if (!r.ok) throw new Error(`${what}: ${r.reason}`);
  return r;
}

/**
 * Largest relative difference over node voltages, and over every numeric field of every device
 * record measured against the largest magnitude of that field in the circuit (a resistor's power
 * across a few µV is a difference of two node voltages: its own relative error is not the solve's).
 */
function worstRelative(a: OperatingPoint, b: OperatingPoint): { nodes: number; devices: number; where: string } {
  let nodes = 0;
  let devices = 0;
  let where = "";
  for (const [node, v] of Object.entries(a.nodes)) {
    const scale = Math.max(Math.abs(v), Math.abs(b.nodes[node]!));
    const r = scale === 0 ? 0 : Math.abs(v - b.nodes[node]!) / scale;
    if (r > nodes) {
      nodes = r;
      if (r > devices) where = `node ${node}`;
    }
  }
  const fieldScale = new Map<string, number>();
  const numbers = (rec: unknown): [string, number][] =>
    Object.entries(rec as Record<string, unknown>).filter((e): e is [string, number] => typeof e[1] === "number" && Number.isFinite(e[1]));
  for (const rec of Object.values(a.devices)) for (const [k, v] of numbers(rec)) fieldScale.set(`${rec.kind}.${k}`, Math.max(fieldScale.get(`${rec.kind}.${k}`) ?? 0, Math.abs(v)));
  for (const [id, rec] of Object.entries(a.devices)) {
    const other = b.devices[id] as unknown as Record<string, number>;
    for (const [k, v] of numbers(rec)) {
      const scale = Math.max(Math.abs(v), Math.abs(other[k]!), fieldScale.get(`${rec.kind}.${k}`)!);
      const r = scale === 0 ? 0 : Math.abs(v - other[k]!) / scale;
      if (r > devices) {
        devices = r;
        if (r > nodes) where = `${id}.${k}`;
      }
    }
  }
  return { nodes, devices, where };
}

function compare(c: Circuit, what: string, tolerance: number): void {
  const dense = solved(solveOperatingPoint(c, { storage: "dense" }), `${what} dense`);
  const sparse = solved(solveOperatingPoint(c, { storage: "sparse" }), `${what} sparse`);
  const { nodes, devices, where } = worstRelative(dense, sparse);
  expect(Math.max(nodes, devices), `${what}: ${where}`).toBeLessThanOrEqual(tolerance);
  expect(kclError(c, sparse).worst, what).toBeLessThan(1e-9);
}

describe("sparse and dense storage", () => {
  it("agree to 1e-12 relative on the bench chains of 10 to 3,000 nodes", () => {
    for (const nodes of [10, 30, 100, 300, 1000, 3000]) compare(chainCircuit(nodes), `chain of ${nodes} nodes`, 1e-12);
  });

  it("agree on random bias circuits (diodes, mirrors, pairs, PNP and PMOS): to 1e-12, or to the update tolerance where a node is held only by leakage", () => {
    let exact = 0;
    for (let seed = 1; seed <= 60; seed++) {
      const c = randomBiasCircuit(seed, seed % 2 === 0);
      const dense = solved(solveOperatingPoint(c, { storage: "dense" }), `seed ${seed} dense`);
      const sparse = solved(solveOperatingPoint(c, { storage: "sparse" }), `seed ${seed} sparse`);
      expect(kclError(c, sparse).worst, `seed ${seed}`).toBeLessThan(1e-9);
      for (const [node, v] of Object.entries(dense.nodes)) {
        expect(Math.abs(sparse.nodes[node]! - v), `seed ${seed} ${node}`).toBeLessThanOrEqual(VOLTAGE_ABSTOL + UPDATE_RELTOL * Math.abs(v));
      }
      const { nodes, devices } = worstRelative(dense, sparse);
      if (Math.max(nodes, devices) <= 1e-12) exact++;
    }
    // A node fixed only by junction leakage (1e-12 S) is known to the convergence tolerance, not
    // to 1e-12; the generator makes a few such circuits (8 of these 60 at 25 °C, 5 at 27 °C).
    expect(exact).toBeGreaterThanOrEqual(50);
  });

  it("are chosen by size: sparse from SPARSE_MIN_UNKNOWNS unknowns, with the same answer as forcing it", () => {
    const c = chainCircuit(SPARSE_MIN_UNKNOWNS + 10);
    expect(JSON.stringify(solveOperatingPoint(c))).toBe(JSON.stringify(solveOperatingPoint(c, { storage: "sparse" })));
    const small = chainCircuit(30);
    expect(JSON.stringify(solveOperatingPoint(small))).toBe(JSON.stringify(solveOperatingPoint(small, { storage: "dense" })));
  });

  it("re-solve bit-identically after other circuits of the same topology (the kept analysis carries no values over)", () => {
    const first = JSON.stringify(solveOperatingPoint(chainCircuit(1000, 1), { storage: "sparse" }));
    for (let seed = 2; seed <= 4; seed++) solved(solveOperatingPoint(chainCircuit(1000, seed), { storage: "sparse" }), `seed ${seed}`);
    expect(JSON.stringify(solveOperatingPoint(chainCircuit(1000, 1), { storage: "sparse" }))).toBe(first);
  });

  it("converge by gmin and source stepping to the dense answer", () => {
    const c = chainCircuit(400, 5);
    const dense = solved(solveOperatingPoint(c, { storage: "dense" }), "dense");
    for (const aid of ["conductance-stepping", "source-stepping"] as const) {
      const op = solved(solveOperatingPoint(c, { storage: "sparse", startWith: aid }), aid);
      expect(op.stats.aid).toBe(aid);
      for (const [node, v] of Object.entries(dense.nodes)) expect(Math.abs(op.nodes[node]! - v), `${aid} ${node}`).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(v)));
    }
  });
});
