// Resolution: the schema-valid plain tree → the typed, immutable Circuit (SI units, defaults
// applied, tolerances and spreads as ranges, every item with its source position).
import * as D from "./defaults.js";
import { readNumberOr, readOptional, readSpread, readSpreadOr, readToleranced, readValue, ResolveContext } from "./fields.js";
import { resolveParameters } from "./parameters.js";
import type { PathSegment } from "./positions.js";
import type {
  Circuit,
  CircuitRuleOverride,
  Component,
  DeviceSpec,
  NodeSpec,
  ValueWindow,
  GainSpec,
  Model,
  SourcePos,
  Specs,
  SupplySpec,
  Toleranced,
} from "./types.js";
import type { Quantity } from "./values.js";
import { MODEL_TEMPERATURE, thermalVoltage } from "../devices/thermal.js";

type Obj = Record<string, unknown>;
const asObj = (v: unknown): Obj => (v !== null && typeof v === "object" && !Array.isArray(v) ? (v as Obj) : {});

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === "object" && !Object.isFrozen(value)) {
    if (!(value instanceof Map)) for (const v of Object.values(value as object)) deepFreeze(v);
    else for (const v of value.values()) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

/**
 * Optional device-capacitance fields (absent by default: no capacitance unless given). A
 * transit frequency must be positive; a capacitance may be 0 but not negative.
 */
function optionalPositive(ctx: ResolveContext, raw: Obj, path: PathSegment[], what: string, fields: readonly (readonly [string, Quantity])[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const [key, quantity] of fields) {
    const v = readOptional(ctx, raw, key, path, quantity, what);
    if (v === undefined) continue;
    const ok = key === "transitFrequency" ? v > 0 && Number.isFinite(v) : v >= 0 && Number.isFinite(v);
    if (!ok) ctx.error([...path, key], `${what}: ${key} must be ${key === "transitFrequency" ? "positive" : "zero or positive"} and finite`, "omit it for no capacitance");
    else out[key] = v;
  }
  return out;
}

/** An optional `ratings:` block of a model: each key a positive magnitude in its quantity. */
function readRatings<K extends string>(ctx: ResolveContext, raw: Obj, path: readonly PathSegment[], what: string, keys: readonly (readonly [K, Quantity])[]): { ratings?: Partial<Record<K, number>> } {
  if (raw["ratings"] === undefined) return {};
  const block = asObj(raw["ratings"]);
  const out: Partial<Record<K, number>> = {};
  for (const [key, q] of keys) {
    const v = readOptional(ctx, block, key, [...path, "ratings"], q, `${what} rating`);
    if (v === undefined) continue;
    if (!(v > 0)) ctx.error([...path, "ratings", key], `${what}: the \`${key}\` rating must be a positive magnitude`, "write it without a sign, as the datasheet's absolute maximum ratings table gives it");
    out[key] = v;
  }
  return { ratings: out };
}

/** The diode's forward curve: `saturationCurrent`, or `forward` (VF at IF) from which IS follows. */
function diodeForward(ctx: ResolveContext, raw: Obj, path: readonly PathSegment[], what: string, ideality: number, seriesResistance: number) {
  const given = (raw["saturationCurrent"] !== undefined ? 1 : 0) + (raw["forward"] !== undefined ? 1 : 0);
  if (given !== 1) {
    ctx.error(path, given ? `${what} gives both saturationCurrent and forward` : `${what} needs saturationCurrent or forward`, "describe the forward curve once: `forward: { voltage: 2.0 V, current: 20 mA }` as the datasheet gives it, or `saturationCurrent`");
    return undefined;
  }
  if (raw["saturationCurrent"] !== undefined) return { saturationCurrent: readSpread(ctx, raw["saturationCurrent"], [...path, "saturationCurrent"], "current", `${what} \`saturationCurrent\``) };
  const f = asObj(raw["forward"]);
  const fp = [...path, "forward"];
  const voltage = readSpread(ctx, f["voltage"], [...fp, "voltage"], "voltage", `${what} forward \`voltage\``);
  const current = readValue(ctx, f["current"], [...fp, "current"], "current", `${what} forward \`current\``);
  if (!voltage || current === undefined) return undefined;
  if (!(current > 0)) {
    ctx.error([...fp, "current"], `${what}: the forward test current must be positive`, "write the current the datasheet states VF at, e.g. 20 mA");
    return undefined;
  }
  // Shockley at the test point, at the temperature model parameters are given at (the datasheet's):
  // IF = IS·(exp((VF − IF·RS)/(n·VT)) − 1)  ⇒  IS = IF / expm1((VF − IF·RS)/(n·VT)).
  const nvt = ideality * thermalVoltage(MODEL_TEMPERATURE);
  const is = (vf: number) => current / Math.expm1((vf - current * seriesResistance) / nvt);
  if (!(voltage.min - current * seriesResistance > 0)) {
    ctx.error([...fp, "voltage"], `${what}: the forward voltage must exceed the drop IF·seriesResistance (${current * seriesResistance} V)`, "check the forward voltage and the series resistance");
    return undefined;
  }
  // The highest VF is the lowest IS.
  return { saturationCurrent: { min: is(voltage.max), typ: is(voltage.typ), max: is(voltage.min) }, forward: { voltage, current } };
}

/** A forward-voltage drift beyond this magnitude is not a silicon junction's (they drift 1–3 mV/°C; common practice). */
const MAX_JUNCTION_DRIFT_V_PER_K = 0.01;
/** A gain drift beyond ±5 %/°C is not a transistor's (common practice: about +0.5 %/°C). */
const MAX_BETA_DRIFT_PER_K = 0.05;

/** `betaAt: { collectorEmitterVoltage, collectorCurrent }`: where the datasheet states beta (magnitudes). */
function betaTestCondition(ctx: ResolveContext, raw: Obj, path: readonly PathSegment[], what: string) {
  const b = asObj(raw["betaAt"]);
  const bp = [...path, "betaAt"];
  const collectorEmitterVoltage = readNumberOr(ctx, b, "collectorEmitterVoltage", bp, "voltage", `${what} betaAt`, D.DEFAULT_BETA_TEST_VCE_V);
  const collectorCurrent = readNumberOr(ctx, b, "collectorCurrent", bp, "current", `${what} betaAt`, D.DEFAULT_BETA_TEST_IC_A);
  if (collectorEmitterVoltage === undefined || collectorCurrent === undefined) return undefined;
  if (!(collectorEmitterVoltage > 0) || !(collectorCurrent > 0)) {
    ctx.error(bp, `${what}: betaAt needs a positive collectorEmitterVoltage and collectorCurrent (magnitudes, also for a pnp)`, "write the datasheet's hFE condition, e.g. { collectorEmitterVoltage: 5 V, collectorCurrent: 2 mA }");
    return undefined;
  }
  return { collectorEmitterVoltage, collectorCurrent };
}

/** The junction's forward-voltage drift (`key`, V/K) and the current it is stated at (`driftCurrent`). */
function junctionDrift(ctx: ResolveContext, raw: Obj, path: readonly PathSegment[], what: string, key: string, defaultCurrent: number) {
  const voltage = readNumberOr(ctx, raw, key, path, "volt-per-kelvin", what, D.DEFAULT_JUNCTION_DRIFT_V_PER_K);
  const current = readNumberOr(ctx, raw, "driftCurrent", path, "current", what, defaultCurrent);
  if (voltage === undefined || current === undefined) return undefined;
  if (!(voltage < 0 && voltage > -MAX_JUNCTION_DRIFT_V_PER_K)) {
    ctx.error([...path, key], `${what}: ${key} ${voltage * 1e3} mV/°C is not a silicon junction's`, "the forward voltage falls with temperature, about 2 mV/°C: write e.g. -2 mV/°C");
    return undefined;
  }
  if (!(current > 0)) {
    ctx.error([...path, "driftCurrent"], `${what}: driftCurrent must be positive`, "write the current the datasheet states the drift at, e.g. 1 mA");
    return undefined;
  }
  return { voltage, current };
}

/** A Zener's `breakdown:` block. */
function diodeBreakdown(ctx: ResolveContext, raw: Obj, path: readonly PathSegment[], what: string) {
  if (raw["breakdown"] === undefined) return {};
  const b = asObj(raw["breakdown"]);
  const bp = [...path, "breakdown"];
  const voltage = readSpread(ctx, b["voltage"], [...bp, "voltage"], "voltage", `${what} breakdown \`voltage\``);
  const current = readValue(ctx, b["current"], [...bp, "current"], "current", `${what} breakdown \`current\``);
  const resistance = readValue(ctx, b["resistance"], [...bp, "resistance"], "resistance", `${what} breakdown \`resistance\``);
  const tempco = readNumberOr(ctx, b, "temperatureCoefficient", bp, "volt-per-kelvin", `${what} breakdown`, D.DEFAULT_BREAKDOWN_TEMPCO_V_PER_K);
  if (!voltage || current === undefined || resistance === undefined || tempco === undefined) return undefined;
  if (!(voltage.min > 0)) ctx.error([...bp, "voltage"], `${what}: the breakdown voltage must be a positive magnitude`, "write it without a sign, e.g. 5.1 V");
  if (!(current > 0)) ctx.error([...bp, "current"], `${what}: the breakdown test current must be positive`, "write the current the datasheet states VZ at (IZT), e.g. 5 mA");
  if (!(resistance > 0)) ctx.error([...bp, "resistance"], `${what}: the dynamic resistance must be positive`, "write the datasheet's ZZT at the test current, e.g. 30 Ω");
  return { breakdownVoltage: voltage, breakdown: { current, resistance, tempco } };
}

/** Resolves one model (of a circuit file or a model library); undefined after reporting errors in ctx. */
export function resolveModel(ctx: ResolveContext, id: string, raw: Obj): Model | undefined {
  const path: PathSegment[] = ["models", id];
  const what = `model ${id}`;
  const pos = ctx.pos(path, true);
  const powerRating = readOptional(ctx, raw, "powerRating", path, "power", what);
  if (powerRating !== undefined && !(powerRating > 0)) ctx.error([...path, "powerRating"], `${what}: powerRating must be a positive power`, "write the datasheet's total dissipation, e.g. 625 mW");
  const base = { id, pos, ...(powerRating !== undefined ? { powerRating } : {}) };
  const n = (key: string, q: Quantity, fallback: number) => readNumberOr(ctx, raw, key, path, q, what, fallback);
  const s = (key: string, q: Quantity, fallback: number) => readSpreadOr(ctx, raw, key, path, q, what, fallback);
  const req = (key: string, q: Quantity) => readSpread(ctx, raw[key], [...path, key], q, `${what} \`${key}\``);
  const kind = raw["kind"];
  if (kind === "diode") {
    const ideality = s("ideality", "dimensionless", raw["forward"] !== undefined ? D.DEFAULT_FORWARD_FORM_IDEALITY : D.DEFAULT_IDEALITY);
    const seriesResistance = n("seriesResistance", "resistance", D.DEFAULT_DIODE_SERIES_RESISTANCE);
    if (!ideality || seriesResistance === undefined) return undefined;
    const forward = diodeForward(ctx, raw, path, what, ideality.typ, seriesResistance);
    const drift = junctionDrift(ctx, raw, path, what, "forwardVoltageDrift", forward?.forward?.current ?? D.DEFAULT_DRIFT_CURRENT_A);
    const breakdown = diodeBreakdown(ctx, raw, path, what);
    const ratings = readRatings(ctx, raw, path, what, [["reverseVoltage", "voltage"], ["forwardCurrent", "current"]] as const);
    if (!forward?.saturationCurrent || !breakdown || !drift) return undefined;
    if (!(ideality.min > 0)) ctx.error([...path, "ideality"], `${what}: ideality must be positive`, "silicon junctions have 1 to 2");
    if (!(forward.saturationCurrent.min > 0)) ctx.error([...path, "saturationCurrent"], `${what}: saturationCurrent must be positive`, "write the datasheet's IS, e.g. 2.5 nA");
    return { ...base, kind, ...forward, saturationCurrent: forward.saturationCurrent, ideality, seriesResistance, drift, ...breakdown, ...ratings };
  }
  if (kind === "npn" || kind === "pnp") {
    const beta = req("beta", "dimensionless");
    const reverseBeta = s("reverseBeta", "dimensionless", D.DEFAULT_REVERSE_BETA);
    const saturationCurrent = req("saturationCurrent", "current");
    const earlyVoltage = s("earlyVoltage", "voltage", D.DEFAULT_EARLY_VOLTAGE);
    const saturationEdge = n("saturationEdge", "voltage", D.DEFAULT_SATURATION_EDGE_V);
    const drift = junctionDrift(ctx, raw, path, what, "baseEmitterDrift", D.DEFAULT_DRIFT_CURRENT_A);
    const betaDrift = n("betaDrift", "percent-per-kelvin", D.DEFAULT_BETA_DRIFT_PER_K);
    const betaAt = betaTestCondition(ctx, raw, path, what);
    if (!beta || !reverseBeta || !saturationCurrent || !earlyVoltage) return undefined;
    if (saturationEdge === undefined || !drift || betaDrift === undefined || !betaAt) return undefined;
    if (!(Math.abs(betaDrift) < MAX_BETA_DRIFT_PER_K)) ctx.error([...path, "betaDrift"], `${what}: betaDrift ${betaDrift * 100} %/°C is outside ±${MAX_BETA_DRIFT_PER_K * 100} %/°C`, "small-signal transistors' gain rises about 0.5 %/°C; write e.g. 0.5 %/°C");
    if (earlyVoltage.min <= 0) ctx.error([...path, "earlyVoltage"], `${what}: earlyVoltage must be a positive magnitude`, "write it without a sign, e.g. 90 V; omit it for no Early effect");
    if (beta.min <= 0) ctx.error([...path, "beta"], `${what}: beta must be positive`);
    if (!(reverseBeta.min > 0)) ctx.error([...path, "reverseBeta"], `${what}: reverseBeta must be positive`, "small-signal transistors have about 1 to 10; omit it for the default");
    if (saturationCurrent.min <= 0) ctx.error([...path, "saturationCurrent"], `${what}: saturationCurrent must be positive`);
    const caps = optionalPositive(ctx, raw, path, what, [
      ["transitFrequency", "frequency"],
      ["baseCollectorCapacitance", "capacitance"],
    ]);
    const ratings = readRatings(ctx, raw, path, what, [["collectorEmitter", "voltage"], ["collectorBase", "voltage"], ["emitterBase", "voltage"], ["collectorCurrent", "current"]] as const);
    return { ...base, kind, beta, reverseBeta, saturationCurrent, earlyVoltage, saturationEdge, betaAt, drift, betaDrift, ...caps, ...ratings };
  }
  if (kind === "nmos" || kind === "pmos") {
    const threshold = req("threshold", "voltage");
    const kPrime = req("kPrime", "transconductance-parameter");
    const width = n("width", "length", NaN);
    const length = n("length", "length", NaN);
    const channelLengthModulation = s("channelLengthModulation", "per-volt", D.DEFAULT_CHANNEL_LENGTH_MODULATION);
    const bodyEffect = n("bodyEffect", "sqrt-volt", D.DEFAULT_BODY_EFFECT);
    const fermiPotential = n("fermiPotential", "voltage", D.DEFAULT_FERMI_POTENTIAL_V);
    const thresholdTempco = n("thresholdTempco", "volt-per-kelvin", D.DEFAULT_THRESHOLD_TEMPCO_V_PER_K);
    const kPrimeExponent = n("kPrimeExponent", "dimensionless", D.DEFAULT_KPRIME_EXPONENT);
    if (!threshold || !kPrime || !channelLengthModulation || width === undefined || length === undefined) return undefined;
    if (bodyEffect === undefined || fermiPotential === undefined || thresholdTempco === undefined || kPrimeExponent === undefined) return undefined;
    if (!(width > 0)) ctx.error([...path, "width"], `${what}: width must be positive`);
    if (!(channelLengthModulation.min >= 0)) ctx.error([...path, "channelLengthModulation"], `${what}: channelLengthModulation must be zero or positive`, "write it without a sign, e.g. 0.02 /V; omit it for no channel-length modulation");
    if (!(bodyEffect >= 0)) ctx.error([...path, "bodyEffect"], `${what}: bodyEffect must be zero or positive`, "write it without a sign, e.g. 0.4 √V");
    if (!(length > 0)) ctx.error([...path, "length"], `${what}: length must be positive`);
    if (kPrime.min <= 0) ctx.error([...path, "kPrime"], `${what}: kPrime must be positive`);
    if (!(fermiPotential > 0)) ctx.error([...path, "fermiPotential"], `${what}: fermiPotential φF must be positive`, "typical silicon substrates give 0.3–0.4 V");
    const wrongSign = kind === "nmos" ? threshold.typ < 0 : threshold.typ > 0;
    if (wrongSign) {
      const other = kind === "nmos" ? "a depletion-mode NMOS" : "a depletion-mode PMOS";
      ctx.warn(
        [...path, "threshold"],
        `${what}: a ${kind.toUpperCase()} threshold of ${threshold.typ} V is ${kind === "nmos" ? "negative" : "positive"}; read as ${other}, or perhaps the sign is wrong (an enhancement ${kind.toUpperCase()} has Vt ${kind === "nmos" ? "> 0" : "< 0"})`,
        `write ${-threshold.typ} V for an enhancement device; keep ${threshold.typ} V only if a depletion device is meant`,
      );
    }
    const caps = optionalPositive(ctx, raw, path, what, [
      ["gateSourceCapacitance", "capacitance"],
      ["gateDrainCapacitance", "capacitance"],
      ["oxideCapacitance", "capacitance-per-area"],
    ]);
    const ratings = readRatings(ctx, raw, path, what, [["drainSource", "voltage"], ["gateSource", "voltage"], ["drainCurrent", "current"]] as const);
    return { ...base, kind, threshold, kPrime, width, length, channelLengthModulation, bodyEffect, fermiPotential, thresholdTempco, kPrimeExponent, ...caps, ...ratings };
  }
  return undefined;
}

/**
 * A node name as written: `01`, `0x2` or `1.0e0` are read by YAML as numbers, but as node names
 * they are text (the number 1 would merge `01` with node `1`), so the source text is kept.
 */
function nodeName(ctx: ResolveContext, path: readonly PathSegment[], v: unknown): string {
  if (typeof v !== "number") return String(v);
  const node = ctx.positioned.doc.getIn(path as PathSegment[], true) as { source?: unknown } | undefined;
  return typeof node?.source === "string" && node.source !== "" ? node.source : String(v);
}

function resolveComponent(ctx: ResolveContext, raw: Obj, index: number): Component | undefined {
  const path: PathSegment[] = ["components", index];
  const id = String(raw["id"]);
  const what = `component ${id}`;
  const pos: SourcePos = ctx.pos(path);
  const pinsRaw = raw["pins"];
  // Node names may be written as whole numbers (`0`); inside they are always text.
  const pins = Object.fromEntries(Object.entries(asObj(pinsRaw)).map(([k, v]) => [k, nodeName(ctx, [...path, "pins", k], v)])) as Record<string, string>;
  const two = Array.isArray(pinsRaw) ? { a: nodeName(ctx, [...path, "pins", 0], pinsRaw[0]), b: nodeName(ctx, [...path, "pins", 1], pinsRaw[1]) } : { a: "", b: "" };
  const tol = (key: string, q: Quantity): Toleranced | undefined => readToleranced(ctx, raw, key, path, q, what);
  const opt = (key: string, q: Quantity) => readOptional(ctx, raw, key, path, q, what);
  const waive = raw["waive"] !== undefined ? Object.fromEntries(Object.entries(asObj(raw["waive"])).map(([rule, reason]) => [rule, String(reason)])) : undefined;
  const base = { id, pos, ...(waive ? { waive } : {}) };
  switch (raw["kind"]) {
    case "resistor": {
      const value = tol("value", "resistance");
      const powerRating = opt("powerRating", "power");
      if (powerRating !== undefined && !(powerRating > 0)) ctx.error([...path, "powerRating"], `${what}: powerRating must be a positive power`, "write the resistor's rating, e.g. 250 mW");
      const mustOperateCurrent = opt("mustOperateCurrent", "current");
      const mustOperateVoltage = opt("mustOperateVoltage", "voltage");
      if (!value) return undefined;
      if (value.min <= 0) ctx.error([...path, "value"], `${what}: resistance must be positive`, "use a voltage source of 0 V for a short");
      const role = raw["role"] === "load" || raw["role"] === "coil" ? raw["role"] : undefined;
      for (const [key, v] of [["mustOperateCurrent", mustOperateCurrent], ["mustOperateVoltage", mustOperateVoltage]] as const) {
        if (v === undefined) continue;
        if (role !== "coil") ctx.error([...path, key], `${what}: \`${key}\` belongs to a relay or solenoid coil, but the resistor is not marked as one`, "add `role: coil`, or remove the key");
        else if (!(v > 0)) ctx.error([...path, key], `${what}: \`${key}\` must be positive`, "write the magnitude from the coil's datasheet, e.g. 12 mA or 9 V");
      }
      return {
        ...base,
        kind: "resistor",
        pins: two,
        value,
        ...(powerRating !== undefined ? { powerRating } : {}),
        ...(raw["package"] !== undefined ? { package: String(raw["package"]) } : {}),
        ...(role !== undefined ? { role } : {}),
        ...(mustOperateCurrent !== undefined ? { mustOperateCurrent } : {}),
        ...(mustOperateVoltage !== undefined ? { mustOperateVoltage } : {}),
      };
    }
    case "capacitor": {
      const value = tol("value", "capacitance");
      const voltageRating = opt("voltageRating", "voltage");
      if (voltageRating !== undefined && !(voltageRating > 0)) ctx.error([...path, "voltageRating"], `${what}: voltageRating must be a positive magnitude`, "write it without a sign, e.g. 25 V");
      if (!value) return undefined;
      if (value.min <= 0) ctx.error([...path, "value"], `${what}: capacitance must be positive`);
      const positive = raw["positive"] !== undefined ? nodeName(ctx, [...path, "positive"], raw["positive"]) : undefined;
      if (positive !== undefined && positive !== two.a && positive !== two.b)
        ctx.error([...path, "positive"], `${what}: \`positive: ${positive}\` is not one of its pins (${two.a}, ${two.b})`, "name the node the capacitor's + terminal is on");
      return { ...base, kind: "capacitor", pins: two, value, ...(voltageRating !== undefined ? { voltageRating } : {}), ...(positive !== undefined ? { positive } : {}) };
    }
    case "inductor": {
      const value = tol("value", "inductance");
      const seriesResistance = opt("seriesResistance", "resistance") ?? 0;
      if (!value) return undefined;
      if (value.min <= 0) ctx.error([...path, "value"], `${what}: inductance must be positive`);
      return { ...base, kind: "inductor", pins: two, value, seriesResistance };
    }
    case "voltage-source":
    case "current-source": {
      const isV = raw["kind"] === "voltage-source";
      const quantity = isV ? "voltage" : "current";
      const dc = tol(quantity, quantity);
      const signal = opt("signal", quantity);
      if (!dc) return undefined;
      if (signal !== undefined && !(signal > 0)) ctx.error([...path, "signal"], `${what}: the signal amplitude must be positive (a peak value); leave \`signal\` out when no level matters`);
      const signalPart = signal !== undefined && signal > 0 ? { signal } : {};
      return isV
        ? { ...base, kind: "voltage-source", pins: { plus: pins["plus"]!, minus: pins["minus"]! }, voltage: dc, ...signalPart }
        : { ...base, kind: "current-source", pins: { from: pins["from"]!, to: pins["to"]! }, current: dc, ...signalPart };
    }
    case "diode":
      return { ...base, kind: "diode", pins: { anode: pins["anode"]!, cathode: pins["cathode"]! }, model: String(raw["model"]) };
    case "npn":
    case "pnp":
      return { ...base, kind: raw["kind"], pins: { collector: pins["collector"]!, base: pins["base"]!, emitter: pins["emitter"]! }, model: String(raw["model"]) };
    case "nmos":
    case "pmos":
      return {
        ...base,
        kind: raw["kind"],
        pins: { drain: pins["drain"]!, gate: pins["gate"]!, source: pins["source"]!, body: pins["body"] ?? pins["source"]! },
        model: String(raw["model"]),
      };
    case "vcvs":
    case "vccs": {
      const gain = readValue(ctx, raw["gain"], [...path, "gain"], raw["kind"] === "vcvs" ? "gain" : "transconductance", `${what} \`gain\``);
      if (gain === undefined) return undefined;
      return { ...base, kind: raw["kind"], pins: { plus: pins["plus"]!, minus: pins["minus"]!, controlPlus: pins["controlPlus"]!, controlMinus: pins["controlMinus"]! }, gain };
    }
    case "cccs":
    case "ccvs": {
      const gain = readValue(ctx, raw["gain"], [...path, "gain"], raw["kind"] === "cccs" ? "gain" : "resistance", `${what} \`gain\``);
      if (gain === undefined) return undefined;
      return { ...base, kind: raw["kind"], pins: { plus: pins["plus"]!, minus: pins["minus"]! }, sense: String(raw["sense"]), gain };
    }
    default:
      return undefined;
  }
}

function resolveSpecs(ctx: ResolveContext, raw: Obj, ground: string): Specs {
  const gains: GainSpec[] = [];
  const rawGains = Array.isArray(raw["gains"]) ? (raw["gains"] as Obj[]) : [];
  rawGains.forEach((g, i) => {
    const path: PathSegment[] = ["specs", "gains", i];
    const what = `gain spec \`${String(g["name"])}\``;
    const target = readValue(ctx, g["target"], [...path, "target"], "gain", `${what} \`target\``);
    const frequency = readOptional(ctx, g, "frequency", path, "frequency", what);
    const out = g["output"];
    const output = typeof out === "string" || typeof out === "number" ? { plus: nodeName(ctx, [...path, "output"], out), minus: ground } : { plus: nodeName(ctx, [...path, "output", "plus"], asObj(out)["plus"]), minus: nodeName(ctx, [...path, "output", "minus"], asObj(out)["minus"]) };
    if (target === undefined) return;
    let window: { min: number; max: number } | undefined;
    const tol = g["tolerance"];
    if (tol === undefined) window = { min: target, max: target };
    else if (tol !== null && typeof tol === "object") {
      const t = tol as Obj;
      const lo = readValue(ctx, t["min"], [...path, "tolerance", "min"], "gain", `${what} tolerance \`min\``);
      const hi = readValue(ctx, t["max"], [...path, "tolerance", "max"], "gain", `${what} tolerance \`max\``);
      if (lo === undefined || hi === undefined) return;
      if (!(lo <= target && target <= hi)) {
        ctx.error([...path, "tolerance"], `${what}: the window {min: ${lo}, max: ${hi}} does not contain the target ${target}`, "give the acceptable gain limits in V/V, min ≤ target ≤ max");
        return;
      }
      window = { min: lo, max: hi };
    } else {
      const fake = { v: target, tolerance: tol };
      const t = readToleranced(ctx, fake, "v", path, "gain", what);
      if (!t) return;
      window = { min: t.min, max: t.max };
    }
    if (frequency !== undefined && !(frequency > 0)) ctx.error([...path, "frequency"], `${what}: frequency must be positive`);
    const inputImpedance = readWindow(ctx, g["inputImpedance"], [...path, "inputImpedance"], "resistance", `${what} \`inputImpedance\``);
    const outputImpedance = readWindow(ctx, g["outputImpedance"], [...path, "outputImpedance"], "resistance", `${what} \`outputImpedance\``);
    gains.push({
      name: String(g["name"]),
      input: String(g["input"]),
      output,
      target,
      window,
      ...(frequency !== undefined ? { frequency } : {}),
      ...(inputImpedance ? { inputImpedance } : {}),
      ...(outputImpedance ? { outputImpedance } : {}),
      pos: ctx.pos(path),
    });
  });
  const names = new Set<string>();
  gains.forEach((g) => {
    if (names.has(g.name)) ctx.error(["specs", "gains", gains.indexOf(g), "name"], `two gain specs are named \`${g.name}\``, "give each gain a unique name; findings use it as their subject");
    names.add(g.name);
  });
  let band: Specs["band"];
  if (raw["band"] !== undefined) {
    const b = asObj(raw["band"]);
    const low = readValue(ctx, b["low"], ["specs", "band", "low"], "frequency", "band `low`");
    const high = readValue(ctx, b["high"], ["specs", "band", "high"], "frequency", "band `high`");
    if (low !== undefined && high !== undefined) {
      if (!(low > 0 && low < high)) ctx.error(["specs", "band"], `band {low: ${low} Hz, high: ${high} Hz} must have 0 < low < high`);
      else band = { low, high, pos: ctx.pos(["specs", "band"]) };
    }
  }
  const supplies: SupplySpec[] = [];
  (Array.isArray(raw["supplies"]) ? (raw["supplies"] as Obj[]) : []).forEach((s, i) => {
    const path: PathSegment[] = ["specs", "supplies", i];
    const what = `supply spec \`${String(s["source"])}\``;
    const maxCurrent = readOptional(ctx, s, "maxCurrent", path, "current", what);
    const maxPower = readOptional(ctx, s, "maxPower", path, "power", what);
    supplies.push({ source: String(s["source"]), ...(maxCurrent !== undefined ? { maxCurrent } : {}), ...(maxPower !== undefined ? { maxPower } : {}), pos: ctx.pos(path) });
  });
  const devices: DeviceSpec[] = [];
  for (const [device, d] of Object.entries(asObj(raw["devices"]))) {
    const path: PathSegment[] = ["specs", "devices", device];
    const o = asObj(d);
    const what = `device spec \`${device}\``;
    const minCurrent = readOptional(ctx, o, "minCurrent", path, "current", what);
    const maxCurrent = readOptional(ctx, o, "maxCurrent", path, "current", what);
    if (minCurrent !== undefined && maxCurrent !== undefined && minCurrent > maxCurrent) ctx.error(path, `${what}: minCurrent is above maxCurrent`);
    devices.push({ device, ...(o["region"] !== undefined ? { region: String(o["region"]) } : {}), ...(minCurrent !== undefined ? { minCurrent } : {}), ...(maxCurrent !== undefined ? { maxCurrent } : {}), pos: ctx.pos(path, true) });
  }
  const nodes: NodeSpec[] = [];
  for (const [node, w] of Object.entries(asObj(raw["nodes"]))) {
    const path: PathSegment[] = ["specs", "nodes", node];
    const window = readWindow(ctx, w, path, "voltage", `node level \`${node}\``);
    if (window) nodes.push({ node, ...window, pos: ctx.pos(path, true) });
  }
  return { gains, ...(band ? { band } : {}), supplies, devices, ...(raw["nodes"] !== undefined ? { nodes } : {}) };
}

/** An optional { min?, max? } window in one quantity; min above max is an error. */
function readWindow(ctx: ResolveContext, raw: unknown, path: PathSegment[], quantity: Quantity, what: string): ValueWindow | undefined {
  if (raw === undefined) return undefined;
  const o = asObj(raw);
  const min = readOptional(ctx, o, "min", path, quantity, what);
  const max = readOptional(ctx, o, "max", path, quantity, what);
  if (min !== undefined && max !== undefined && min > max) {
    ctx.error(path, `${what}: min is above max`, "give min ≤ max");
    return undefined;
  }
  if (min === undefined && max === undefined) return undefined;
  return { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
}

/** Resolves a schema-valid tree. Returns the circuit (possibly with errors in ctx) — callers check ctx.errors. */
export function resolveCircuit(ctx: ResolveContext, root: Obj, library: ReadonlyMap<string, Model> = new Map()): Circuit {
  ctx.parameters = resolveParameters(ctx, root["parameters"] as Obj | undefined);
  let temperature: number = D.DEFAULT_TEMPERATURE_K;
  if (root["temperature"] !== undefined) {
    const t = readValue(ctx, root["temperature"], ["temperature"], "temperature", "`temperature`");
    if (t !== undefined) {
      temperature = t;
      if (t <= 0) ctx.error(["temperature"], `\`temperature\` ${t} K is at or below absolute zero`, "write e.g. 25 °C");
      else if (t > D.MAX_TEMPERATURE_K) ctx.error(["temperature"], `\`temperature\` ${(t - 273.15).toPrecision(4)} °C is beyond what the device models hold (at most ${D.MAX_TEMPERATURE_K - 273.15} °C)`, "semiconductor ratings end near 150–200 °C; write the ambient the board sees");
      else if (typeof root["temperature"] === "number" && t < D.SUSPICIOUS_KELVIN_BELOW)
        ctx.warn(["temperature"], `\`temperature: ${t}\` is read as ${t} K (a bare number is kelvin)`, `write "${t} °C" if Celsius was meant`);
    }
  }
  const ground = root["ground"] !== undefined ? nodeName(ctx, ["ground"], root["ground"]) : D.DEFAULT_GROUND;
  const models = new Map<string, Model>(library);
  for (const [id, m] of Object.entries(asObj(root["models"]))) {
    const shared = library.get(id);
    if (shared)
      ctx.warn(
        ["models", id],
        `model \`${id}\` overrides the library model of the same id (${shared.pos.file}:${shared.pos.line})`,
        "use the library's model, or give this one its own id if it is a different part",
      );
    const model = resolveModel(ctx, id, asObj(m));
    if (model) models.set(id, model);
  }
  const components: Component[] = [];
  (root["components"] as Obj[]).forEach((c, i) => {
    const comp = resolveComponent(ctx, c, i);
    if (comp) components.push(comp);
  });
  const nodeSet = new Set<string>();
  for (const c of components) for (const n of Object.values(c.pins)) nodeSet.add(n);
  nodeSet.delete(ground);
  const specs = resolveSpecs(ctx, asObj(root["specs"]), ground);
  const overrides: CircuitRuleOverride[] = Object.entries(asObj(root["review"])).map(([rule, o]) => ({
    rule,
    options: asObj(asObj(o)["options"]),
    reason: String(asObj(o)["reason"]),
    pos: ctx.pos(["review", rule], true),
  }));
  return deepFreeze({
    file: ctx.file,
    name: String(root["name"]),
    ...(typeof root["description"] === "string" ? { description: root["description"] } : {}),
    temperature,
    ground,
    parameters: ctx.parameters,
    models,
    components,
    nodes: [...nodeSet].sort(),
    specs,
    overrides,
    warnings: [...ctx.warnings],
    pos: ctx.pos(["name"]),
  });
}
