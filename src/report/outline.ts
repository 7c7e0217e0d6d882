// What the reporters that see the whole run at once (markdown, SARIF, annotations, console, the
// baseline comparison, the summary) read of each circuit: its outline. A run streams each full
// result to the JSON and JUnit reports as it arrives and keeps only the outline, so memory grows
// with the findings of a run, not with its operating points, responses and hand analyses.
//
// The outline types are subsets of the results document's, so a whole ResultsDocument is also a
// ReportDocument: the same reporter gives the same text for a document built in memory and for
// the outlines of a streamed run (the compiler keeps the reporters to these fields).
import { EXPLAINED_RULES } from "./explain-md.js";
import { parseTagged, stringifyTagged } from "./tagged-json.js";
import type { CircuitResult, CircuitStatus, DeviceEntry, Finding, GainEntry, MonteCarloEntry, OperatingPointEntry, ResultsDocument, ScenarioEntry, Summary } from "./document.js";

/** A gain as the reports read it; the response and hand analysis only where a finding opens them. */
export type GainOutline = Pick<GainEntry, "name" | "midband" | "magnitude" | "db" | "target" | "window" | "inputImpedance" | "outputImpedance" | "response" | "explanation">;

export type OperatingPointOutline = Pick<OperatingPointEntry, "nodes" | "sources" | "devices" | "solve">;

export type MonteCarloOutline = Omit<MonteCarloEntry, "quantities">;

export interface CircuitOutline {
  readonly file: string;
  readonly name: string | null;
  readonly status: CircuitStatus;
  readonly operatingPoint: OperatingPointOutline | null;
  readonly gains: readonly GainOutline[];
  readonly scenarios: readonly ScenarioEntry[];
  readonly findings: readonly Finding[];
  readonly monteCarlo?: MonteCarloOutline;
  readonly libraries?: CircuitResult["libraries"];
}

/** Everything of a results document but its circuits and summary (the part known before any file is checked). */
export type DocumentHead = Omit<ResultsDocument, "circuits" | "summary">;

/** A results document, or the outlines of a streamed run: what the whole-run reporters take. */
export interface ReportDocument extends DocumentHead {
  readonly circuits: readonly CircuitOutline[];
  readonly summary: Summary;
}

/** The device fields the reports show (markdown's transistor table, the baseline's headroom). */
const DEVICE_FIELDS = [
  "kind",
  "region",
  "collectorCurrent",
  "drainCurrent",
  "collectorEmitterVoltage",
  "drainSourceVoltage",
  "headroom",
  "transconductance",
  "power",
] as const;
const TRANSISTOR_KINDS: ReadonlySet<string> = new Set(["npn", "pnp", "nmos", "pmos"]);

function deviceOutline(d: DeviceEntry): DeviceEntry {
  const out: Record<string, number | string | null> = { kind: d.kind };
  for (const key of DEVICE_FIELDS) if (key in d) out[key] = d[key]!;
  return out as DeviceEntry;
}

/** An outline's parts: its light fields as a value, its operating point and gains as (tagged) JSON text. */
export interface OutlineParts {
  readonly light: Omit<CircuitOutline, "operatingPoint" | "gains">;
  readonly operatingPoint: string;
  readonly gains: string;
}

/** The parts of the outline of a (normalised) circuit result, or of an outline. */
export function outlineParts(c: CircuitOutline): OutlineParts {
  const explained = new Set(c.findings.filter((f) => EXPLAINED_RULES.has(f.rule)).map((f) => f.subject));
  const op = c.operatingPoint;
  let devices: Record<string, DeviceEntry> | undefined;
  if (op) {
    devices = {};
    for (const id of Object.keys(op.devices)) {
      const d = op.devices[id]!;
      if (TRANSISTOR_KINDS.has(d.kind) || typeof d.headroom === "number") devices[id] = deviceOutline(d);
    }
  }
  const gains = c.gains.map((g): GainOutline => {
    const base = {
      name: g.name,
      midband: g.midband,
      magnitude: g.magnitude,
      db: g.db,
      target: g.target,
      window: g.window,
      inputImpedance: g.inputImpedance,
      outputImpedance: g.outputImpedance,
    };
    if (!explained.has(g.name)) return base;
    return { ...base, ...(g.response !== undefined ? { response: g.response } : {}), ...(g.explanation !== undefined ? { explanation: g.explanation } : {}) };
  });
  let monteCarlo: MonteCarloOutline | undefined;
  if (c.monteCarlo) {
    const { quantities: _dropped, ...rest } = c.monteCarlo as MonteCarloEntry;
    monteCarlo = rest;
  }
  return {
    light: {
      file: c.file,
      name: c.name,
      status: c.status,
      scenarios: c.scenarios,
      findings: c.findings,
      ...(monteCarlo ? { monteCarlo } : {}),
      ...(c.libraries ? { libraries: c.libraries } : {}),
    },
    operatingPoint: stringifyTagged(op && devices ? { nodes: op.nodes, sources: op.sources, devices, solve: op.solve } : null),
    gains: stringifyTagged(gains),
  };
}

/**
 * A copy of a string that holds no other: a name read from a circuit file is a slice of the
 * file's whole text, and an outline kept for the run would keep that text alive with it (1,957
 * source texts, 10 MB, in a heap snapshot 11 s into an 8,000-file run, 2026-12-02).
 */
function ownString(s: string): string {
  return Buffer.from(s, "utf8").toString("utf8");
}

/**
 * An outline from its parts as one run of UTF-8 bytes: the light fields' JSON, then the operating
 * point's, then the gains' (`lightEnd` and `operatingPointEnd` are byte offsets). The file, name
 * and status are kept as values; everything else is parsed afresh on every read. A run keeps one
 * outline per file, and the reports read most of it once or twice (the findings) or only for the
 * markdown sections that fit in a comment and the baseline (operating point, gains).
 */
export function outlineFromBytes(
  light: Pick<CircuitOutline, "file" | "name" | "status">,
  source: Buffer | (() => Buffer),
  lightEnd: number,
  operatingPointEnd: number,
): CircuitOutline {
  const read = typeof source === "function" ? source : () => source;
  const rest = (): OutlineParts["light"] => parseTagged(read().toString("utf8", 0, lightEnd)) as OutlineParts["light"];
  return {
    file: ownString(light.file),
    name: light.name === null ? null : ownString(light.name),
    status: light.status,
    get scenarios() {
      return rest().scenarios;
    },
    get findings() {
      return rest().findings;
    },
    get monteCarlo() {
      return rest().monteCarlo;
    },
    get libraries() {
      return rest().libraries;
    },
    get operatingPoint(): OperatingPointOutline | null {
      return parseTagged(read().toString("utf8", lightEnd, operatingPointEnd)) as OperatingPointOutline | null;
    },
    get gains(): readonly GainOutline[] {
      return parseTagged(read().toString("utf8", operatingPointEnd)) as GainOutline[];
    },
  };
}

/**
 * An outline as text (tagged JSON: light fields, operating point, gains back to back) with the
 * fields read without parsing: the form in which a lane hands an outline to the thread writing
 * the reports (src/run/prepare.ts), and a cache entry's outline (as bytes).
 */
export interface OutlineText {
  readonly file: string;
  readonly name: string | null;
  readonly status: CircuitOutline["status"];
  readonly text: string | Buffer;
  /** Byte offsets in the text's UTF-8 form. */
  readonly lightEnd: number;
  readonly operatingPointEnd: number;
}

export function outlineText(parts: OutlineParts): OutlineText {
  const light = stringifyTagged(parts.light);
  const lightEnd = Buffer.byteLength(light, "utf8");
  return {
    file: parts.light.file,
    name: parts.light.name,
    status: parts.light.status,
    text: light + parts.operatingPoint + parts.gains,
    lightEnd,
    operatingPointEnd: lightEnd + Buffer.byteLength(parts.operatingPoint, "utf8"),
  };
}

export function outlineFromText(o: OutlineText): CircuitOutline {
  return outlineFromBytes(o, typeof o.text === "string" ? Buffer.from(o.text, "utf8") : o.text, o.lightEnd, o.operatingPointEnd);
}

/** An outline from its parts (a run's own results; the cache reads entries as bytes). */
export function outlineFrom(parts: OutlineParts): CircuitOutline {
  return outlineFromText(outlineText(parts));
}

/** The outline of a (normalised) circuit result. */
export function outlineOf(c: CircuitOutline): CircuitOutline {
  return outlineFrom(outlineParts(c));
}
