// A small typed builder for resolved Circuit values, so the small-signal tests do not depend on
// the file loader. Values are SI; tolerances are exact (min = nominal = max).

import type {
  BjtModel,
  Circuit,
  Component,
  GainSpec,
  Model,
  MosfetModel,
  SourcePos,
  Specs,
} from "../../src/circuit/types.js";

const POS: SourcePos = { file: "test.yaml", line: 1, column: 1 };
const exact = (v: number) => ({ nominal: v, min: v, max: v });
const spread = (v: number) => ({ min: v, typ: v, max: v });

export interface BjtParams {
  beta?: number;
  saturationCurrent?: number;
  earlyVoltage?: number;
  reverseBeta?: number;
}

export function bjtModel(id: string, kind: "npn" | "pnp", p: BjtParams = {}): BjtModel {
  return {
    id,
    kind,
    pos: POS,
    beta: spread(p.beta ?? 200),
    reverseBeta: spread(p.reverseBeta ?? 1),
    saturationCurrent: spread(p.saturationCurrent ?? 1e-14),
    earlyVoltage: spread(p.earlyVoltage ?? Infinity),
    saturationEdge: 0.3,
    drift: { voltage: -0.002, current: 1e-3 },
    betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 },
  };
}

export interface MosParams {
  threshold?: number;
  kPrime?: number;
  width?: number;
  length?: number;
  lambda?: number;
  bodyEffect?: number;
  fermiPotential?: number;
}

export function mosModel(id: string, kind: "nmos" | "pmos", p: MosParams = {}): MosfetModel {
  return {
    id,
    kind,
    pos: POS,
    threshold: spread(p.threshold ?? (kind === "nmos" ? 0.7 : -0.7)),
    kPrime: spread(p.kPrime ?? 200e-6),
    width: p.width ?? 10e-6,
    length: p.length ?? 1e-6,
    channelLengthModulation: spread(p.lambda ?? 0),
    bodyEffect: p.bodyEffect ?? 0,
    fermiPotential: p.fermiPotential ?? 0.3,
    thresholdTempco: -2e-3,
    kPrimeExponent: -1.5,
  };
}

export class CircuitBuilder {
  private readonly components: Component[] = [];
  private readonly models = new Map<string, Model>();
  private readonly gains: GainSpec[] = [];
  private bandValue: Specs["band"];

  constructor(
    private readonly name: string,
    private readonly ground = "gnd",
  ) {}

  resistor(id: string, a: string, b: string, ohms: number): this {
    this.components.push({ id, pos: POS, kind: "resistor", pins: { a, b }, value: exact(ohms) });
    return this;
  }
  capacitor(id: string, a: string, b: string, farads: number): this {
    this.components.push({ id, pos: POS, kind: "capacitor", pins: { a, b }, value: exact(farads) });
    return this;
  }
  inductor(id: string, a: string, b: string, henries: number, seriesResistance = 0): this {
    this.components.push({ id, pos: POS, kind: "inductor", pins: { a, b }, value: exact(henries), seriesResistance });
    return this;
  }
  vsource(id: string, plus: string, minus: string, dc: number, signal?: number): this {
    this.components.push({ id, pos: POS, kind: "voltage-source", pins: { plus, minus }, voltage: exact(dc), ...(signal === undefined ? {} : { signal }) });
    return this;
  }
  isource(id: string, from: string, to: string, dc: number, signal?: number): this {
    this.components.push({ id, pos: POS, kind: "current-source", pins: { from, to }, current: exact(dc), ...(signal === undefined ? {} : { signal }) });
    return this;
  }
  vcvs(id: string, plus: string, minus: string, controlPlus: string, controlMinus: string, gain: number): this {
    this.components.push({ id, pos: POS, kind: "vcvs", pins: { plus, minus, controlPlus, controlMinus }, gain });
    return this;
  }
  vccs(id: string, plus: string, minus: string, controlPlus: string, controlMinus: string, gain: number): this {
    this.components.push({ id, pos: POS, kind: "vccs", pins: { plus, minus, controlPlus, controlMinus }, gain });
    return this;
  }
  cccs(id: string, plus: string, minus: string, sense: string, gain: number): this {
    this.components.push({ id, pos: POS, kind: "cccs", pins: { plus, minus }, sense, gain });
    return this;
  }
  ccvs(id: string, plus: string, minus: string, sense: string, gain: number): this {
    this.components.push({ id, pos: POS, kind: "ccvs", pins: { plus, minus }, sense, gain });
    return this;
  }
  diode(id: string, anode: string, cathode: string, model: string): this {
    this.components.push({ id, pos: POS, kind: "diode", pins: { anode, cathode }, model });
    return this;
  }
  bjt(id: string, model: Model & { kind: "npn" | "pnp" }, collector: string, base: string, emitter: string): this {
    this.models.set(model.id, model);
    this.components.push({ id, pos: POS, kind: model.kind, pins: { collector, base, emitter }, model: model.id });
    return this;
  }
  mos(id: string, model: MosfetModel, drain: string, gate: string, source: string, body = source): this {
    this.models.set(model.id, model);
    this.components.push({ id, pos: POS, kind: model.kind, pins: { drain, gate, source, body }, model: model.id });
    return this;
  }
  gain(name: string, input: string, plus: string, minus = this.ground, frequency?: number): this {
    this.gains.push({
      name,
      input,
      output: { plus, minus },
      target: 1,
      window: { min: -Infinity, max: Infinity },
      ...(frequency === undefined ? {} : { frequency }),
      pos: POS,
    });
    return this;
  }
  band(low: number, high: number): this {
    this.bandValue = { low, high, pos: POS };
    return this;
  }

  build(): Circuit {
    const nodes = new Set<string>();
    for (const c of this.components) {
      for (const n of Object.values(c.pins) as string[]) if (n !== this.ground) nodes.add(n);
    }
    return {
      file: "test.yaml",
      name: this.name,
      temperature: 298.15,
      ground: this.ground,
      parameters: new Map(),
      models: new Map(this.models),
      components: [...this.components],
      nodes: [...nodes].sort(),
      specs: {
        gains: [...this.gains],
        ...(this.bandValue ? { band: this.bandValue } : {}),
        supplies: [],
        devices: [],
      },
      overrides: [],
      warnings: [],
      pos: POS,
    };
  }
}

export const circuit = (name: string, ground?: string) => new CircuitBuilder(name, ground);

/** An operating point for a circuit with no nonlinear devices: the small-signal stage reads only `devices[…].linear`. */
export const linearOp = () =>
  ({ ok: true, nodes: {}, sources: {}, devices: {}, stats: { iterations: 0, residual: 0, aid: "none" } }) as const;

export const relErr = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), Number.MIN_VALUE);
