// The resolved circuit: the typed, immutable value every later stage reads.
// All quantities are SI base units (ohm, farad, henry, volt, ampere, watt, hertz, kelvin).

/** Where an item came from in its circuit file; lines and columns start at 1. */
export interface SourcePos {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  readonly endLine?: number;
  readonly endColumn?: number;
}

/** A problem with a circuit file (parse, schema, value, expression, topology). */
export interface InputError {
  readonly file: string;
  readonly line?: number;
  readonly column?: number;
  /** What is wrong, in one sentence, naming the item ("unknown key `vaule` in component R3"). */
  readonly message: string;
  /** What to do about it ("did you mean `value`?"). */
  readonly hint?: string;
  /** Parts and nodes involved, for topology errors. */
  readonly parts?: readonly string[];
  readonly nodes?: readonly string[];
}

/** A component value with its tolerance band: min ≤ nominal ≤ max (equal when no tolerance is given). */
export interface Toleranced {
  readonly nominal: number;
  readonly min: number;
  readonly max: number;
}

/** A model parameter range as the datasheet gives it. */
export interface Spread {
  readonly min: number;
  readonly typ: number;
  readonly max: number;
}

interface ComponentBase {
  readonly id: string;
  readonly pos: SourcePos;
  /** Rules waived for this component: rule id → the reason given (`waive:` in the file). */
  readonly waive?: Readonly<Record<string, string>>;
}

export interface Resistor extends ComponentBase {
  readonly kind: "resistor";
  readonly pins: { readonly a: string; readonly b: string };
  readonly value: Toleranced;
  /** Power rating in W, from `powerRating`, else undefined (the rule may derive it from `package`). */
  readonly powerRating?: number;
  /** Chip size code as written, e.g. "0603". */
  readonly package?: string;
  /**
   * What the resistance stands for when it is not a resistor part: a load module or heater
   * (`load`), or a relay/solenoid coil's DC resistance (`coil`). Part-rating rules skip it.
   */
  readonly role?: ResistorRole;
  /** Coil only: the current (A) and/or voltage (V) the coil needs to operate for sure. */
  readonly mustOperateCurrent?: number;
  readonly mustOperateVoltage?: number;
}

export type ResistorRole = "load" | "coil";

export interface Capacitor extends ComponentBase {
  readonly kind: "capacitor";
  readonly pins: { readonly a: string; readonly b: string };
  readonly value: Toleranced;
  readonly voltageRating?: number;
  /** A polarised (electrolytic, tantalum) capacitor: the node its + terminal is on (one of its pins). */
  readonly positive?: string;
}

export interface Inductor extends ComponentBase {
  readonly kind: "inductor";
  readonly pins: { readonly a: string; readonly b: string };
  readonly value: Toleranced;
  /** Winding resistance in ohm; 0 when not given. */
  readonly seriesResistance: number;
}

export interface VoltageSource extends ComponentBase {
  readonly kind: "voltage-source";
  readonly pins: { readonly plus: string; readonly minus: string };
  /** DC voltage, V(plus) − V(minus). */
  readonly voltage: Toleranced;
  /** Peak signal amplitude (V) this source applies when it drives a gain; used where a signal level matters, never to scale a gain. */
  readonly signal?: number;
}

export interface CurrentSource extends ComponentBase {
  readonly kind: "current-source";
  /** The DC current flows through the source from `from` to `to` (out of the source into node `to`). */
  readonly pins: { readonly from: string; readonly to: string };
  /** DC current, through the source from `from` to `to`. */
  readonly current: Toleranced;
  /** Peak signal amplitude (A) this source applies when it drives a gain; never scales a gain. */
  readonly signal?: number;
}

export interface Diode extends ComponentBase {
  readonly kind: "diode";
  readonly pins: { readonly anode: string; readonly cathode: string };
  readonly model: string;
}

export interface Bjt extends ComponentBase {
  readonly kind: "npn" | "pnp";
  readonly pins: { readonly collector: string; readonly base: string; readonly emitter: string };
  readonly model: string;
}

export interface Mosfet extends ComponentBase {
  readonly kind: "nmos" | "pmos";
  /** `body` is the source node when the file leaves it out (body tied to source). */
  readonly pins: { readonly drain: string; readonly gate: string; readonly source: string; readonly body: string };
  readonly model: string;
}

/**
 * Voltage-controlled sources. Controlling voltage Vc = V(controlPlus) − V(controlMinus).
 * vcvs: V(plus) − V(minus) = gain·Vc.  vccs: a current gain·Vc leaves the source at `plus`
 * (flows into node plus) and returns at `minus` — the same direction as a voltage source's
 * reported current.
 */
export interface VoltageControlled extends ComponentBase {
  readonly kind: "vcvs" | "vccs";
  readonly pins: {
    readonly plus: string;
    readonly minus: string;
    readonly controlPlus: string;
    readonly controlMinus: string;
  };
  readonly gain: number;
}

/**
 * Current-controlled sources. The controlling current is the current through the two-terminal
 * part named by `sense`, from its first pin to its second (a→b; plus→minus; from→to). cccs
 * output current as for vccs; ccvs: V(plus) − V(minus) = gain·I.
 */
export interface CurrentControlled extends ComponentBase {
  readonly kind: "cccs" | "ccvs";
  readonly pins: { readonly plus: string; readonly minus: string };
  /** Id of the sensed part (one of SENSED_KINDS in src/circuit/sense.ts). */
  readonly sense: string;
  readonly gain: number;
}

export type Component =
  | Resistor
  | Capacitor
  | Inductor
  | VoltageSource
  | CurrentSource
  | Diode
  | Bjt
  | Mosfet
  | VoltageControlled
  | CurrentControlled;

export type ComponentKind = Component["kind"];

interface ModelBase {
  readonly id: string;
  readonly pos: SourcePos;
  /** Maximum dissipation in W, if the model gives one. */
  readonly powerRating?: number;
}

export interface DiodeModel extends ModelBase {
  readonly kind: "diode";
  readonly saturationCurrent: Spread;
  readonly ideality: Spread; // default 1
  readonly seriesResistance: number; // ohm, default 0
  /** Temperature behaviour of the forward curve as a datasheet states it (see JunctionDrift). */
  readonly drift: JunctionDrift;
  /**
   * Datasheet form of the forward curve (an LED, a rectifier): forward voltage at a test current.
   * When given, saturationCurrent is derived from it (at the typical ideality and the model
   * temperature) and kept here for reports.
   */
  readonly forward?: { readonly voltage: Spread; readonly current: number };
  /** Reverse breakdown voltage magnitude at `breakdown.current` (a Zener voltage), V. */
  readonly breakdownVoltage?: Spread;
  /** Reverse breakdown: test current (A), dynamic resistance there (Ω), drift of the voltage (V/K). */
  readonly breakdown?: { readonly current: number; readonly resistance: number; readonly tempco: number };
  readonly ratings?: DiodeRatings;
}

/**
 * A junction's forward voltage drift dV/dT (V/K, negative for silicon) at a constant current
 * (A): the diode's forward current, or the BJT's collector current. The saturation current's
 * temperature law follows from it (src/devices/thermal.ts).
 */
export interface JunctionDrift {
  readonly voltage: number;
  readonly current: number;
}

/** Absolute maximum ratings of a diode from its datasheet (magnitudes). */
export interface DiodeRatings {
  /** Maximum reverse (blocking) voltage, V. */
  readonly reverseVoltage?: number;
  /** Maximum continuous forward current, A. */
  readonly forwardCurrent?: number;
}

export interface BjtModel extends ModelBase {
  readonly kind: "npn" | "pnp";
  /** DC current gain IC/IB at the test condition `betaAt` (a datasheet's hFE), at 25 °C. */
  readonly beta: Spread;
  /** Where `beta` is measured: polarity-normalised VCE (V) and IC (A), both positive. */
  readonly betaAt: { readonly collectorEmitterVoltage: number; readonly collectorCurrent: number };
  readonly reverseBeta: Spread; // default 1
  readonly saturationCurrent: Spread;
  /** Early voltage magnitude in V; Infinity = no Early effect. */
  readonly earlyVoltage: Spread;
  /** Polarity-normalised VCE at the edge of saturation, default 0.3 V. */
  readonly saturationEdge: number;
  /** Drift of VBE at a constant collector current (see JunctionDrift). */
  readonly drift: JunctionDrift;
  /** Relative drift of beta, per kelvin (0.005 = 0.5 %/°C); beta(T) = beta·exp(betaDrift·(T − T0)). */
  readonly betaDrift: number;
  /** fT in Hz, giving the base–emitter capacitance Cπ = gm/(2π·fT) − Cμ; absent = no Cπ. */
  readonly transitFrequency?: number;
  /** Cμ in F; absent = none. */
  readonly baseCollectorCapacitance?: number;
  readonly ratings?: BjtRatings;
}

/** Absolute maximum ratings of a bipolar transistor from its datasheet (magnitudes). */
export interface BjtRatings {
  /** Collector–emitter breakdown with the base open (VCEO), V. */
  readonly collectorEmitter?: number;
  /** Collector–base breakdown with the emitter open (VCBO), V. */
  readonly collectorBase?: number;
  /** Emitter–base reverse breakdown with the collector open (VEBO), V. */
  readonly emitterBase?: number;
  /** Maximum continuous collector current, A. */
  readonly collectorCurrent?: number;
}

export interface MosfetModel extends ModelBase {
  readonly kind: "nmos" | "pmos";
  /** Signed as textbooks write it: positive for NMOS, negative for PMOS. */
  readonly threshold: Spread;
  readonly kPrime: Spread; // A/V², µn·Cox
  readonly width: number; // m
  readonly length: number; // m
  /** Channel-length modulation λ, 1/V (ID ∝ 1 + λ·VDS); default 0. */
  readonly channelLengthModulation: Spread;
  readonly bodyEffect: number; // γ in √V, default 0
  /** Fermi potential φF of the substrate in V (the body-effect law uses 2φF); default 0.35 V. */
  readonly fermiPotential: number;
  /** d|Vt|/dT in V/K (polarity-normalised), default −2 mV/K (common practice). */
  readonly thresholdTempco: number;
  /** k'(T) = k'(T0)·(T/T0)^kPrimeExponent; default −1.5 (mobility, common practice). */
  readonly kPrimeExponent: number;
  /** Fixed gate–source capacitance (overlap, package) in F; absent = none. */
  readonly gateSourceCapacitance?: number;
  /** Fixed gate–drain capacitance (overlap, package) in F; absent = none. */
  readonly gateDrainCapacitance?: number;
  /** Gate oxide capacitance per area Cox in F/m²: adds the channel's share of W·L·Cox by region. */
  readonly oxideCapacitance?: number;
  readonly ratings?: MosfetRatings;
}

/** Absolute maximum ratings of a MOSFET from its datasheet (magnitudes). */
export interface MosfetRatings {
  /** Maximum drain–source voltage, V. */
  readonly drainSource?: number;
  /** Maximum gate–source voltage (either sign), V. */
  readonly gateSource?: number;
  /** Maximum continuous drain current, A. */
  readonly drainCurrent?: number;
}

export type Model = DiodeModel | BjtModel | MosfetModel;

export interface GainSpec {
  readonly name: string;
  /** Id of the independent source that drives the small-signal input. */
  readonly input: string;
  /** Output voltage V(plus) − V(minus); `minus` is the ground node for a single-ended output. */
  readonly output: { readonly plus: string; readonly minus: string };
  readonly target: number;
  /** Acceptance window for the gain, in V/V (from tolerance % or explicit min/max). */
  readonly window: { readonly min: number; readonly max: number };
  /** Evaluate at this frequency (Hz) instead of midband. */
  readonly frequency?: number;
  /** Midband input impedance window (Ω), as seen by the ideal input source. */
  readonly inputImpedance?: ValueWindow;
  /** Midband output impedance window (Ω), input zeroed, circuit load included. */
  readonly outputImpedance?: ValueWindow;
  readonly pos: SourcePos;
}

/** An acceptance window; at least one side is given. */
export interface ValueWindow {
  readonly min?: number;
  readonly max?: number;
}

/** A DC level window on a named node (V against ground). */
export interface NodeSpec extends ValueWindow {
  readonly node: string;
  readonly pos: SourcePos;
}

export interface SupplySpec {
  readonly source: string;
  readonly maxCurrent?: number;
  readonly maxPower?: number;
  readonly pos: SourcePos;
}

export interface DeviceSpec {
  readonly device: string;
  readonly region?: string;
  readonly minCurrent?: number;
  readonly maxCurrent?: number;
  readonly pos: SourcePos;
}

export interface Specs {
  readonly gains: readonly GainSpec[];
  readonly band?: { readonly low: number; readonly high: number; readonly pos: SourcePos };
  readonly supplies: readonly SupplySpec[];
  readonly devices: readonly DeviceSpec[];
  /** DC level windows by node; absent when the file gives none. */
  readonly nodes?: readonly NodeSpec[];
}

/** Per-circuit rule option overrides, allowed only where a rule declares them overridable. */
export interface CircuitRuleOverride {
  readonly rule: string;
  readonly options: Readonly<Record<string, unknown>>;
  readonly reason: string;
  readonly pos: SourcePos;
}

/** A model library a circuit was resolved with: the file as messages name it and the SHA-256 of its bytes. */
export interface LibraryUse {
  readonly file: string;
  readonly sha256: string;
}

export interface Circuit {
  readonly file: string;
  readonly name: string;
  readonly description?: string;
  /** Ambient temperature in kelvin. */
  readonly temperature: number;
  readonly ground: string;
  readonly parameters: ReadonlyMap<string, number>;
  readonly models: ReadonlyMap<string, Model>;
  /** In file order. */
  readonly components: readonly Component[];
  /** Every node name except ground, sorted. */
  readonly nodes: readonly string[];
  readonly specs: Specs;
  readonly overrides: readonly CircuitRuleOverride[];
  /** Non-fatal remarks from resolution (e.g. a PMOS with a positive threshold). */
  readonly warnings: readonly InputError[];
  readonly pos: SourcePos;
  /** Model libraries the circuit was resolved with (config's first, then its own), in load order. */
  readonly libraries?: readonly LibraryUse[];
}

export type LoadResult =
  | { readonly ok: true; readonly circuit: Circuit }
  | { readonly ok: false; readonly errors: readonly InputError[]; readonly libraries?: readonly LibraryUse[] };
