// The results document as JSON text: fixed key order, records sorted by key, 2-space indent,
// trailing newline — byte-identical for the same document, whatever order it was built in.
// Non-finite numbers (an open-circuit impedance, ro without Early effect) become null, as JSON has no ∞.
import type { CircuitResult, ResultsDocument, Summary } from "./document.js";
import type { DocumentHead } from "./outline.js";

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

/** How to order one kind of object: its known keys first (in this order), then the rest sorted. */
interface Shape {
  readonly keys: readonly string[];
  readonly children?: Readonly<Record<string, Shape | { readonly items: Shape } | { readonly record: Shape }>>;
}

const SETTING: Shape = { keys: ["parameter", "name", "value", "at", "percent"] };
const CORNER: Shape = { keys: ["label", "parameters"], children: { parameters: { items: SETTING } } };
const FINDING: Shape = {
  keys: ["rule", "severity", "subject", "message", "measured", "limit", "unit", "margin", "scenario", "file", "line", "column", "hint", "corner", "sensitivities"],
  children: { corner: CORNER, sensitivities: { items: { keys: ["parameter", "name", "derivative", "normalised", "perDegree", "low", "high"] } } },
};
const MONTE_CARLO: Shape = {
  keys: ["samples", "seed", "failed", "nonConverged", "yield", "interval", "iterations", "worstSample", "quantities"],
  children: {
    interval: { keys: ["method", "level", "low", "high"] },
    worstSample: { keys: ["scenario", "lowestMargin", "label", "parameters"], children: { parameters: { items: SETTING } } },
    quantities: { items: { keys: ["rule", "subject", "unit", "samples", "min", "p1", "median", "p99", "max", "mean", "sigma"] } },
  },
};
const VARIATION: Shape = {
  keys: ["method", "parameters", "variedParameters", "quantities", "analyses", "sensitivityAnalyses", "corners", "refinementAnalyses", "refinedQuantities"],
};
const PASSED: Shape = { keys: ["rule", "subject", "measured", "limit", "unit", "margin", "scenario"] };
const POINT: Shape = { keys: ["frequency", "re", "im", "magnitude", "db", "phaseDeg"] };
const GAIN: Shape = {
  keys: ["name", "midband", "magnitude", "db", "target", "window", "points", "inputImpedance", "outputImpedance"],
  children: { window: { keys: ["min", "max"] }, points: { items: POINT } },
};
const OPERATING_POINT: Shape = {
  keys: ["nodes", "sources", "devices", "solve"],
  children: {
    nodes: { record: { keys: [] } },
    sources: { record: { keys: ["current", "power", "voltage"] } },
    devices: { record: { keys: ["kind"] } },
    solve: { keys: ["iterations", "residual", "aid"] },
  },
};
const CIRCUIT: Shape = {
  keys: ["file", "name", "status", "operatingPoint", "gains", "scenarios", "findings", "passed", "variation", "monteCarlo"],
  children: {
    variation: VARIATION,
    monteCarlo: MONTE_CARLO,
    operatingPoint: OPERATING_POINT,
    gains: { items: GAIN },
    scenarios: { items: { keys: ["id", "label", "converged"] } },
    findings: { items: FINDING },
    passed: { items: PASSED },
  },
};
const DOCUMENT: Shape = {
  keys: ["format", "tool", "shard", "variation", "rules", "circuits", "summary", "generatedAt"],
  children: {
    tool: { keys: ["name", "version"] },
    shard: { keys: ["index", "count", "total", "digest", "files"] },
    variation: { keys: ["mode", "samples", "seed"] },
    rules: { items: { keys: ["id", "description", "severity", "source", "docs"] } },
    circuits: { items: CIRCUIT },
    summary: {
      keys: ["circuits", "passed", "failed", "errors", "findings", "failOn", "verdict"],
      children: { findings: { keys: ["error", "warning", "note"] } },
    },
  },
};

const PLAIN: Shape = { keys: [] };

function canonical(value: unknown, shape: Shape): Json {
  if (value === null || value === undefined) return null;
  if (typeof value === "number") return Number.isFinite(value) ? (Object.is(value, -0) ? 0 : value) : null;
  if (typeof value === "string" || typeof value === "boolean") return value;
  if (Array.isArray(value)) return value.map((v) => canonical(v, shape));
  if (typeof value !== "object") return null;
  const obj = value as Record<string, unknown>;
  const out: { [key: string]: Json } = {};
  const known = new Set(shape.keys);
  const rest = Object.keys(obj)
    .filter((k) => !known.has(k))
    .sort();
  for (const key of [...shape.keys, ...rest]) {
    if (!(key in obj) || obj[key] === undefined) continue;
    out[key] = canonicalChild(obj[key], shape.children?.[key]);
  }
  return out;
}

function canonicalChild(value: unknown, child: Shape | { items: Shape } | { record: Shape } | undefined): Json {
  if (child === undefined) return canonical(value, PLAIN);
  if ("items" in child) return Array.isArray(value) ? value.map((v) => canonical(v, child.items)) : canonical(value, PLAIN);
  if ("record" in child) {
    if (value === null || typeof value !== "object") return canonical(value, PLAIN);
    const rec = value as Record<string, unknown>;
    const out: { [key: string]: Json } = {};
    for (const k of Object.keys(rec).sort()) if (rec[k] !== undefined) out[k] = canonical(rec[k], child.record);
    return out;
  }
  return canonical(value, child);
}

/** Where the circuits go in the document's text: the top-level key, as JSON.stringify indents it. */
const CIRCUITS_MARK = '\n  "circuits": []';

/** The document's text without circuits, cut where they go: [before the array's end, from its end on]. */
function around(doc: Omit<ResultsDocument, "summary" | "circuits"> & { summary?: ResultsDocument["summary"] }): [string, string] {
  const text = JSON.stringify(canonical({ ...doc, circuits: [] }, DOCUMENT), null, 2);
  const at = text.indexOf(CIRCUITS_MARK);
  const cut = at + CIRCUITS_MARK.length - 1;
  return [text.slice(0, cut), text.slice(cut)];
}

/**
 * The results document as a stream of text: `start` (everything before the first circuit), one
 * `circuit` per (normalised) circuit result in document order, and `end` with the summary. Joined,
 * they are exactly renderJson of the same document, so a run can write its report while results
 * arrive and keep none of them.
 */
export function jsonStart(head: DocumentHead): string {
  return around(head)[0];
}

/** One circuit's text, indented for its place in the circuits array (first one included: `first`). */
export function jsonCircuit(c: CircuitResult, first: boolean): string {
  return `${first ? "" : ","}\n    ${JSON.stringify(canonical(c, CIRCUIT), null, 2).replace(/\n/g, "\n    ")}`;
}

/** Closes the circuits array (`circuits` of them were written) and writes the summary. */
export function jsonEnd(head: DocumentHead, summary: Summary, circuits: number): string {
  return `${circuits > 0 ? "\n  " : ""}${around({ ...head, summary })[1]}\n`;
}

/** The JSON text of a results document (what `--json PATH` writes). */
export function renderJson(doc: ResultsDocument): string {
  const { circuits, summary, ...head } = doc;
  return jsonStart(head) + circuits.map((c, i) => jsonCircuit(c, i === 0)).join("") + jsonEnd(head, summary, circuits.length);
}

/** Parses a results document written by renderJson (for baselines and merges); shape is checked by the caller. */
export function parseJson(text: string): unknown {
  return JSON.parse(text);
}
