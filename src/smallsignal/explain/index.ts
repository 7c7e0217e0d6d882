// The hand-analysis chain of every gain: stages on the signal path (path.ts), each stage's bias
// from the operating point, the resistances at its terminals measured on the linearised network
// (probe.ts), the textbook formula with those numbers (formulas.ts), the exact node-to-node
// stage gain, and the assumption that fails where the two differ. A pure function of
// (Circuit, OperatingPoint).

import type { Circuit, GainSpec } from "../../circuit/types.js";
import type { BjtPoint, MosPoint, OperatingPoint } from "../../solve/types.js";
import { formatSiPrefixed } from "../../units/si-format.js";
import { buildNetwork, MIDBAND, type SmallSignalNetwork, type View } from "../network.js";
import type { ComplexValue } from "../types.js";
import { stageFormula, type FormulaResistances } from "./formulas.js";
import { acNodes, findStages, isTransistor, terminalNode, type PathStage, type Transistor } from "./path.js";
import { divide, factorEdited, inputSource, nodeOf, resistanceAt, solveDrive, subtract, voltage, type NetworkEdits } from "./probe.js";
import type { CouplingLink, GainExplanation, Reason, StageBias, StageExplanation, TerminalResistance } from "./types.js";

export type * from "./types.js";

/**
 * "A few percent": formula and exact stage gain within 5 % agree. Hand analysis with α, re and
 * ro neglected is expected to land within a few percent (common practice); a larger gap means
 * one of its assumptions fails here, and the explanation names it.
 */
export const AGREEMENT = 0.05;
/** When no single assumption exceeds AGREEMENT, the shares above 0.5 % are named (smaller ones are rounding). */
const SHARE_SHOWN = 0.005;

const ohm = (r: number | null): string => (r === null ? "open" : formatSiPrefixed(r, "Ω", { significant: 3 }));
const num = (v: number): string => String(Number(v.toPrecision(3))).replace("-", "−");
const hz = (f: number): string => formatSiPrefixed(f, "Hz", { significant: 3 });

function relative(a: ComplexValue | number, b: ComplexValue | number): number | null {
  const x = typeof a === "number" ? { re: a, im: 0 } : a;
  const y = typeof b === "number" ? { re: b, im: 0 } : b;
  const scale = Math.hypot(y.re, y.im);
  if (!(scale > 0) || !Number.isFinite(x.re) || !Number.isFinite(x.im)) return null;
  return Math.hypot(x.re - y.re, x.im - y.im) / scale;
}

const differs = (a: ComplexValue | number, b: ComplexValue | number): boolean => {
  const r = relative(a, b);
  return r === null || r > AGREEMENT;
};

function bipolar(t: Transistor): boolean {
  return t.kind === "npn" || t.kind === "pnp";
}

function biasOf(t: Transistor, op: OperatingPoint): StageBias | null {
  const p = op.devices[t.id];
  if (!p) return null;
  const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);
  if (p.kind === "npn" || p.kind === "pnp") {
    const b = p as BjtPoint;
    return {
      current: b.collectorCurrent,
      transconductance: b.transconductance,
      emitterResistance: b.emitterResistance,
      inverseTransconductance: 1 / b.transconductance,
      inputResistance: finite(b.inputResistance),
      outputResistance: finite(b.outputResistance),
      beta: b.transconductance * b.inputResistance,
      bodyTransconductance: null,
    };
  }
  if (p.kind === "nmos" || p.kind === "pmos") {
    const m = p as MosPoint;
    return {
      current: m.drainCurrent,
      transconductance: m.transconductance,
      emitterResistance: null,
      inverseTransconductance: 1 / m.transconductance,
      inputResistance: null,
      outputResistance: finite(m.outputResistance),
      beta: null,
      bodyTransconductance: m.bodyTransconductance,
    };
  }
  return null;
}

/** The device's region, and a sentence when it is not the amplifying one. */
function regionOf(t: Transistor, op: OperatingPoint): { region: string; problem: string | null } {
  const p = op.devices[t.id];
  if (p && (p.kind === "npn" || p.kind === "pnp")) {
    const b = p as BjtPoint;
    if (b.region === "active") return { region: b.region, problem: null };
    return {
      region: b.region,
      problem: `${t.id} is in ${b.region} (VCE = ${num(b.collectorEmitterVoltage)} V, IC = ${formatSiPrefixed(b.collectorCurrent, "A", { significant: 3 })}), not in the active region the formula assumes: the stage does not amplify as designed`,
    };
  }
  if (p && (p.kind === "nmos" || p.kind === "pmos")) {
    const m = p as MosPoint;
    if (m.region === "saturation") return { region: m.region, problem: null };
    return {
      region: m.region,
      problem: `${t.id} is in ${m.region} (VDS = ${num(m.drainSourceVoltage)} V, Vov = ${num(m.overdrive)} V), not in saturation as the formula assumes: the stage does not amplify as designed`,
    };
  }
  return { region: "unknown", problem: null };
}

interface Terminals {
  readonly control: { terminal: "base" | "gate"; node: string };
  readonly common: { terminal: "emitter" | "source"; node: string };
  readonly output: { terminal: "collector" | "drain"; node: string };
}

function terminalsOf(s: PathStage): Terminals {
  const d = s.device;
  const b = bipolar(d);
  return {
    control: { terminal: b ? "base" : "gate", node: terminalNode(d, b ? "base" : "gate") },
    common: { terminal: b ? "emitter" : "source", node: terminalNode(d, b ? "emitter" : "source") },
    output: { terminal: b ? "collector" : "drain", node: s.output.terminal === "emitter" || s.output.terminal === "source" ? terminalNode(d, b ? "collector" : "drain") : s.output.node },
  };
}

function roEdit(net: SmallSignalNetwork, t: Transistor, op: OperatingPoint): NetworkEdits["withoutRo"] {
  const p = op.devices[t.id];
  const ro = p && "outputResistance" in p ? p.outputResistance : Infinity;
  if (!Number.isFinite(ro) || !(ro > 0)) return new Map();
  const b = bipolar(t);
  const a = nodeOf(net, terminalNode(t, b ? "collector" : "drain"));
  const e = nodeOf(net, terminalNode(t, b ? "emitter" : "source"));
  return new Map([[t.id, { a, b: e, g: 1 / ro }]]);
}

/** Node voltages of the gain's drive for a set of nodes, on the given view and edits; null when singular. */
function drive(net: SmallSignalNetwork, circuit: Circuit, spec: GainSpec, view: View, nodes: readonly string[], edits: NetworkEdits = {}): Map<string, ComplexValue> | null {
  const source = inputSource(circuit, spec);
  if (!source || !factorEdited(net, view, edits)) return null;
  solveDrive(net, source);
  return new Map(nodes.map((n) => [n, voltage(net, n)]));
}

function ratio(v: Map<string, ComplexValue> | null, to: string, from: string): ComplexValue | null {
  if (!v) return null;
  return divide(v.get(to) as ComplexValue, v.get(from) as ComplexValue);
}

function polar(c: ComplexValue | null): StageExplanation["exact"] {
  const z = c ?? { re: NaN, im: NaN };
  return { re: z.re, im: z.im, magnitude: Math.hypot(z.re, z.im), phaseDeg: (Math.atan2(z.im, z.re) * 180) / Math.PI };
}

/** Transistors other than the stage's own with a pin on `node` (the ones that load it). */
function neighbours(circuit: Circuit, node: string, own: ReadonlySet<string>): string[] {
  return circuit.components
    .filter((c): c is Transistor => isTransistor(c) && !own.has(c.id))
    .filter((c) => Object.values(c.pins as unknown as Record<string, string>).includes(node))
    .map((c) => c.id);
}

export function explainGains(circuit: Circuit, op: OperatingPoint, only?: ReadonlySet<string>): GainExplanation[] {
  const out: GainExplanation[] = [];
  for (const spec of circuit.specs.gains) {
    if (only && !only.has(spec.name)) continue;
    const e = explainGain(circuit, op, spec);
    if (e) out.push(e);
  }
  return out;
}

function empty(spec: GainSpec, note: string, exact = NaN): GainExplanation {
  return { gain: spec.name, frequency: spec.frequency ?? null, stages: [], couplings: [], formulaProduct: null, exact, note };
}

export function explainGain(circuit: Circuit, op: OperatingPoint, spec: GainSpec): GainExplanation | null {
  const source = inputSource(circuit, spec);
  if (!source) return null;
  const built = buildNetwork(circuit, op);
  if (!built.ok) return empty(spec, built.message);
  const net = built.network;
  const from = source.kind === "voltage-source" ? source.pins.plus : source.pins.to;
  const fromMinus = source.kind === "voltage-source" ? source.pins.minus : source.pins.from;
  const view: View = spec.frequency !== undefined ? { kind: "frequency", frequency: spec.frequency } : MIDBAND;
  const ac = acNodes(circuit, spec.input);
  const path = findStages(circuit, ac, from, spec.output.plus);

  const stageNodes = (path ?? []).flatMap((s) => [s.input.node, s.output.node]);
  const nodes = [...new Set([from, fromMinus, spec.output.plus, spec.output.minus, ...stageNodes])];
  const atView = drive(net, circuit, spec, view, nodes);
  if (!atView) return empty(spec, `the small-signal network is singular ${view.kind === "midband" ? "at midband" : `at ${hz(spec.frequency as number)}`}`);
  const vin = subtract(atView.get(from) as ComplexValue, atView.get(fromMinus) as ComplexValue);
  const total = divide(subtract(atView.get(spec.output.plus) as ComplexValue, atView.get(spec.output.minus) as ComplexValue), vin) ?? { re: NaN, im: 0 };
  const exactTotal = view.kind === "midband" ? total.re : Math.sign(total.re || 1) * Math.hypot(total.re, total.im);
  if (!path) return empty(spec, `no signal path from \`${from}\` to \`${spec.output.plus}\` through resistors and transistors at midband`, exactTotal);
  if (path.length === 0) return empty(spec, `no transistor on the signal path from \`${from}\` to \`${spec.output.plus}\`: the gain is that of the passive network`, exactTotal);

  const atMid = view.kind === "midband" ? atView : drive(net, circuit, spec, MIDBAND, nodes);
  // Resistances "own": every transistor out (one factorisation serves all stages).
  const allTransistors = new Set(circuit.components.filter(isTransistor).map((c) => c.id));
  const ownFactored = factorEdited(net, MIDBAND, { remove: allTransistors });
  const ownR = new Map<string, number | null>();
  const terminals = path.map(terminalsOf);
  for (const t of terminals) for (const n of [t.control.node, t.common.node, t.output.node]) if (!ownR.has(n)) ownR.set(n, ownFactored ? resistanceAt(net, n) : null);

  const stages: StageExplanation[] = [];
  path.forEach((s, i) => {
    const t = terminals[i] as Terminals;
    const bias = biasOf(s.device, op);
    if (!bias) return;
    const own = new Set([s.device.id, ...(s.partner ? [s.partner.id] : [])]);
    const loadedFactored = factorEdited(net, MIDBAND, { remove: own });
    const loaded = (n: string): number | null => (loadedFactored ? resistanceAt(net, n) : null);
    const resistances: TerminalResistance[] = [t.control, t.common, t.output].map((x) => ({
      terminal: x.terminal,
      node: x.node,
      own: ownR.get(x.node) ?? null,
      loaded: loaded(x.node),
    }));
    const rOwn: FormulaResistances = { control: resistances[0]!.own, common: resistances[1]!.own, output: resistances[2]!.own };
    const rLoaded: FormulaResistances = { control: resistances[0]!.loaded, common: resistances[1]!.loaded, output: resistances[2]!.loaded };
    const isBipolar = bipolar(s.device);
    const formula = stageFormula(s.configuration, isBipolar, bias, rOwn, s.pairSign);
    const formulaLoaded = stageFormula(s.configuration, isBipolar, bias, rLoaded, s.pairSign).value;

    const exact = ratio(atView, s.output.node, s.input.node);
    const exactMid = ratio(atMid, s.output.node, s.input.node);
    const withoutRo = new Map([...(roEdit(net, s.device, op) ?? new Map()), ...(s.partner ? (roEdit(net, s.partner, op) ?? new Map()) : [])]);
    const noRo = withoutRo.size > 0 ? ratio(drive(net, circuit, spec, MIDBAND, nodes, { withoutRo }), s.output.node, s.input.node) : exactMid;

    const region = regionOf(s.device, op);
    const partnerRegion = s.partner ? regionOf(s.partner, op) : null;
    const difference = exact ? relative(formula.value, exact) : null;
    const agrees = difference !== null && difference <= AGREEMENT && region.problem === null;
    const reasons: Reason[] = [];
    const say = (code: Reason["code"], text: string): void => void reasons.push({ code, text });

    if (region.problem) say("region", region.problem);
    else if (partnerRegion?.problem) say("region", partnerRegion.problem);
    else if (!agrees && exact) {
      // 1. A capacitor that is not a short at the gain's frequency.
      if (view.kind === "frequency" && exactMid && differs(exact, exactMid)) {
        const culprit = bypassCulprit(net, circuit, spec, view, nodes, s, exactMid);
        const which = culprit ? `${culprit.id} (${formatSiPrefixed(culprit.value, "F", { significant: 3 })}, |Z| = ${ohm(culprit.impedance)} at ${hz(view.frequency)})` : "a coupling or bypass capacitor";
        say("bypass", `${which} is not a short at ${hz(view.frequency)}: the exact stage gain is ${num(polar(exact).magnitude)} there against ${num(exactMid.re)} with capacitors shorted`);
      }
      // 2. ro of the stage's own device(s) not negligible.
      if (exactMid && noRo && differs(exactMid, noRo)) {
        const ro = bias.outputResistance;
        const outR = rOwn.output;
        say(
          "output-resistance",
          `ro is not negligible: ro = ${ohm(ro)} against ${isBipolar ? "R_C" : "R_D"} = ${ohm(outR)} at the ${t.output.terminal}; without ro the exact stage gain would be ${num(noRo.re)}, with it ${num(exactMid.re)}`,
        );
      }
      // 3. The next stage (or another transistor) loads a terminal.
      if (differs(formulaLoaded, formula.value)) {
        const moved = [t.output, t.common, t.control]
          .map((x) => ({ x, r: resistances.find((q) => q.node === x.node && q.terminal === x.terminal)! }))
          .find(({ r }) => differs(r.loaded ?? Infinity, r.own ?? Infinity)) ?? { x: t.output, r: resistances[2]! };
        const by = neighbours(circuit, moved.x.node, own);
        const next = path[i + 1];
        const who = by.length > 0 ? by.join(", ") : next ? next.device.id : "other transistors";
        const role = next && by.includes(next.device.id) ? "the next stage" : "another transistor";
        say(
          "loading",
          `${role} (${who}) loads the ${moved.x.terminal}: it sees ${ohm(moved.r.loaded)} with ${who} in place, ${ohm(moved.r.own)} from the resistors alone; the formula then gives ${num(formulaLoaded)}`,
        );
      }
      // 4. Body effect (MOSFET whose body is not its source).
      let corrected = formulaLoaded;
      if (!isBipolar && terminalNode(s.device, "body" as never) !== terminalNode(s.device, "source") && (bias.bodyTransconductance ?? 0) > 0) {
        const withBody = stageFormula(s.configuration, false, bias, rLoaded, s.pairSign, { bodyEffect: true }).value;
        if (differs(withBody, corrected)) say("body-effect", `the body effect is not negligible: gmb = ${num((bias.bodyTransconductance ?? 0) * 1e3)} mS against gm = ${num(bias.transconductance * 1e3)} mS; with it the formula gives ${num(withBody)}`);
        corrected = withBody;
      }
      // 5. A common-base stage whose base is not at AC ground.
      if (s.configuration === "common-base") {
        const withRb = stageFormula(s.configuration, true, bias, rLoaded, s.pairSign, { baseResistance: true }).value;
        if (differs(withRb, corrected)) say("base-not-grounded", `the base is not at AC ground: R_B = ${ohm(rLoaded.control)} adds R_B/(β+1) = ${ohm((rLoaded.control ?? Infinity) / ((bias.beta ?? Infinity) + 1))} to re = ${ohm(bias.emitterResistance)}; the formula then gives ${num(withRb)}`);
        corrected = withRb;
      }
      // Whatever is left is not one of the hand method's named assumptions.
      const target = noRo ?? exactMid;
      if (target && differs(corrected, target)) {
        say(
          "unexplained",
          `with every correction above the formula gives ${num(corrected)} against ${num(target.re)} (exact, capacitors shorted, ro removed): the stage has a path the single-stage formula leaves out (feedback from output to input, or signal reaching the output around the device)`,
        );
      }
      if (reasons.length === 0) {
        // No single assumption is off by more than the agreement band: name the shares.
        const shares: { code: Reason["code"]; what: string; share: number }[] = [
          { code: "bypass" as const, what: "capacitors at this frequency", share: view.kind === "frequency" && exactMid ? relative(exact, exactMid) : 0 },
          { code: "output-resistance" as const, what: "ro", share: exactMid && noRo ? relative(exactMid, noRo) : 0 },
          { code: "loading" as const, what: "loading by the other transistors", share: relative(formulaLoaded, formula.value) },
          { code: "unexplained" as const, what: "paths the formula leaves out", share: target ? relative(corrected, target) : 0 },
        ]
          .map((x) => ({ ...x, share: x.share ?? 0 }))
          .filter((x) => x.share > SHARE_SHOWN);
        shares.sort((a, b) => b.share - a.share);
        if (shares.length > 0) {
          say(
            shares[0]!.code,
            `no single assumption is off by more than ${AGREEMENT * 100} %, but together they are: ${shares.map((x) => `${x.what} ${num(x.share * 100)} %`).join(", ")}`,
          );
        }
      }
    }
    stages.push({
      device: s.device.id,
      partner: s.partner?.id ?? null,
      kind: s.device.kind,
      configuration: s.configuration,
      input: { terminal: s.input.terminal, node: s.input.node, device: s.input.device.id },
      output: { terminal: s.output.terminal, node: s.output.node, device: s.output.device.id },
      region: region.region,
      bias,
      resistances,
      formula,
      formulaLoaded,
      exact: polar(exact),
      difference,
      agrees,
      reasons,
    });
  });

  const couplings: CouplingLink[] = [];
  let prev = from;
  for (const s of path) {
    couplings.push(link(atView, prev, s.input.node));
    prev = s.output.node;
  }
  const outDiff = subtract(atView.get(spec.output.plus) as ComplexValue, atView.get(spec.output.minus) as ComplexValue);
  const last = divide(outDiff, atView.get(prev) as ComplexValue);
  couplings.push({ from: prev, to: spec.output.plus, ...(last ? { re: last.re, im: last.im } : { re: NaN, im: NaN }), magnitude: last ? Math.hypot(last.re, last.im) : NaN });
  // The first coupling is per unit of the source's drive (vin), not of V(from).
  const scale = divide(atView.get(from) as ComplexValue, vin);
  let product: ComplexValue = scale ?? { re: 1, im: 0 };
  for (const c of couplings) product = mul(product, c);
  for (const s of stages) product = mul(product, { re: s.formula.value, im: 0 });
  const formulaProduct = view.kind === "midband" ? product.re : Math.sign(product.re || 1) * Math.hypot(product.re, product.im);
  return {
    gain: spec.name,
    frequency: spec.frequency ?? null,
    stages,
    couplings,
    formulaProduct: Number.isFinite(formulaProduct) ? formulaProduct : null,
    exact: exactTotal,
    note: stages.length < path.length ? "some stages have no operating-point record and are left out" : null,
  };
}

function mul(a: ComplexValue, b: ComplexValue): ComplexValue {
  return { re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re };
}

function link(v: Map<string, ComplexValue>, from: string, to: string): CouplingLink {
  const r = divide(v.get(to) as ComplexValue, v.get(from) as ComplexValue);
  return { from, to, re: r?.re ?? NaN, im: r?.im ?? NaN, magnitude: r ? Math.hypot(r.re, r.im) : NaN };
}

/** The capacitor whose short, alone, brings the stage's gain at `view` closest to its midband value. */
function bypassCulprit(
  net: SmallSignalNetwork,
  circuit: Circuit,
  spec: GainSpec,
  view: Extract<View, { kind: "frequency" }>,
  nodes: readonly string[],
  s: PathStage,
  target: ComplexValue,
): { id: string; value: number; impedance: number } | null {
  let best: { id: string; value: number; impedance: number; err: number } | null = null;
  for (const c of circuit.components) {
    if (c.kind !== "capacitor") continue;
    const g = ratio(drive(net, circuit, spec, view, nodes, { shorted: new Set([c.id]) }), s.output.node, s.input.node);
    const err = g ? relative(g, target) : null;
    if (err !== null && (best === null || err < best.err)) {
      best = { id: c.id, value: c.value.nominal, impedance: 1 / (2 * Math.PI * view.frequency * c.value.nominal), err };
    }
  }
  return best;
}
