// The textbook gain formula of each stage type, node to node (input terminal to output
// terminal), with the resistances seen at the terminals. The forms are the standard hybrid-π and
// square-law small-signal results, as in Sedra & Smith, "Microelectronic Circuits", chapters on
// single-stage amplifiers and the differential pair (quoted from memory):
//   common emitter      vc/vb = −α·R_C / (re + R_E)         (= −gm·R_C / (1 + gm·R_E) for α→1)
//   common collector    ve/vb = R_E / (re + R_E)
//   common base         vc/ve = α·R_C / re                  (base at AC ground)
//   common source       vd/vg = −gm·R_D / (1 + gm·R_S)
//   common drain        vs/vg = R_S / (R_S + 1/gm)
//   common gate         vd/vs = gm·R_D                      (gate at AC ground)
//   differential pair   vc/vb1 = ±α·R_C / (2·re), ±gm·R_D / 2 (matched halves, the other input
//                       at AC ground, tail resistance ≫ re; + at the other half's collector/drain)
// All neglect ro (unless the output terminal sees no resistor at all, where ro alone is the load,
// as with an active load) and the body effect; re = rπ/(β+1) = α/gm.

import { formatSiPrefixed } from "../../units/si-format.js";
import type { StageBias, StageConfiguration, StageFormula } from "./types.js";

export const FORMULA_SOURCE = "Sedra & Smith, Microelectronic Circuits, single-stage amplifiers and the differential pair (from memory)";

/** Resistances at the stage's terminals (null = open). */
export interface FormulaResistances {
  /** At the base/gate. */
  readonly control: number | null;
  /** In the emitter/source. */
  readonly common: number | null;
  /** At the collector/drain taken as output. */
  readonly output: number | null;
}

export interface FormulaOptions {
  /** Include gmb (MOSFET whose body is not its source). */
  readonly bodyEffect?: boolean;
  /** Include the base resistance of a common-base stage: re + R_B/(β+1). */
  readonly baseResistance?: boolean;
}

const ohm = (r: number): string => formatSiPrefixed(r, "Ω", { significant: 3 });
const num = (v: number): string => String(Number(v.toPrecision(3))).replace("-", "−");

/** Parallel with an open (null) treated as infinite. */
function load(r: number | null, ro: number | null): { value: number; label: string } {
  if (r !== null) return { value: r, label: ohm(r) };
  return ro !== null ? { value: ro, label: `ro ${ohm(ro)} (no resistor: ro is the load)` } : { value: Infinity, label: "∞ (open)" };
}

const ASSUMES: Readonly<Record<StageConfiguration, string>> = {
  "common-emitter": "ro ≫ R_C, capacitors short, device active",
  "common-collector": "ro ≫ R_E, capacitors short, device active",
  "common-base": "base at AC ground, ro ≫ R_C, device active",
  "common-source": "ro ≫ R_D, no body effect, capacitors short, device saturated",
  "common-drain": "ro ≫ R_S, no body effect, device saturated",
  "common-gate": "gate at AC ground, ro ≫ R_D, no body effect, device saturated",
  "differential-pair": "matched halves, other input at AC ground, tail ≫ re (1/gm), ro ≫ R_C",
};

export function stageFormula(
  configuration: StageConfiguration,
  bipolar: boolean,
  bias: StageBias,
  r: FormulaResistances,
  pairSign: 1 | -1 | 0,
  options: FormulaOptions = {},
): StageFormula {
  const gm = bias.transconductance;
  const ro = bias.outputResistance;
  const base = { source: FORMULA_SOURCE, assumes: ASSUMES[configuration] };
  if (bipolar) {
    const beta = bias.beta ?? Infinity;
    const alpha = beta / (beta + 1);
    const re = bias.emitterResistance ?? alpha / gm;
    const rc = load(r.output, ro);
    switch (configuration) {
      case "common-emitter": {
        const rE = r.common ?? Infinity;
        return {
          ...base,
          expression: "−α·R_C / (re + R_E)",
          substituted: `−${num(alpha)}·${rc.label} / (${ohm(re)} + ${r.common === null ? "∞" : ohm(rE)})`,
          value: Number.isFinite(rE) ? (-alpha * rc.value) / (re + rE) : 0,
        };
      }
      case "common-collector": {
        const rE = load(r.common, ro);
        return {
          ...base,
          expression: "R_E / (re + R_E)",
          substituted: `${rE.label} / (${ohm(re)} + ${rE.label})`,
          value: Number.isFinite(rE.value) ? rE.value / (re + rE.value) : 1,
        };
      }
      case "common-base": {
        const rB = options.baseResistance ? (r.control ?? Infinity) : 0;
        const denominator = re + rB / (beta + 1);
        return {
          ...base,
          expression: options.baseResistance ? "α·R_C / (re + R_B/(β+1))" : "α·R_C / re",
          substituted: options.baseResistance
            ? `${num(alpha)}·${rc.label} / (${ohm(re)} + ${ohm(rB)}/${num(beta + 1)})`
            : `${num(alpha)}·${rc.label} / ${ohm(re)}`,
          value: (alpha * rc.value) / denominator,
        };
      }
      case "differential-pair":
        return {
          ...base,
          expression: `${pairSign < 0 ? "−" : "+"}α·R_C / (2·re)`,
          substituted: `${pairSign < 0 ? "−" : "+"}${num(alpha)}·${rc.label} / (2·${ohm(re)})`,
          value: (pairSign * alpha * rc.value) / (2 * re),
        };
      default:
        throw new Error(`no bipolar formula for ${configuration}`);
    }
  }
  const gmb = options.bodyEffect ? (bias.bodyTransconductance ?? 0) : 0;
  const gs = gm + gmb; // conductance looking into the source
  const rd = load(r.output, ro);
  const gmText = `${num(gm * 1e3)} mS`;
  const gsText = gmb !== 0 ? `(${num(gm * 1e3)} + ${num(gmb * 1e3)}) mS` : gmText;
  switch (configuration) {
    case "common-source": {
      const rS = r.common ?? Infinity;
      return {
        ...base,
        expression: gmb !== 0 ? "−gm·R_D / (1 + (gm + gmb)·R_S)" : "−gm·R_D / (1 + gm·R_S)",
        substituted: `−${gmText}·${rd.label} / (1 + ${gsText}·${r.common === null ? "∞" : ohm(rS)})`,
        value: Number.isFinite(rS) ? (-gm * rd.value) / (1 + gs * rS) : 0,
      };
    }
    case "common-drain": {
      const rS = load(r.common, ro);
      return {
        ...base,
        expression: gmb !== 0 ? "gm·R_S / (1 + (gm + gmb)·R_S)" : "R_S / (R_S + 1/gm)",
        substituted: gmb !== 0 ? `${gmText}·${rS.label} / (1 + ${gsText}·${rS.label})` : `${rS.label} / (${rS.label} + ${ohm(1 / gm)})`,
        value: Number.isFinite(rS.value) ? (gm * rS.value) / (1 + gs * rS.value) : gm / gs,
      };
    }
    case "common-gate":
      return {
        ...base,
        expression: gmb !== 0 ? "(gm + gmb)·R_D" : "gm·R_D",
        substituted: `${gsText}·${rd.label}`,
        value: gs * rd.value,
      };
    case "differential-pair":
      return {
        ...base,
        expression: `${pairSign < 0 ? "−" : "+"}gm·R_D / 2`,
        substituted: `${pairSign < 0 ? "−" : "+"}${gmText}·${rd.label} / 2`,
        value: (pairSign * gm * rd.value) / 2,
      };
    default:
      throw new Error(`no MOSFET formula for ${configuration}`);
  }
}
