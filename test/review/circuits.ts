// Circuit snippets for rule tests through the real loader and solver: one common-emitter /
// common-source stage per polarity, with the parts a test varies as arguments. Tidewater
// Instruments front-end stages; hand estimates beside each (VBE ≈ 0.66 V, square law).

export interface BjtStage {
  readonly rc?: string;
  readonly re?: string;
  readonly r1?: string;
  readonly r2?: string;
  readonly vcc?: string;
  /** Extra lines under `specs:` (indented two spaces). */
  readonly specs?: string;
  /** Extra component lines. */
  readonly parts?: string;
  readonly model?: string;
  readonly review?: string;
  /** Output coupling capacitor. */
  readonly c2?: string;
  /** Lines before `models:` (temperature, parameters). */
  readonly head?: string;
}

const MODEL_NPN = `  tw-npn: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V, powerRating: 0.25 W }`;
const MODEL_PNP = `  tw-pnp: { kind: pnp, beta: { min: 100, typ: 200, max: 300 }, saturationCurrent: 1e-14 A, earlyVoltage: 80 V, powerRating: 0.25 W }`;

/**
 * NPN common emitter, divider bias. Defaults: VB = 12·12k/68k = 2.12 V, VE ≈ 1.45 V,
 * IC ≈ 1.2 mA, VC ≈ 12 − 1.2 mA·4k7 ≈ 6.4 V, VCE ≈ 5 V.
 */
export function npnStage(o: BjtStage = {}): string {
  return `${o.head ?? ""}
models:
${o.model ?? MODEL_NPN}
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${o.vcc ?? "12 V"}, tolerance: 5% }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V, signal: 1 mV }
  - { id: C1, kind: capacitor, pins: [in, base], value: 22u, voltageRating: 16 V }
  - { id: R1, kind: resistor, pins: [vcc, base], value: ${o.r1 ?? "56k"}, tolerance: 1%, package: "0603" }
  - { id: R2, kind: resistor, pins: [base, gnd], value: ${o.r2 ?? "12k"}, tolerance: 1%, package: "0603" }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: col, base: base, emitter: emit } }
  - { id: RC, kind: resistor, pins: [vcc, col], value: ${o.rc ?? "4k7"}, tolerance: 1%, package: "0603" }
  - { id: RE, kind: resistor, pins: [emit, gnd], value: ${o.re ?? "1k2"}, tolerance: 1%, package: "0603" }
  - { id: C2, kind: capacitor, pins: [col, out], value: ${o.c2 ?? "10u"}, voltageRating: 25 V }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 10k, package: "0603" }
${o.parts ?? ""}
specs:
${o.specs ?? "  supplies: []"}
${o.review ?? ""}`;
}

/**
 * PNP common emitter, the mirror image of npnStage: emitter resistor to the positive rail,
 * collector load to ground. Defaults: VB = 12·56k/68k = 9.88 V, VE ≈ 10.55 V, IE ≈ 1.2 mA,
 * VC ≈ 1.2 mA·4k7 ≈ 5.7 V, |VCE| ≈ 4.9 V.
 */
export function pnpStage(o: BjtStage = {}): string {
  return `${o.head ?? ""}
models:
${o.model ?? MODEL_PNP}
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${o.vcc ?? "12 V"}, tolerance: 5% }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V, signal: 1 mV }
  - { id: C1, kind: capacitor, pins: [in, base], value: 22u, voltageRating: 16 V }
  - { id: R1, kind: resistor, pins: [vcc, base], value: ${o.r1 ?? "12k"}, tolerance: 1%, package: "0603" }
  - { id: R2, kind: resistor, pins: [base, gnd], value: ${o.r2 ?? "56k"}, tolerance: 1%, package: "0603" }
  - { id: Q1, kind: pnp, model: tw-pnp, pins: { collector: col, base: base, emitter: emit } }
  - { id: RE, kind: resistor, pins: [vcc, emit], value: ${o.re ?? "1k2"}, tolerance: 1%, package: "0603" }
  - { id: RC, kind: resistor, pins: [col, gnd], value: ${o.rc ?? "4k7"}, tolerance: 1%, package: "0603" }
  - { id: C2, kind: capacitor, pins: [col, out], value: ${o.c2 ?? "10u"}, voltageRating: 25 V }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 10k, package: "0603" }
${o.parts ?? ""}
specs:
${o.specs ?? "  supplies: []"}
${o.review ?? ""}`;
}

export interface MosStage {
  readonly rd?: string;
  readonly rs?: string;
  readonly specs?: string;
  readonly powerRating?: string;
}

/**
 * NMOS common source: VG = 12·1M/4M = 3 V, k = k'·W/L = 2 mA/V², RS = 1k: ID = ½k·Vov² with
 * Vov = 2 V − ID·RS gives ID = 1 mA, Vov = 1 V, VS = 1 V; VD = 12 − 1 mA·RD.
 */
export function nmosStage(o: MosStage = {}): string {
  return `models:
  tw-nmos: { kind: nmos, threshold: 1 V, kPrime: 200u, width: 10 um, length: 1 um${o.powerRating ? `, powerRating: ${o.powerRating}` : ""} }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 12 V }
  - { id: RG1, kind: resistor, pins: [vdd, gate], value: 3M }
  - { id: RG2, kind: resistor, pins: [gate, gnd], value: 1M }
  - { id: M1, kind: nmos, model: tw-nmos, pins: { drain: drain, gate: gate, source: src } }
  - { id: RD, kind: resistor, pins: [vdd, drain], value: ${o.rd ?? "4k7"} }
  - { id: RS, kind: resistor, pins: [src, gnd], value: ${o.rs ?? "1k"} }
specs:
${o.specs ?? "  supplies: []"}
`;
}

/** PMOS common source, the mirror image of nmosStage: VS = 11 V, ID = 1 mA, VD = 1 mA·RD. */
export function pmosStage(o: MosStage = {}): string {
  return `models:
  tw-pmos: { kind: pmos, threshold: -1 V, kPrime: 200u, width: 10 um, length: 1 um${o.powerRating ? `, powerRating: ${o.powerRating}` : ""} }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 12 V }
  - { id: RG1, kind: resistor, pins: [vdd, gate], value: 1M }
  - { id: RG2, kind: resistor, pins: [gate, gnd], value: 3M }
  - { id: M1, kind: pmos, model: tw-pmos, pins: { drain: drain, gate: gate, source: src } }
  - { id: RS, kind: resistor, pins: [vdd, src], value: ${o.rs ?? "1k"} }
  - { id: RD, kind: resistor, pins: [drain, gnd], value: ${o.rd ?? "4k7"} }
specs:
${o.specs ?? "  supplies: []"}
`;
}

export interface RelayDriver {
  /** Extra keys on the coil's line, e.g. `, role: coil, mustOperateCurrent: 25 mA`. */
  readonly coil?: string;
  readonly vcc?: string;
  /** Lines before `models:` (temperature). */
  readonly head?: string;
  readonly specs?: string;
}

/**
 * A Tidewater Instruments alarm-relay driver: a 400 Ω, 12 V relay coil switched by an NPN
 * driven hard from a 5 V logic output (IB ≈ 4.3 V/4k7 ≈ 0.9 mA, forced beta ≈ 33, so the
 * transistor is saturated and nearly all of VCC is across the coil: ≈ 29.5 mA, ≈ 350 mW), a
 * flyback diode across the coil, and a status LED with its 2k2 series resistor on the same rail.
 */
export function relayDriver(o: RelayDriver = {}): string {
  return `${o.head ?? ""}
models:
  tw-npn: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
  flyback: { kind: diode, saturationCurrent: 2 nA, ideality: 1.8 }
  status-led: { kind: diode, saturationCurrent: 1e-18 A, ideality: 2 }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${o.vcc ?? "12 V"}, tolerance: 5% }
  - { id: VLOGIC, kind: voltage-source, pins: { plus: logic, minus: gnd }, voltage: 5 V }
  - { id: K1, kind: resistor, pins: [vcc, col], value: 400${o.coil ?? ""} }
  - { id: D1, kind: diode, model: flyback, pins: { anode: col, cathode: vcc } }
  - { id: RB, kind: resistor, pins: [logic, base], value: 4k7, package: "0603" }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: col, base: base, emitter: gnd } }
  - { id: RLED, kind: resistor, pins: [vcc, led], value: 2k2, package: "0805" }
  - { id: D2, kind: diode, model: status-led, pins: { anode: led, cathode: gnd } }
specs:
${o.specs ?? "  supplies: []"}`;
}
