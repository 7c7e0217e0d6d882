// Circuits without a DC operating point give a SolveFailure that names the parts and nodes.
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { SolveFailure, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";

function failed(r: SolveResult): SolveFailure {
  if (r.ok) throw new Error("expected a failure");
  return r;
}

describe("unsolvable circuits", () => {
  it("a node reached only through a capacitor has no DC path, named in the message", () => {
    const c = circuit().v("V1", "in", "gnd", 5).c("C1", "in", "b", 1e-6).r("R1", "b", "x", 1e3).build();
    const f = failed(solveOperatingPoint(c));
    expect(f.reason).toMatch(/^nodes `b` and `x` have no DC path to ground/);
    expect(f.nodes).toEqual(["b", "x"]);
    expect(f.parts).toEqual(["C1", "R1"]);
  });

  it("a MOSFET gate alone does not give its node a DC path", () => {
    const c = circuit().mosModel("n", "nmos", { threshold: 1, kPrime: 1e-4 }).v("VDD", "vdd", "gnd", 5).r("RD", "vdd", "d", 1e3).m("M1", "nmos", "d", "g", "gnd", "n").build();
    const f = failed(solveOperatingPoint(c));
    expect(f.reason).toMatch(/^node `g` has no DC path to ground/);
    expect(f.parts).toEqual(["M1"]);
  });

  it("two voltage sources in parallel form a loop, both named", () => {
    const c = circuit().v("VCC", "vcc", "gnd", 12).v("V2", "vcc", "gnd", 5).r("R1", "vcc", "gnd", 1e3).build();
    const f = failed(solveOperatingPoint(c));
    expect(f.reason).toMatch(/^voltage sources VCC and V2 form a loop/);
    expect(f.parts).toEqual(["VCC", "V2"]);
  });

  it("a zero-resistance inductor across a source closes a loop of voltage-fixing branches", () => {
    const c = circuit().v("V1", "a", "gnd", 1).r("R1", "a", "b", 10).l("L1", "b", "c", 1e-3).v("V2", "c", "gnd", 2).l("L2", "b", "gnd", 1e-3).build();
    const f = failed(solveOperatingPoint(c));
    expect(f.reason).toMatch(/form a loop/);
    expect([...f.parts].sort()).toEqual(["L1", "L2", "V2"]);
  });

  it("a source with both pins on one node is reported", () => {
    const c = circuit().v("V1", "a", "a", 1).r("R1", "a", "gnd", 10).build();
    expect(failed(solveOperatingPoint(c)).reason).toMatch(/V1 has both pins on node `a`/);
  });

  it("a singular matrix the topology cannot see (a VCCS cancelling its resistor) names the node", () => {
    const c = circuit().i("I1", "gnd", "a", 1e-3).r("R1", "a", "gnd", 1e3).vccs("G1", "a", "gnd", "a", "gnd", 1e-3).build();
    const f = failed(solveOperatingPoint(c));
    expect(f.reason).toMatch(/singular at node `a`/);
    expect(f.nodes).toEqual(["a"]);
    expect(f.parts).toContain("G1");
  });

  it("a zero-ohm resistor or a bad model reference is a failure, not a NaN", () => {
    expect(failed(solveOperatingPoint(circuit().v("V1", "a", "gnd", 1).r("R1", "a", "gnd", 0).build())).reason).toMatch(/R1 has value 0/);
    const c = circuit().diodeModel("d").v("V1", "a", "gnd", 1).r("R1", "a", "b", 1).q("Q1", "npn", "b", "b", "gnd", "d").build();
    expect(failed(solveOperatingPoint(c)).parts).toEqual(["Q1"]);
    const h = circuit().diodeModel("d").v("V1", "a", "gnd", 1).r("R1", "a", "k", 1).d("D1", "k", "gnd", "d").ccvs("H1", "h", "gnd", "D1", 2).r("R2", "h", "gnd", 1).build();
    expect(failed(solveOperatingPoint(h)).reason).toMatch(/ccvs H1 senses `D1`, which is not a resistor, capacitor, inductor, voltage-source or current-source/);
  });
});

describe("non-convergence", () => {
  it("names the parts and nodes where Newton struggled, after trying every aid", () => {
    const c = circuit()
      .bjtModel("n", "npn")
      .v("VCC", "vcc", "gnd", 10)
      .v("VEE", "vee", "gnd", -10)
      .r("RC1", "vcc", "c1", 4.7e3)
      .r("RC2", "vcc", "c2", 4.7e3)
      .q("Q1", "npn", "c1", "gnd", "e", "n")
      .q("Q2", "npn", "c2", "gnd", "e", "n")
      .r("RT", "e", "vee", 4.7e3)
      .build();
    const f = failed(solveOperatingPoint(c, { maxIterations: 2 }));
    expect(f.reason).toMatch(/did not converge \(plain Newton, conductance stepping and source stepping all failed\)/);
    expect(f.reason).toMatch(/node `/);
    expect(f.parts.length).toBeGreaterThan(0);
    expect(f.parts.every((p) => ["Q1", "Q2"].includes(p))).toBe(true);
    expect(f.nodes.length).toBeGreaterThan(0);
    expect(f.stats.aid).toBe("source-stepping");
    expect(Number.isFinite(f.stats.iterations)).toBe(true);
  });
});

describe("defects never crash", () => {
  it("an unexpected component shape becomes a SolveFailure, not a throw", () => {
    const c = circuit().v("V1", "a", "gnd", 1).r("R1", "a", "gnd", 1).build();
    const broken = { ...c, components: [...c.components, { id: "X1", kind: "memristor", pins: {} } as never] };
    const f = failed(solveOperatingPoint(broken));
    expect(f.reason).toMatch(/^internal error in the bias solver/);
  });
});
