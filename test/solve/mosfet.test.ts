// MOSFET circuits against the square law solved by hand, regions, body effect and temperature.
import { describe, expect, it } from "vitest";
import { MOS_LEAK_CONDUCTANCE as GL } from "../../src/devices/mosfet.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { MosPoint, OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}
const m = (op: OperatingPoint, id: string): MosPoint => op.devices[id] as MosPoint;
/** 1e-12 S drain–source leakage (MOS_LEAK_CONDUCTANCE) moves mA currents by ~1e-9; 1e-7 relative covers it. */
const REL = 1e-7;

describe("NMOS", () => {
  it("saturation with source degeneration: ID from the square-law quadratic ½βRS²·ID² − (βRS·u + 1)·ID + ½βu² = 0 (solved by hand)", () => {
    const [vt, kp, w, l, vg, rs] = [0.8, 120e-6, 20e-6, 2e-6, 3, 1.5e3];
    const beta = (kp * w) / l;
    const c = circuit()
      .mosModel("n", "nmos", { threshold: vt, kPrime: kp, width: w, length: l })
      .v("VDD", "vdd", "gnd", 9)
      .v("VG", "g", "gnd", vg)
      .r("RD", "vdd", "d", 3.3e3)
      .r("RS", "s", "gnd", rs)
      .m("M1", "nmos", "d", "g", "s", "n")
      .build();
    const op = solved(solveOperatingPoint(c));
    const u = vg - vt;
    const [A, B, C] = [0.5 * beta * rs * rs, beta * rs * u + 1, 0.5 * beta * u * u];
    const id = (B - Math.sqrt(B * B - 4 * A * C)) / (2 * A); // the root with Vov > 0
    const t = m(op, "M1");
    expect(Math.abs(t.drainCurrent / id - 1)).toBeLessThan(REL);
    expect(t.region).toBe("saturation");
    expect(t.overdrive).toBeCloseTo(u - id * rs, 6);
    expect(t.transconductance).toBeCloseTo(beta * t.overdrive, 9); // gm = β·Vov (square law)
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
  });

  it("triode: ID = β(Vov·VDS − VDS²/2) with VDS = VDD − ID·RD, the smaller root (solved by hand)", () => {
    const [vt, kp, vdd, rd] = [0.7, 200e-6, 5, 10e3];
    const beta = (kp * 10e-6) / 1e-6;
    const c = circuit()
      .mosModel("n", "nmos", { threshold: vt, kPrime: kp, width: 10e-6, length: 1e-6 })
      .v("VDD", "vdd", "gnd", vdd)
      .r("RD", "vdd", "d", rd)
      .m("M1", "nmos", "d", "vdd", "gnd", "n")
      .build();
    const op = solved(solveOperatingPoint(c));
    const vov = vdd - vt;
    const [A, B, C] = [beta / 2, beta * vov + 1 / rd, vdd / rd];
    const vds = (B - Math.sqrt(B * B - 4 * A * C)) / (2 * A);
    const t = m(op, "M1");
    expect(t.region).toBe("triode");
    expect(t.drainSourceVoltage).toBeCloseTo(vds, 8);
    expect(t.headroom).toBeLessThan(0);
  });

  it("channel-length modulation: ID ∝ (1 + λ·VDS) in saturation (square law with λ)", () => {
    const idAt = (vd: number): number => {
      const c = circuit().mosModel("n", "nmos", { threshold: 1, kPrime: 100e-6, lambda: 0.05 }).v("VG", "g", "gnd", 2).v("VD", "d", "gnd", vd).m("M1", "nmos", "d", "g", "gnd", "n").build();
      return m(solved(solveOperatingPoint(c)), "M1").drainCurrent;
    };
    expect(idAt(2)).toBeCloseTo(0.5 * 100e-6 * 1 * 1.1 + GL * 2, 15);
    expect(idAt(6) / idAt(2)).toBeCloseTo(1.3 / 1.1, 6);
  });

  it("body effect: Vt = Vt0 + γ(√(2φF + VSB) − √(2φF)) at the solved VSB (DESIGN.md §3)", () => {
    const [vt0, gamma, phi2] = [0.6, 0.45, 0.7];
    const c = circuit()
      .mosModel("n", "nmos", { threshold: vt0, kPrime: 100e-6, width: 10e-6, bodyEffect: gamma, fermiPotential: phi2 / 2 })
      .v("VDD", "vdd", "gnd", 5)
      .v("VG", "g", "gnd", 3)
      .r("RS", "s", "gnd", 2e3)
      .m("M1", "nmos", "vdd", "g", "s", "n", "gnd")
      .build();
    const op = solved(solveOperatingPoint(c));
    const t = m(op, "M1");
    const vsb = op.nodes.s!;
    expect(t.threshold).toBeCloseTo(vt0 + gamma * (Math.sqrt(phi2 + vsb) - Math.sqrt(phi2)), 12);
    expect(t.bodyTransconductance).toBeCloseTo((t.transconductance * gamma) / (2 * Math.sqrt(phi2 + vsb)), 12);
    expect(t.drainCurrent).toBeCloseTo(0.5 * 1e-3 * (t.gateSourceVoltage - t.threshold) ** 2 + GL * t.drainSourceVoltage, 15);
  });

  it("cutoff: only the drain–source leakage flows", () => {
    const c = circuit().mosModel("n", "nmos", { threshold: 1, kPrime: 100e-6 }).v("VDD", "vdd", "gnd", 5).r("RD", "vdd", "d", 10e3).m("M1", "nmos", "d", "gnd", "gnd", "n").build();
    const t = m(solved(solveOperatingPoint(c)), "M1");
    expect(t.region).toBe("cutoff");
    expect(t.drainCurrent).toBeLessThan(1e-11);
    expect(t.overdrive).toBeLessThan(0);
  });

  it("symmetric device: wired with drain and source swapped, the current reverses", () => {
    const mk = (swap: boolean) =>
      circuit()
        .mosModel("n", "nmos", { threshold: 0.7, kPrime: 100e-6 })
        .v("VG", "g", "gnd", 3)
        .v("VD", "d", "gnd", 1)
        .m("M1", "nmos", swap ? "gnd" : "d", "g", swap ? "d" : "gnd", "n", "gnd")
        .build();
    const a = m(solved(solveOperatingPoint(mk(false))), "M1");
    const b = m(solved(solveOperatingPoint(mk(true))), "M1");
    expect(b.drainCurrent).toBeCloseTo(-a.drainCurrent, 15);
    expect(b.region).toBe(a.region);
  });

  it("temperature: |Vt| moves by thresholdTempco·ΔT and k' by (T/T0)^kPrimeExponent (DESIGN.md §3)", () => {
    const at = (kelvin: number) => {
      const c = circuit().at(kelvin).mosModel("n", "nmos", { threshold: 1, kPrime: 100e-6 }).v("VG", "g", "gnd", 2).v("VD", "d", "gnd", 3).m("M1", "nmos", "d", "g", "gnd", "n").build();
      return m(solved(solveOperatingPoint(c)), "M1");
    };
    const hot = at(348.15);
    expect(hot.threshold).toBeCloseTo(1 - 2e-3 * 50, 12);
    expect(hot.drainCurrent).toBeCloseTo(0.5 * 100e-6 * (348.15 / 298.15) ** -1.5 * (2 - 0.9) ** 2 + GL * 3, 15);
  });
});
