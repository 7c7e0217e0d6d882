// A converged point that only the models' 1e-12 S leakage holds up is no answer: a current
// source forced into a reverse-biased junction must be reported, not shown at a gigavolt.
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import { circuit } from "./build.js";

describe("implausible operating points", () => {
  it("reports a current source driven into a reverse-biased diode, naming the source and node", () => {
    const c = circuit().diodeModel("d", { saturationCurrent: 1e-14 }).i("I1", "gnd", "k", 1e-3).d("D1", "gnd", "k", "d").build();
    const r = solveOperatingPoint(c);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.reason).toMatch(/no physical operating point: node `k`/);
    expect(r.parts).toEqual(["I1"]);
    expect(r.nodes).toEqual(["k"]);
  });

  it("accepts the same source when the diode is forward-biased (about 0.7 V, common practice)", () => {
    const c = circuit().diodeModel("d", { saturationCurrent: 1e-14 }).i("I1", "gnd", "k", 1e-3).d("D1", "k", "gnd", "d").build();
    const r = solveOperatingPoint(c);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.nodes.k).toBeGreaterThan(0.6);
  });

  it("accepts a high-voltage divider set by its own source (large, but bounded by the source)", () => {
    const c = circuit().v("V1", "hv", "gnd", 400e3).r("R1", "hv", "m", 1e6).r("R2", "m", "gnd", 1e6).build();
    const r = solveOperatingPoint(c);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.nodes.m).toBeCloseTo(200e3, 3);
  });
});
