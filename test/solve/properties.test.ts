// Properties over random bias circuits: polarity mirror symmetry, KCL from reported currents,
// bit-identical re-solves, and every generated circuit converging.
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { randomBiasCircuit } from "./generate.js";
import { kclError } from "./kcl.js";

const COUNT = 300;

function solved(r: SolveResult, seed: number): OperatingPoint {
  if (!r.ok) throw new Error(`seed ${seed}: ${r.reason}`);
  return r;
}

/** Current-like fields whose magnitudes must agree between a circuit and its mirror. */
const CURRENTS = ["collectorCurrent", "baseCurrent", "emitterCurrent", "drainCurrent", "current", "power", "transconductance", "inputResistance", "emitterResistance", "outputResistance", "bodyTransconductance", "dynamicResistance", "headroom", "overdrive"] as const;
/** Voltage fields that flip sign in the mirror. */
const VOLTAGES = ["baseEmitterVoltage", "collectorEmitterVoltage", "gateSourceVoltage", "drainSourceVoltage", "voltage", "threshold"] as const;

function close(a: number, b: number): boolean {
  return a === b || Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b)) + 1e-18;
}

describe(`random bias circuits (${COUNT}, seeded)`, () => {
  it("all converge, satisfy KCL to 1e-9 A at every node and re-solve bit-identically", () => {
    const aids: Record<string, number> = {};
    for (let seed = 1; seed <= COUNT; seed++) {
      const c = randomBiasCircuit(seed, false);
      const op = solved(solveOperatingPoint(c), seed);
      aids[op.stats.aid] = (aids[op.stats.aid] ?? 0) + 1;
      const k = kclError(c, op);
      expect(k.worst, `seed ${seed} node ${k.node}`).toBeLessThan(1e-9);
      expect(JSON.stringify(solveOperatingPoint(c))).toBe(JSON.stringify(op));
    }
    expect(Object.values(aids).reduce((a, b) => a + b, 0)).toBe(COUNT);
  });

  it("the PNP/PMOS mirror image gives negated node voltages and equal current magnitudes (1e-9 relative)", () => {
    for (let seed = 1; seed <= COUNT; seed++) {
      const a = solved(solveOperatingPoint(randomBiasCircuit(seed, false, false)), seed);
      const b = solved(solveOperatingPoint(randomBiasCircuit(seed, true, false)), seed);
      for (const [n, v] of Object.entries(a.nodes)) expect(close(b.nodes[n]!, -v), `seed ${seed} node ${n}`).toBe(true);
      for (const [id, s] of Object.entries(a.sources)) {
        const t = b.sources[id]!;
        expect(close(Math.abs(t.current), Math.abs(s.current)) && close(t.power, s.power), `seed ${seed} ${id}`).toBe(true);
      }
      for (const [id, d] of Object.entries(a.devices)) {
        const e = b.devices[id]! as unknown as Record<string, unknown>;
        const f = d as unknown as Record<string, unknown>;
        for (const key of CURRENTS) if (typeof f[key] === "number") expect(close(Math.abs(e[key] as number), Math.abs(f[key] as number)), `seed ${seed} ${id}.${key}`).toBe(true);
        for (const key of VOLTAGES) if (typeof f[key] === "number") expect(close(Math.abs(e[key] as number), Math.abs(f[key] as number)), `seed ${seed} ${id}.${key}`).toBe(true);
        if ("region" in f) expect(e.region, `seed ${seed} ${id}`).toBe(f.region);
        // Transistors report normal-direction currents: the same sign for both polarities.
        for (const key of ["collectorCurrent", "baseCurrent", "drainCurrent"] as const) if (typeof f[key] === "number" && d.kind !== "diode") expect(close(e[key] as number, f[key] as number), `seed ${seed} ${id}.${key}`).toBe(true);
      }
    }
  });
});
