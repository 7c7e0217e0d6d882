// The seed fact of the trade (common practice): a PNP stage and its NPN mirror image (every
// source negated, every NPN replaced by a PNP with the same parameters) have identical
// small-signal gain; the same holds for PMOS and NMOS. Property test over generated stages,
// seeded so a failure is reproducible.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { Circuit } from "../../src/circuit/types.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import { analyseSmallSignal } from "../../src/smallsignal/index.js";
import type { SmallSignalResult } from "../../src/smallsignal/types.js";
import { bjtModel, circuit, mosModel } from "./build.js";

/**
 * Mirror images must agree to this relative difference: the device code is one model with a
 * polarity sign, so the only difference is the Newton solver's convergence tolerance.
 */
const MIRROR_AGREEMENT = 1e-8;

const close = (a: number, b: number) =>
  a === b || Math.abs(a - b) <= MIRROR_AGREEMENT * Math.max(Math.abs(a), Math.abs(b)) + 1e-15;

function compareResults(n: SmallSignalResult, p: SmallSignalResult): void {
  expect(p.errors).toEqual(n.errors);
  expect(p.gains.length).toBe(n.gains.length);
  n.gains.forEach((gn, i) => {
    const gp = p.gains[i]!;
    const pairs: [string, number, number][] = [
      ["midband", gn.midband, gp.midband],
      ["inputImpedance", gn.inputImpedance, gp.inputImpedance],
      ["outputImpedance", gn.outputImpedance, gp.outputImpedance],
      ...gn.points.flatMap((pt, k): [string, number, number][] => [
        [`re@${pt.frequency}`, pt.re, gp.points[k]!.re],
        [`im@${pt.frequency}`, pt.im, gp.points[k]!.im],
      ]),
    ];
    for (const [what, a, b] of pairs) {
      if (!close(a, b)) expect.fail(`${gn.name} ${what}: NPN/NMOS ${a} vs mirror ${b}`);
    }
  });
}

function analyse(c: Circuit): SmallSignalResult | undefined {
  const op = solveOperatingPoint(c);
  return op.ok ? analyseSmallSignal(c, op) : undefined;
}

const bjtStage = fc.record({
  vcc: fc.double({ min: 5, max: 15, noNaN: true }),
  r1: fc.double({ min: 10e3, max: 200e3, noNaN: true }),
  r2: fc.double({ min: 5e3, max: 100e3, noNaN: true }),
  rc: fc.double({ min: 1e3, max: 20e3, noNaN: true }),
  re1: fc.double({ min: 0, max: 500, noNaN: true }),
  re2: fc.double({ min: 200, max: 5e3, noNaN: true }),
  rsig: fc.double({ min: 50, max: 10e3, noNaN: true }),
  rl: fc.double({ min: 1e3, max: 100e3, noNaN: true }),
  beta: fc.double({ min: 50, max: 400, noNaN: true }),
  early: fc.oneof(fc.constant(Infinity), fc.double({ min: 20, max: 200, noNaN: true })),
  follower: fc.boolean(),
});

function bjtCircuit(kind: "npn" | "pnp", s: typeof bjtStage extends fc.Arbitrary<infer T> ? T : never): Circuit {
  const sign = kind === "npn" ? 1 : -1;
  const b = circuit(`mirror-${kind}`)
    .vsource("VCC", "vcc", "gnd", sign * s.vcc)
    .vsource("VIN", "sig", "gnd", 0, 1)
    .resistor("RSIG", "sig", "in", s.rsig)
    .capacitor("CIN", "in", "b", 10e-6)
    .resistor("R1", "vcc", "b", s.r1)
    .resistor("R2", "b", "gnd", s.r2)
    .bjt("Q1", bjtModel(`m-${kind}`, kind, { beta: s.beta, earlyVoltage: s.early }), s.follower ? "vcc" : "c", "b", "e")
    .resistor("RE2", "e2", "gnd", s.re2)
    .band(20, 20e3);
  if (s.follower) {
    b.resistor("RE1", "e", "e2", s.re1 + 1).capacitor("COUT", "e", "out", 10e-6);
  } else {
    b.resistor("RC", "vcc", "c", s.rc).resistor("RE1", "e", "e2", s.re1 + 1).capacitor("CE", "e2", "gnd", 100e-6).capacitor("COUT", "c", "out", 10e-6);
  }
  return b.resistor("RL", "out", "gnd", s.rl).gain("stage", "VIN", "out", "gnd", 1e3).build();
}

const mosStage = fc.record({
  vdd: fc.double({ min: 5, max: 15, noNaN: true }),
  r1: fc.double({ min: 100e3, max: 2e6, noNaN: true }),
  r2: fc.double({ min: 100e3, max: 2e6, noNaN: true }),
  rd: fc.double({ min: 1e3, max: 50e3, noNaN: true }),
  rs: fc.double({ min: 100, max: 5e3, noNaN: true }),
  rl: fc.double({ min: 1e3, max: 100e3, noNaN: true }),
  vt: fc.double({ min: 0.4, max: 1.2, noNaN: true }),
  lambda: fc.double({ min: 0, max: 0.05, noNaN: true }),
  gamma: fc.double({ min: 0, max: 0.8, noNaN: true }),
  bodyToRail: fc.boolean(),
  follower: fc.boolean(),
  bypass: fc.boolean(),
});

function mosCircuit(kind: "nmos" | "pmos", s: typeof mosStage extends fc.Arbitrary<infer T> ? T : never): Circuit {
  const sign = kind === "nmos" ? 1 : -1;
  const model = mosModel(`m-${kind}`, kind, { threshold: sign * s.vt, lambda: s.lambda, bodyEffect: s.gamma });
  const b = circuit(`mirror-${kind}`)
    .vsource("VDD", "vdd", "gnd", sign * s.vdd)
    .vsource("VIN", "in", "gnd", 0, 1)
    .capacitor("CIN", "in", "g", 1e-6)
    .resistor("R1", "vdd", "g", s.r1)
    .resistor("R2", "g", "gnd", s.r2)
    .resistor("RS", "s", "gnd", s.rs)
    .mos("M1", model, s.follower ? "vdd" : "d", "g", "s", s.bodyToRail ? "gnd" : "s")
    .band(20, 20e3);
  if (s.follower) b.capacitor("COUT", "s", "out", 10e-6);
  else {
    b.resistor("RD", "vdd", "d", s.rd).capacitor("COUT", "d", "out", 10e-6);
    if (s.bypass) b.capacitor("CS", "s", "gnd", 100e-6);
  }
  return b.resistor("RL", "out", "gnd", s.rl).gain("stage", "VIN", "out", "gnd", 1e3).build();
}

describe("mirror images have identical small-signal gain (common practice)", () => {
  it("PNP stage and its NPN mirror image", () => {
    let compared = 0;
    fc.assert(
      fc.property(bjtStage, (s) => {
        const n = analyse(bjtCircuit("npn", s));
        const p = analyse(bjtCircuit("pnp", s));
        expect(p === undefined).toBe(n === undefined);
        if (!n || !p) return;
        compared++;
        compareResults(n, p);
      }),
      { seed: 4101, numRuns: 80 },
    );
    expect(compared).toBeGreaterThan(60);
  });

  it("PMOS stage and its NMOS mirror image", () => {
    let compared = 0;
    fc.assert(
      fc.property(mosStage, (s) => {
        const n = analyse(mosCircuit("nmos", s));
        const p = analyse(mosCircuit("pmos", s));
        expect(p === undefined).toBe(n === undefined);
        if (!n || !p) return;
        compared++;
        compareResults(n, p);
      }),
      { seed: 4102, numRuns: 80 },
    );
    expect(compared).toBeGreaterThan(60);
  });

  it("the check can fail: a mirror with a different beta does not match", () => {
    const s = { vcc: 12, r1: 47e3, r2: 10e3, rc: 4.7e3, re1: 100, re2: 1e3, rsig: 600, rl: 10e3, beta: 150, early: 80, follower: false };
    const n = analyse(bjtCircuit("npn", s))!;
    const p = analyse(bjtCircuit("pnp", { ...s, beta: 151 }))!;
    expect(close(n.gains[0]!.midband, p.gains[0]!.midband)).toBe(false);
  });
});
