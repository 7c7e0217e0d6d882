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
    it(`${name}: conductance stepping and source stepping agree with plain Newton`, () => {
      const plain = solved(solveOperatingPoint(c));
      expect(plain.stats.aid).toBe("none");
      for (const aid of ["conductance-stepping", "source-stepping"] as const) {
        const op = solved(solveOperatingPoint(c, { startWith: aid }));
        expect(op.stats.aid).toBe(aid);
        expect(op.stats.iterations).toBeGreaterThan(plain.stats.iterations);
        for (const [n, v] of Object.entries(plain.nodes)) expect(Math.abs(op.nodes[n]! - v)).toBeLessThan(1e-9 * Math.max(1, Math.abs(v)));
        expect(kclError(c, op).worst).toBeLessThan(1e-9);
      }
    });
  }
});

describe("fall-back order", () => {
  it("20 direct-coupled common-emitter stages: converges (with an aid if plain Newton runs out), regions alternate", () => {
    const b = circuit().bjtModel("n", "npn", { beta: 300, earlyVoltage: 20 }).v("VCC", "vcc", "gnd", 30).v("VIN", "in", "gnd", 0.7);
    let prev = "in";
    for (let k = 0; k < 20; k++) {
      b.r(`RC${k}`, "vcc", `c${k}`, 10e3).q(`Q${k}`, "npn", `c${k}`, prev, "gnd", "n");
      prev = `c${k}`;
    }
    const c = b.build();
    const op = solved(solveOperatingPoint(c));
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
    // Each stage inverts: an on (saturated) stage pulls the next base low, an off stage lets
    // the next base draw current through its collector resistor (logic-inverter chain).
    for (let k = 0; k < 20; k++) expect((op.devices[`Q${k}`] as { region: string }).region).toBe(k % 2 === 0 ? "saturation" : "cutoff");
    expect(["conductance-stepping", "source-stepping"]).toContain(op.stats.aid);
  });
});

