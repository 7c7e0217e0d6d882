// The results document as JSON text: fixed key order, records sorted by key, 2-space indent,
// trailing newline — byte-identical for the same document, whatever order it was built in.
// Non-finite numbers (an open-circuit impedance, ro without Early effect) become null, as JSON has no ∞.
import type { ResultsDocument } from "./document.js";

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

/** How to order one kind of object: its known keys first (in this order), then the rest sorted. */
interface Shape {
  readonly keys: readonly string[];
  readonly children?: Readonly<Record<string, Shape | { readonly items: Shape } | { readonly record: Shape }>>;
}

const FINDING: Shape = {
  keys: ["rule", "severity", "subject", "message", "measured", "limit", "unit", "margin", "scenario", "file", "line", "column", "hint"],
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
  keys: ["file", "name", "status", "operatingPoint", "gains", "scenarios", "findings", "passed"],
  children: {
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

/** The JSON text of a results document (what `--json PATH` writes). */
export function renderJson(doc: ResultsDocument): string {
  return `${JSON.stringify(canonical(doc, DOCUMENT), null, 2)}\n`;
}

/** Parses a results document written by renderJson (for baselines and merges); shape is checked by the caller. */
export function parseJson(text: string): unknown {
  return JSON.parse(text);
}
