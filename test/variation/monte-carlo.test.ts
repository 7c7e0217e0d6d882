// Monte Carlo of a divider against its analytic distribution and yield.
import { describe, expect, it } from "vitest";
import { defineRule } from "../../src/review/rule.js";
import { wilsonInterval } from "../../src/variation/monte-carlo.js";
import { builtin, load, run } from "./helpers.js";

// Two equal resistors, ±3 % read as ±3σ (σ = 1 %, common practice), clipped at the band ends.
const divider = `components:
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 10 V }
  - { id: R1, kind: resistor, pins: [in, out], value: 10k, tolerance: 3% }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 10k, tolerance: 3% }
`;

// A window spec on the output: 5 V ± 50 mV.
const window = defineRule({
  id: "window",
  description: "Checks the output against 5 V ± 50 mV",
  severity: "error",
  docs: "test rule",
  check({ op }, report) {
    const v = op.nodes.out!;
    if (v < 4.95) report.fail({ subject: "out", message: "low", measured: v, limit: 4.95, unit: "V", bound: "min" });
    else if (v > 5.05) report.fail({ subject: "out", message: "high", measured: v, limit: 5.05, unit: "V", bound: "max" });
    else report.pass("out", { measured: v, limit: 4.95, unit: "V", bound: "min" });
  },
});

/** Standard normal CDF (Abramowitz & Stegun 7.1.26 erf, |error| < 1.5e-7). */
function phi(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const erf = 1 - t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429)))) * Math.exp(-x * x);
  return z >= 0 ? (1 + erf) / 2 : (1 - erf) / 2;
}

const N = 4000;
const settings = { mode: "monte-carlo" as const, samples: N, seed: 2026 };

describe("Monte Carlo of a divider", () => {
  it("mean and σ of the output within the statistical error of N samples; yield within its Wilson interval of the analytic yield", async () => {
    const r = await run(load(divider), [builtin(window)], settings);
    const mc = r.v.monteCarlo!;
    expect(mc.samples).toBe(N);
    expect(mc.nonConverged).toBe(0);
    const d = mc.quantities.find((q) => q.subject === "out")!;
    // First order: Vout = Vin·R2/(R1+R2) → σ(Vout) = Vin/4·√(σ1² + σ2²) = 2.5 V·√2·1 % = 35.36 mV;
    // the second-order bias of the mean is ~Vin/4·σ² ≈ 0.25 mV, below the bound used here.
    // Clipping each resistor at ±3σ removes 0.27 % of its mass and ~1.3 % of its variance.
    const sigma = 2.5 * Math.SQRT2 * 0.01;
    // Statistical bounds for N samples (4 standard errors, i.e. a 6e-5 chance of a false alarm for a
    // fresh seed): mean ± 4σ/√N; sample σ ± 4σ/√(2N) plus the 1.3 % from clipping.
    expect(Math.abs(d.mean - 5)).toBeLessThan((4 * sigma) / Math.sqrt(N));
    expect(Math.abs(d.sigma - sigma)).toBeLessThan((4 * sigma) / Math.sqrt(2 * N) + 0.013 * sigma);
    expect(d.min).toBeLessThanOrEqual(d.p1);
    expect(d.p1).toBeLessThanOrEqual(d.median);
    expect(d.median).toBeLessThanOrEqual(d.p99);
    expect(d.p99).toBeLessThanOrEqual(d.max);
    // Analytic yield: P(|ΔV| ≤ 50 mV) with ΔV normal, σ = 35.36 mV → 2Φ(1.414) − 1 = 0.8427.
    const analytic = 2 * phi(0.05 / sigma) - 1;
    expect(mc.interval.method).toBe("Wilson score");
    expect(mc.interval.low).toBeLessThanOrEqual(analytic);
    expect(mc.interval.high).toBeGreaterThanOrEqual(analytic);
    expect(mc.yield).toBeCloseTo(1 - mc.failed / N, 12);
    // The worst sample is the one furthest outside the window, with its parameter values.
    expect(mc.worstSample!.parameters.map((p) => p.parameter).sort()).toEqual(["R1.value", "R2.value"]);
  });

  it("seeded runs are bit-identical, another seed differs", async () => {
    const a = await run(load(divider), [builtin(window)], { ...settings, samples: 300 });
    const b = await run(load(divider), [builtin(window)], { ...settings, samples: 300 });
    const c = await run(load(divider), [builtin(window)], { ...settings, samples: 300, seed: 7 });
    expect(JSON.stringify(a.v.monteCarlo)).toBe(JSON.stringify(b.v.monteCarlo));
    expect(JSON.stringify(a.findings)).toBe(JSON.stringify(b.findings));
    expect(JSON.stringify(a.v.monteCarlo)).not.toBe(JSON.stringify(c.v.monteCarlo));
  });

  it("Wilson score interval: published values (Newcombe 1998, table I: 81/263 → 0.2553–0.3662)", () => {
    const w = wilsonInterval(81, 263);
    expect(w.low).toBeCloseTo(0.2553, 4);
    expect(w.high).toBeCloseTo(0.3662, 4);
    // Sound at 100 %: 0/n failures still gives a lower bound below 1.
    expect(wilsonInterval(50, 50).low).toBeLessThan(1);
  });
});
