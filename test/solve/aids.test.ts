// Each convergence aid on its own reaches the same operating point as plain Newton.
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { randomBiasCircuit } from "./generate.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

const cases = {
  "saturated BJT": circuit().bjtModel("n", "npn").v("VCC", "vcc", "gnd", 5).r("RB", "vcc", "b", 1e3).r("RC", "vcc", "c", 10e3).q("Q1", "npn", "c", "b", "gnd", "n").build(),
  "CMOS pair": circuit()
    .mosModel("n", "nmos", { threshold: 0.6, kPrime: 200e-6, lambda: 0.05 })
    .mosModel("p", "pmos", { threshold: -0.6, kPrime: 80e-6, width: 2.5e-6, lambda: 0.05 })
    .v("VDD", "vdd", "gnd", 3.3)
    .v("VIN", "in", "gnd", 1.6)
    .m("MN", "nmos", "out", "in", "gnd", "n")
    .m("MP", "pmos", "out", "in", "vdd", "p")
    .build(),
  "random circuit 7": randomBiasCircuit(7, false),
  "random circuit 42": randomBiasCircuit(42, false),
};

describe("convergence aids", () => {
  for (const [name, c] of Object.entries(cases)) {
    it(`${name}: gmin stepping and source stepping agree with plain Newton`, () => {
      const plain = solved(solveOperatingPoint(c));
      expect(plain.stats.aid).toBe("none");
      for (const aid of ["gmin-stepping", "source-stepping"] as const) {
        const op = solved(solveOperatingPoint(c, { startWith: aid }));
        expect(op.stats.aid).toBe(aid);
        expect(op.stats.iterations).toBeGreaterThan(plain.stats.iterations);
        for (const [n, v] of Object.entries(plain.nodes)) expect(Math.abs(op.nodes[n]! - v)).toBeLessThan(1e-9 * Math.max(1, Math.abs(v)));
        expect(kclError(c, op).worst).toBeLessThan(1e-9);
      }
    });
  }
});
