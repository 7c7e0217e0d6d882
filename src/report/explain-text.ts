// The hand-analysis chain of a gain as plain text, for `opgate inspect --explain` and as the
// shared wording of the markdown and HTML reports. A pure function of the results document's
// explanation entry. Ids and node names come from the circuit file: they pass through inertText.
import { formatSiPrefixed } from "../units/si-format.js";
import type { ExplanationEntry } from "./document.js";
import { inertText } from "./untrusted.js";

type Stage = ExplanationEntry["stages"][number];

const CONFIGURATION: Readonly<Record<Stage["configuration"], string>> = {
  "common-emitter": "common emitter",
  "common-base": "common base",
  "common-collector": "common collector (emitter follower)",
  "common-source": "common source",
  "common-gate": "common gate",
  "common-drain": "common drain (source follower)",
  "differential-pair": "differential pair",
};

export const si = (v: number | null, unit: string): string => (v === null ? (unit === "Ω" ? "open" : "—") : formatSiPrefixed(v, unit, { significant: 3 }));
export const gainText = (v: number | null): string => (v === null ? "unbounded" : String(Number(v.toPrecision(3))).replace("-", "−"));

export function stageTitle(s: Stage): string {
  const who = s.partner ? `${s.device}/${s.partner}` : s.device;
  const route = s.input.device === s.output.device ? `${s.input.terminal} → ${s.output.terminal}` : `${s.input.terminal} of ${s.input.device} → ${s.output.terminal} of ${s.output.device}`;
  return inertText(`${who}: ${CONFIGURATION[s.configuration]}, ${route}; ${s.kind}, ${s.region}`);
}

export function biasText(s: Stage): string {
  const b = s.bias;
  const bipolar = s.kind === "npn" || s.kind === "pnp";
  return bipolar
    ? `IC ${si(b.current, "A")} · gm ${si(b.transconductance, "S")} · re ${si(b.emitterResistance, "Ω")} · rπ ${si(b.inputResistance, "Ω")} · ro ${b.outputResistance === null ? "∞" : si(b.outputResistance, "Ω")} · β ${gainText(b.beta)}`
    : `ID ${si(b.current, "A")} · gm ${si(b.transconductance, "S")} · 1/gm ${si(b.inverseTransconductance, "Ω")} · ro ${b.outputResistance === null ? "∞" : si(b.outputResistance, "Ω")}${b.bodyTransconductance ? ` · gmb ${si(b.bodyTransconductance, "S")}` : ""}`;
}

export function seenText(s: Stage): string {
  return s.resistances
    .map((r) => {
      const loaded = r.loaded !== r.own && !(r.own !== null && r.loaded !== null && Math.abs(r.loaded / r.own - 1) < 1e-3) ? ` (${si(r.loaded, "Ω")} with the other transistors)` : "";
      return inertText(`${r.terminal} ${si(r.own, "Ω")}${loaded}`);
    })
    .join(" · ");
}

export function formulaText(s: Stage): string {
  return `${s.formula.expression} = ${s.formula.substituted} = ${gainText(s.formula.value)}`;
}

export function verdictText(s: Stage): string {
  const diff = s.difference === null ? "" : ` (formula ${s.difference < 0.001 ? "within 0.1 %" : `off by ${Number((s.difference * 100).toPrecision(2))} %`})`;
  const exact = s.exact.im !== null && s.exact.im !== 0 && s.exact.magnitude !== null ? `${gainText(s.exact.magnitude)} ∠${Math.round(s.exact.phaseDeg ?? 0)}°` : gainText(s.exact.re);
  return `${exact}${diff}${s.agrees ? " ✓" : ""}`;
}

export function chainHeadline(e: ExplanationEntry): string {
  const at = e.frequency === null ? "midband" : si(e.frequency, "Hz");
  return inertText(`gain ${e.gain} at ${at}: exact ${gainText(e.exact)} V/V; product of the stage formulas ${gainText(e.formulaProduct)} V/V`);
}

/** Couplings worth a line: any that is not 1 within 0.1 %. */
export function notableCouplings(e: ExplanationEntry): ExplanationEntry["couplings"] {
  return e.couplings.filter((c) => c.magnitude === null || Math.abs(c.magnitude - 1) > 1e-3 || (c.re ?? 0) < 0);
}

export function renderExplanationText(e: ExplanationEntry): string {
  const lines = [chainHeadline(e)];
  if (e.note) lines.push(`  ${inertText(e.note)}`);
  e.stages.forEach((s, i) => {
    const c = e.couplings[i];
    if (c && notableCouplings(e).includes(c)) lines.push(inertText(`  passive ${c.from} → ${c.to}: × ${gainText(c.magnitude)}${(c.re ?? 0) < 0 ? " (inverted)" : ""}`));
    lines.push(`  ${i + 1}. ${stageTitle(s)}`);
    lines.push(`     bias     ${biasText(s)}`);
    lines.push(`     seen     ${seenText(s)}`);
    lines.push(`     formula  ${formulaText(s)}`);
    lines.push(`     exact    ${verdictText(s)}`);
    for (const r of s.reasons) lines.push(`     why      ${inertText(r.text)}`);
  });
  const last = e.couplings[e.stages.length];
  if (last && e.stages.length > 0 && notableCouplings(e).includes(last)) lines.push(inertText(`  passive ${last.from} → ${last.to}: × ${gainText(last.magnitude)}`));
  const source = e.stages[0]?.formula.source;
  if (source) lines.push(`  formulas: ${source}; resistances measured on the small-signal network`);
  return `${lines.join("\n")}\n`;
}
