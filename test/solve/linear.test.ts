// Linear networks against closed forms (Ohm's and Kirchhoff's laws, handbook formulas).
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

describe("linear networks", () => {
  it("voltage divider: Vout = V·R2/(R1+R2) (voltage-divider rule, handbook formula)", () => {
    const c = circuit().v("V1", "in", "gnd", 12).r("R1", "in", "out", 47e3).r("R2", "out", "gnd", 68e3).build();
    const op = solved(solveOperatingPoint(c));
    expect(op.nodes.out).toBeCloseTo((12 * 68e3) / (47e3 + 68e3), 12);
    expect(op.sources.V1!.current).toBeCloseTo(12 / 115e3, 15);
    expect(op.sources.V1!.power).toBeCloseTo((12 * 12) / 115e3, 14);
    expect(op.stats.aid).toBe("none");
  });

  it("Wheatstone bridge: detector current by the Thevenin closed form (handbook formula)", () => {
    // Bridge R1 (top-left), R2 (bottom-left), R3 (top-right), R4 (bottom-right), detector Rg.
    const [R1, R2, R3, R4, Rg, V] = [1000, 2200, 1500, 1800, 470, 10];
    const c = circuit()
      .v("V1", "top", "gnd", V)
      .r("R1", "top", "l", R1)
      .r("R2", "l", "gnd", R2)
      .r("R3", "top", "r", R3)
      .r("R4", "r", "gnd", R4)
      .r("RG", "l", "r", Rg)
      .build();
    const op = solved(solveOperatingPoint(c));
    const vth = V * (R2 / (R1 + R2) - R4 / (R3 + R4));
    const rth = (R1 * R2) / (R1 + R2) + (R3 * R4) / (R3 + R4);
    const ig = vth / (rth + Rg);
    const d = op.devices.RG as { current: number };
    expect(Math.abs(d.current / ig - 1)).toBeLessThan(1e-12);
    expect(Math.abs(d.current - ig)).toBeLessThan(1e-15);
  });

  it("balanced bridge carries no detector current (R1/R2 = R3/R4, handbook condition)", () => {
    const c = circuit()
      .v("V1", "top", "gnd", 5)
      .r("R1", "top", "l", 1000)
      .r("R2", "l", "gnd", 2000)
      .r("R3", "top", "r", 3300)
      .r("R4", "r", "gnd", 6600)
      .r("RG", "l", "r", 100)
      .build();
    const op = solved(solveOperatingPoint(c));
    expect(Math.abs((op.devices.RG as { current: number }).current)).toBeLessThan(1e-15);
  });

  it("current source into a resistor: V = I·R, and the source reports its own value", () => {
    const c = circuit().i("I1", "gnd", "n", 2e-3).r("R1", "n", "gnd", 4700).build();
    const op = solved(solveOperatingPoint(c));
    expect(op.nodes.n).toBeCloseTo(9.4, 12);
    expect(op.sources.I1).toMatchObject({ current: 2e-3 });
    expect(op.sources.I1!.power).toBeCloseTo(2e-3 * 9.4, 14);
  });

  it("inductor is a DC short through its winding resistance; capacitor is open", () => {
    const c = circuit()
      .v("V1", "a", "gnd", 5)
      .l("L1", "a", "b", 1e-3, 2)
      .r("R1", "b", "gnd", 8)
      .c("C1", "a", "gnd", 1e-6)
      .build();
    const op = solved(solveOperatingPoint(c));
    expect((op.devices.L1 as { current: number }).current).toBeCloseTo(0.5, 12);
    expect(op.nodes.b).toBeCloseTo(4, 12);
    expect(op.devices.C1).toEqual({ kind: "capacitor", voltage: 5 });
  });

  it("controlled sources follow the conventions of src/circuit/types.ts", () => {
    const c = circuit()
      .v("VIN", "in", "gnd", 0.5)
      .r("RIN", "in", "gnd", 1000)
      .vcvs("E1", "e", "gnd", "in", "gnd", 4)
      .r("RE", "e", "gnd", 1000)
      .vccs("G1", "g", "gnd", "in", "gnd", 1e-3)
      .r("RG", "g", "gnd", 2000)
      .cccs("F1", "f", "gnd", "RIN", 3)
      .r("RF", "f", "gnd", 100)
      .ccvs("H1", "h", "gnd", "VIN", 200)
      .r("RH", "h", "gnd", 1000)
      .build();
    const op = solved(solveOperatingPoint(c));
    const iin = op.sources.VIN!.current; // delivered out of plus: 0.5 mA
    expect(iin).toBeCloseTo(0.5e-3, 15);
    expect(op.nodes.e).toBeCloseTo(2, 12);
    expect(op.nodes.g).toBeCloseTo(0.5e-3 * 2000, 12); // gain·Vc flows into node g
    // F1 senses RIN: V/R = 0.5 mA from its pin a (in) to pin b (gnd); 3·I flows into node f.
    expect(op.nodes.f).toBeCloseTo(3 * 0.5e-3 * 100, 12);
    // H1 senses VIN: the current through it plus → minus is −0.5 mA (it delivers +0.5 mA out of plus).
    expect(op.nodes.h).toBeCloseTo(200 * -iin, 12);
    expect(kclError(c, op).worst).toBeLessThan(1e-12);
  });

  it("sense: an inductor's branch current, a current source's value, a capacitor's zero at DC (Ohm's law, KCL)", () => {
    const c = circuit()
      .v("V1", "a", "gnd", 2)
      .l("L1", "a", "b", 1e-3, 0)
      .r("R1", "b", "gnd", 400) // 5 mA through L1, a → b
      .i("I1", "gnd", "x", 2e-3) // 2 mA from gnd to x through I1
      .r("RX", "x", "gnd", 1000)
      .c("C1", "a", "gnd", 1e-6)
      .cccs("FL", "fl", "gnd", "L1", 10)
      .r("RFL", "fl", "gnd", 100)
      .ccvs("HI", "hi", "gnd", "I1", 500)
      .r("RHI", "hi", "gnd", 1000)
      .cccs("FC", "fc", "gnd", "C1", 10)
      .r("RFC", "fc", "gnd", 100)
      .build();
    const op = solved(solveOperatingPoint(c));
    expect(op.nodes.fl).toBeCloseTo(10 * 5e-3 * 100, 12);
    expect(op.nodes.hi).toBeCloseTo(500 * 2e-3, 12);
    expect(op.nodes.fc).toBe(0);
    expect((op.devices.FL as { current: number }).current).toBeCloseTo(10 * 5e-3, 15);
    expect(kclError(c, op).worst).toBeLessThan(1e-12);
  });
});
