// The `linear` matrix of every nonlinear device is the exact Jacobian of its terminal currents:
// each pin is driven by its own voltage source, the source currents are the pin currents, and
// central differences of a re-solve give ∂I(pin i)/∂V(pin j) to compare with y[i·k + j].
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { Linearised, OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit, type CircuitBuilder } from "./build.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

/** Builds the device with every pin on node `p<i>` driven by source `V<i>` at volts[i]. */
type Rig = (b: CircuitBuilder, pins: string[]) => CircuitBuilder;

function finiteDifferenceJacobian(rig: Rig, volts: number[]): { fd: number[]; lin: Linearised } {
  const k = volts.length;
  const pins = volts.map((_, i) => `p${i}`);
  const solveAt = (vs: number[]): OperatingPoint => {
    let b = circuit();
    vs.forEach((v, i) => (b = b.v(`V${i}`, pins[i]!, "gnd", v)));
    return solved(solveOperatingPoint(rig(b, pins).build()));
  };
  const base = solveAt(volts);
  const lin = (Object.values(base.devices)[0] as { linear: Linearised }).linear;
  const fd = new Array<number>(k * k).fill(0);
  const h = 1e-6;
  for (let j = 0; j < k; j++) {
    const up = volts.slice();
    const dn = volts.slice();
    up[j]! += h;
    dn[j]! -= h;
    const a = solveAt(up);
    const b = solveAt(dn);
    for (let i = 0; i < k; i++) {
      // Delivered out of the source's plus pin = current into the device pin.
      fd[i * k + j] = (a.sources[`V${i}`]!.current - b.sources[`V${i}`]!.current) / (2 * h);
    }
  }
  return { fd, lin };
}

function expectJacobian(rig: Rig, volts: number[]): void {
  const { fd, lin } = finiteDifferenceJacobian(rig, volts);
  const scale = Math.max(...fd.map(Math.abs));
  lin.y.forEach((y, i) => expect(Math.abs(y - fd[i]!)).toBeLessThan(1e-5 * scale + 1e-12));
  const k = lin.pins.length;
  for (let i = 0; i < k; i++) {
    let row = 0;
    let col = 0;
    for (let j = 0; j < k; j++) {
      row += lin.y[i * k + j]!;
      col += lin.y[j * k + i]!;
    }
    expect(Math.abs(row)).toBeLessThan(1e-9 * scale);
    expect(Math.abs(col)).toBeLessThan(1e-9 * scale);
  }
}

const npn: Rig = (b, p) => b.bjtModel("m", "npn", { beta: 90, reverseBeta: 3, earlyVoltage: 40 }).q("Q", "npn", p[0]!, p[1]!, p[2]!, "m");
const pnp: Rig = (b, p) => b.bjtModel("m", "pnp", { beta: 90, reverseBeta: 3, earlyVoltage: 40 }).q("Q", "pnp", p[0]!, p[1]!, p[2]!, "m");
const nmos: Rig = (b, p) =>
  b.mosModel("m", "nmos", { threshold: 0.7, kPrime: 150e-6, width: 5e-6, lambda: 0.04, bodyEffect: 0.4 }).m("M", "nmos", p[0]!, p[1]!, p[2]!, "m", p[3]!);
const pmos: Rig = (b, p) =>
  b.mosModel("m", "pmos", { threshold: -0.7, kPrime: 60e-6, width: 5e-6, lambda: 0.04, bodyEffect: 0.4 }).m("M", "pmos", p[0]!, p[1]!, p[2]!, "m", p[3]!);
const diode: Rig = (b, p) => b.diodeModel("m", { saturationCurrent: 1e-13, ideality: 1.5, seriesResistance: 4 }).d("D", p[0]!, p[1]!, "m");

describe("linearised devices are exact Jacobians (central differences)", () => {
  it("NPN active", () => expectJacobian(npn, [5, 0.65, 0]));
  it("NPN saturated", () => expectJacobian(npn, [0.1, 0.68, 0]));
  it("NPN reverse", () => expectJacobian(npn, [0, 0.62, 3]));
  it("PNP active", () => expectJacobian(pnp, [-5, -0.65, 0]));
  it("NMOS saturation with body effect", () => expectJacobian(nmos, [3, 2, 0.3, 0]));
  it("NMOS triode", () => expectJacobian(nmos, [0.4, 3, 0, 0]));
  it("NMOS with drain below source (swapped roles)", () => expectJacobian(nmos, [0, 2.5, 0.5, -0.2]));
  it("PMOS saturation", () => expectJacobian(pmos, [-3, -2, -0.3, 0]));
  it("diode with series resistance (internal node folded in)", () => expectJacobian(diode, [0.75, 0]));
});
