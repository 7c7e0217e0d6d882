// A small typed builder of resolved Circuit values for the solver tests, so they do not depend
// on the file loader. Values are SI; model spreads get typ = min = max.
import type {
  BjtModel,
  Circuit,
  Component,
  DiodeModel,
  Model,
  MosfetModel,
  SourcePos,
  Spread,
  Toleranced,
} from "../../src/circuit/types.js";

const pos: SourcePos = { file: "test.yaml", line: 1, column: 1 };
const tol = (v: number): Toleranced => ({ nominal: v, min: v, max: v });
const spread = (v: number): Spread => ({ min: v, typ: v, max: v });

export interface BjtParams {
  beta?: number;
  reverseBeta?: number;
  saturationCurrent?: number;
  earlyVoltage?: number;
  saturationEdge?: number;
  drift?: { voltage: number; current: number };
  betaDrift?: number;
  betaAt?: { collectorEmitterVoltage: number; collectorCurrent: number };
}
export interface MosParams {
  threshold: number;
  kPrime: number;
  width?: number;
  length?: number;
  lambda?: number;
  bodyEffect?: number;
  fermiPotential?: number;
}
export interface DiodeParams {
  saturationCurrent?: number;
  ideality?: number;
  seriesResistance?: number;
  drift?: { voltage: number; current: number };
}

export class CircuitBuilder {
  private readonly components: Component[] = [];
  private readonly models = new Map<string, Model>();
  temperature = 298.15;
  constructor(
    readonly ground = "gnd",
    readonly name = "test",
  ) {}

  at(kelvin: number): this {
    this.temperature = kelvin;
    return this;
  }
  r(id: string, a: string, b: string, ohms: number): this {
    this.components.push({ id, kind: "resistor", pos, pins: { a, b }, value: tol(ohms) });
    return this;
  }
  c(id: string, a: string, b: string, farads: number): this {
    this.components.push({ id, kind: "capacitor", pos, pins: { a, b }, value: tol(farads) });
    return this;
  }
  l(id: string, a: string, b: string, henries: number, seriesResistance = 0): this {
    this.components.push({ id, kind: "inductor", pos, pins: { a, b }, value: tol(henries), seriesResistance });
    return this;
  }
  v(id: string, plus: string, minus: string, volts: number): this {
    this.components.push({ id, kind: "voltage-source", pos, pins: { plus, minus }, voltage: tol(volts) });
    return this;
  }
  i(id: string, from: string, to: string, amps: number): this {
    this.components.push({ id, kind: "current-source", pos, pins: { from, to }, current: tol(amps) });
    return this;
  }
  vcvs(id: string, plus: string, minus: string, cp: string, cm: string, gain: number): this {
    this.components.push({ id, kind: "vcvs", pos, pins: { plus, minus, controlPlus: cp, controlMinus: cm }, gain });
    return this;
  }
  vccs(id: string, plus: string, minus: string, cp: string, cm: string, gain: number): this {
    this.components.push({ id, kind: "vccs", pos, pins: { plus, minus, controlPlus: cp, controlMinus: cm }, gain });
    return this;
  }
  cccs(id: string, plus: string, minus: string, sense: string, gain: number): this {
    this.components.push({ id, kind: "cccs", pos, pins: { plus, minus }, sense, gain });
    return this;
  }
  ccvs(id: string, plus: string, minus: string, sense: string, gain: number): this {
    this.components.push({ id, kind: "ccvs", pos, pins: { plus, minus }, sense, gain });
    return this;
  }
  diodeModel(id: string, p: DiodeParams = {}): this {
    const m: DiodeModel = {
      id,
      kind: "diode",
      pos,
      saturationCurrent: spread(p.saturationCurrent ?? 1e-14),
      ideality: spread(p.ideality ?? 1),
      seriesResistance: p.seriesResistance ?? 0,
      drift: p.drift ?? { voltage: -0.002, current: 1e-3 },
    };
    this.models.set(id, m);
    return this;
  }
  bjtModel(id: string, kind: "npn" | "pnp", p: BjtParams = {}): this {
    const m: BjtModel = {
      id,
      kind,
      pos,
      beta: spread(p.beta ?? 100),
      reverseBeta: spread(p.reverseBeta ?? 1),
      saturationCurrent: spread(p.saturationCurrent ?? 1e-14),
      earlyVoltage: spread(p.earlyVoltage ?? Infinity),
      saturationEdge: p.saturationEdge ?? 0.3,
      drift: p.drift ?? { voltage: -0.002, current: 1e-3 },
      betaDrift: p.betaDrift ?? 0.005,
      betaAt: p.betaAt ?? { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 },
    };
    this.models.set(id, m);
    return this;
  }
  mosModel(id: string, kind: "nmos" | "pmos", p: MosParams): this {
    const m: MosfetModel = {
      id,
      kind,
      pos,
      threshold: spread(p.threshold),
      kPrime: spread(p.kPrime),
      width: p.width ?? 1e-6,
      length: p.length ?? 1e-6,
      channelLengthModulation: spread(p.lambda ?? 0),
      bodyEffect: p.bodyEffect ?? 0,
      fermiPotential: p.fermiPotential ?? 0.3,
      thresholdTempco: -2e-3,
      kPrimeExponent: -1.5,
    };
    this.models.set(id, m);
    return this;
  }
  d(id: string, anode: string, cathode: string, model: string): this {
    this.components.push({ id, kind: "diode", pos, pins: { anode, cathode }, model });
    return this;
  }
  q(id: string, kind: "npn" | "pnp", collector: string, base: string, emitter: string, model: string): this {
    this.components.push({ id, kind, pos, pins: { collector, base, emitter }, model });
    return this;
  }
  m(id: string, kind: "nmos" | "pmos", drain: string, gate: string, source: string, model: string, body?: string): this {
    this.components.push({ id, kind, pos, pins: { drain, gate, source, body: body ?? source }, model });
    return this;
  }
  build(): Circuit {
    const nodes = new Set<string>();
    for (const c of this.components) {
      const pins = c.pins as Record<string, string>;
      for (const n of Object.values(pins)) if (n !== this.ground) nodes.add(n);
    }
    return {
      file: "test.yaml",
      name: this.name,
      temperature: this.temperature,
      ground: this.ground,
      parameters: new Map(),
      models: new Map(this.models),
      components: [...this.components],
      nodes: [...nodes].sort(),
      specs: { gains: [], supplies: [], devices: [] },
      overrides: [],
      warnings: [],
      pos,
    };
  }
}

export const circuit = (ground = "gnd"): CircuitBuilder => new CircuitBuilder(ground);
