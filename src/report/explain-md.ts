// The markdown part of the explanation: for each gain judged out of its window (or its band), a
// collapsed block with the hand-analysis chain (one list item per stage: bias, resistances seen,
// the textbook formula with numbers against the exact stage gain, and why they differ) and the
// frequency response as Mermaid `xychart-beta` charts, which GitHub renders natively in a
// ```mermaid block (no image hosting; from memory: GitHub renders Mermaid since 2022 and
// xychart-beta since Mermaid 10.6). Mermaid's xychart has no log axis: the sweep points are
// log-spaced, so as evenly spaced categories they read as a log-frequency axis. Built as mdast
// nodes for the report's serializer (markdown.ts); every file text goes through `untrusted`.
import type { Code, Html, List, ListItem, Paragraph, PhrasingContent, RootContent } from "mdast";
import type { Finding, GainEntry } from "./document.js";

/** What the explanation reads of a gain (a whole GainEntry, or its outline). */
type ExplainedGain = Pick<GainEntry, "name" | "window" | "response" | "explanation">;
import { biasText, chainHeadline, formulaText, seenText, si, stageTitle, verdictText } from "./explain-text.js";
import { inertText } from "./untrusted.js";

/** Rules whose findings about a gain open its explanation. */
export const EXPLAINED_RULES: ReadonlySet<string> = new Set(["gain-window", "band-edge", "band-edges"]);
/** Points per Mermaid chart: enough for the shape, few enough to stay short in a comment. */
export const MERMAID_POINTS_MAX = 25;

type Untrusted = (value: string) => string;

const text = (value: string): PhrasingContent => ({ type: "text", value });
const code = (value: string): PhrasingContent => ({ type: "inlineCode", value: inertText(value) });
const strong = (value: string): PhrasingContent => ({ type: "strong", children: [text(value)] });
const para = (...children: PhrasingContent[]): Paragraph => ({ type: "paragraph", children });
const html = (value: string): Html => ({ type: "html", value });
const item = (...children: Paragraph[]): ListItem => ({ type: "listItem", spread: false, children });
const list = (items: ListItem[], ordered: boolean): List => ({ type: "list", ordered, spread: false, children: items });

/** The gains of a circuit that a failing (or any) finding of an explained rule names. */
export function explainedGains<G extends ExplainedGain>(c: { readonly findings: readonly Finding[]; readonly gains: readonly G[] }): G[] {
  const named = new Set(c.findings.filter((f) => EXPLAINED_RULES.has(f.rule)).map((f) => f.subject));
  return c.gains.filter((g) => named.has(g.name) && (g.explanation || (g.response && g.response.points.length > 0)));
}

const label = (f: number): string => si(f, "Hz").replace(/ /g, "");
const fixed = (v: number): string => String(Math.round(v * 10) / 10);

/** Mermaid xychart-beta source for magnitude and phase; only our own text (numbers, units) inside. */
export function mermaidCharts(g: ExplainedGain): Code[] {
  const r = g.response;
  const all = (r?.points ?? []).filter((p) => p.db !== null && p.phaseDeg !== null && Number.isFinite(p.db));
  if (!r || all.length < 2) return [];
  const step = Math.ceil(all.length / MERMAID_POINTS_MAX);
  const pts = all.filter((_, i) => i % step === 0 || i === all.length - 1);
  const x = `x-axis "frequency" [${pts.map((p) => `"${label(p.frequency)}"`).join(", ")}]`;
  const marks: string[] = [];
  if (r.band) marks.push(`band ${label(r.band.low)}–${label(r.band.high)}`);
  const corners = [r.lowCorner, r.highCorner].filter((f): f is number => f !== null).map(label);
  if (corners.length > 0) marks.push(`−3 dB at ${corners.join(", ")}`);
  const lo = Math.min(Math.abs(g.window.min), Math.abs(g.window.max));
  const hi = Math.max(Math.abs(g.window.min), Math.abs(g.window.max));
  // The window's edges in dB (a window that spans zero has no lower edge on a dB scale).
  const edges: number[] = [];
  if (hi > 0) edges.push(20 * Math.log10(hi));
  if (lo > 0 && !(g.window.min <= 0 && g.window.max >= 0)) edges.push(20 * Math.log10(lo));
  if (edges.length > 0) marks.push("flat lines: the gain window");
  const dbs = pts.map((p) => p.db as number);
  // The axis holds the response and both window edges (a window below the response was drawn
  // off the chart), at most 120 dB tall; whatever is below that sits on the bottom edge.
  const top = Math.ceil((Math.max(...dbs, ...edges) + 3) / 10) * 10;
  const bottom = Math.max(Math.floor((Math.min(...dbs, ...edges) - 3) / 10) * 10, top - 120);
  const clamp = (v: number): string => fixed(Math.max(bottom, v));
  const magnitude = [
    "xychart-beta",
    `  title "Magnitude, dB (${marks.join("; ")})"`,
    `  ${x}`,
    `  y-axis "dB" ${bottom} --> ${top}`,
    `  line [${pts.map((p) => clamp(p.db as number)).join(", ")}]`,
    ...edges.map((e) => `  line [${pts.map(() => clamp(e)).join(", ")}]`),
  ].join("\n");
  const phase = ["xychart-beta", '  title "Phase, degrees"', `  ${x}`, '  y-axis "degrees" -180 --> 180', `  line [${pts.map((p) => fixed(p.phaseDeg as number)).join(", ")}]`].join("\n");
  return [
    { type: "code", lang: "mermaid", value: magnitude },
    { type: "code", lang: "mermaid", value: phase },
  ];
}

/** The chain as a list: one item per stage, four short lines each. */
export function explanationNodes(g: ExplainedGain, untrusted: Untrusted): RootContent[] {
  const e = g.explanation;
  if (!e) return [];
  const out: RootContent[] = [para(text(untrusted(chainHeadline(e))))];
  if (e.note) out.push(para(text(untrusted(e.note))));
  const items = e.stages.map((s) => {
    const lines: PhrasingContent[] = [
      strong(untrusted(stageTitle(s))),
      { type: "break" },
      text(`bias: ${biasText(s)}`),
      { type: "break" },
      text(`seen: ${untrusted(seenText(s))}`),
      { type: "break" },
      text(`${formulaText(s)}; exact ${verdictText(s)}`),
    ];
    for (const r of s.reasons) lines.push({ type: "break" }, text(`why: ${untrusted(r.text)}`));
    return item(para(...lines));
  });
  if (items.length > 0) out.push(list(items, true));
  const source = e.stages[0]?.formula.source;
  if (source) out.push(para(text(`Formulas: ${source}. Resistances measured on the small-signal network.`)));
  return out;
}

/** Collapsed blocks, one per explained gain, for the failing circuit's findings section. */
export function explanationBlocks(c: { readonly findings: readonly Finding[]; readonly gains: readonly ExplainedGain[] }, untrusted: Untrusted): RootContent[] {
  const out: RootContent[] = [];
  for (const g of explainedGains(c)) {
    const stages = g.explanation?.stages.length ?? 0;
    out.push(
      html(`<details><summary>Hand analysis and frequency response of this gain (${stages} ${stages === 1 ? "stage" : "stages"})</summary>`),
      para(text("Gain "), code(g.name)),
      ...explanationNodes(g, untrusted),
      ...mermaidCharts(g),
      html("</details>"),
    );
  }
  return out;
}
