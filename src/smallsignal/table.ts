// Plain-text views of small-signal results for the command line: the linearised device
// parameters, the gains with their windows and impedances, and a frequency sweep (text or CSV).
// Pure functions from values to strings; SI values are converted for display only here.

import type { Circuit } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { formatSiPrefixed } from "../units/si-format.js";
import type { FrequencyPoint, SmallSignalResult, SweepResult } from "./types.js";

/** Significant digits shown in tables: enough to compare with a hand calculation. */
const DISPLAY_DIGITS = 4;

/** 4.7e3, "Ω" → "4.7 kΩ"; Infinity → "∞ Ω"; undefined → "—". */
export function formatSi(value: number | undefined, unit: string): string {
  return formatSiPrefixed(value, unit, { significant: DISPLAY_DIGITS });
}

function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? "—" : value < 0 ? "−∞" : "∞";
  if (value === 0) return "0";
  const a = Math.abs(value);
  if (a >= 1e6 || a < 1e-4) return value.toExponential(DISPLAY_DIGITS - 1);
  return String(Number(value.toPrecision(DISPLAY_DIGITS)));
}

function formatDb(db: number): string {
  return Number.isFinite(db) ? `${db.toFixed(2)} dB` : db < 0 ? "−∞ dB" : "∞ dB";
}

/** Left-aligned columns separated by two spaces. */
function table(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? "").length)));
  const line = (cells: readonly string[]) => cells.map((c, i) => c.padEnd(widths[i] ?? 0)).join("  ").trimEnd();
  return [line(header), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)].join("\n");
}

function devicesTable(circuit: Circuit, op: OperatingPoint): string | undefined {
  const rows: string[][] = [];
  for (const c of circuit.components) {
    const p = op.devices[c.id];
    if (!p) continue;
    switch (p.kind) {
      case "npn":
      case "pnp":
        rows.push([c.id, p.kind, p.region, formatSi(p.transconductance, "S"), formatSi(p.inputResistance, "Ω"), formatSi(p.emitterResistance, "Ω"), formatSi(p.outputResistance, "Ω"), "—", "—"]);
        break;
      case "nmos":
      case "pmos":
        rows.push([c.id, p.kind, p.region, formatSi(p.transconductance, "S"), "—", "—", formatSi(p.outputResistance, "Ω"), formatSi(p.bodyTransconductance, "S"), "—"]);
        break;
      case "diode":
        rows.push([c.id, "diode", "", "—", "—", "—", "—", "—", formatSi(p.dynamicResistance, "Ω")]);
        break;
      default:
        break;
    }
  }
  if (rows.length === 0) return undefined;
  return table(["device", "kind", "region", "gm", "rπ", "re", "ro", "gmb", "rd"], rows);
}

function pointText(p: FrequencyPoint): string {
  return `${formatSi(p.frequency, "Hz")}: ${formatNumber(p.magnitude)} V/V at ${p.phaseDeg.toFixed(1)}° (${formatDb(p.db)})`;
}

/** The small-signal section of `opgate inspect FILE`. */
export function renderSmallSignal(circuit: Circuit, op: OperatingPoint, result: SmallSignalResult): string {
  const parts: string[] = [];
  const devices = devicesTable(circuit, op);
  parts.push("Small-signal model at the operating point");
  parts.push(devices ?? "(no transistors or diodes)");
  parts.push("");
  parts.push("Gains (midband: the flat band — coupling and bypass capacitors short, band-edge and device capacitances open, inductors open; output impedance with the input zeroed)");
  if (circuit.specs.gains.length === 0) {
    parts.push("(no gains in specs.gains)");
    return parts.join("\n") + "\n";
  }
  const specs = new Map(circuit.specs.gains.map((s) => [s.name, s]));
  const rows = result.gains.map((g) => {
    const s = specs.get(g.name);
    const output = s ? (s.output.minus === circuit.ground ? s.output.plus : `${s.output.plus} − ${s.output.minus}`) : "";
    const window = s ? `${formatNumber(s.window.min)} … ${formatNumber(s.window.max)}` : "";
    return [
      g.name,
      s?.input ?? "",
      output,
      formatNumber(g.midband),
      formatDb(g.db),
      window,
      formatNumber(g.judged),
      formatSi(g.inputImpedance, "Ω"),
      formatSi(g.outputImpedance, "Ω"),
    ];
  });
  if (rows.length > 0) {
    parts.push(table(["gain", "input", "output", "midband V/V", "dB", "window V/V", "judged", "input Z", "output Z"], rows));
  }
  for (const g of result.gains) {
    if (g.openAtMidband.length > 0) {
      const hand = g.everyCapacitorShort === null ? "undefined" : `${formatNumber(g.everyCapacitorShort)} V/V`;
      parts.push(`  ${g.name}: open at midband (they set the upper edge): ${g.openAtMidband.join(", ")}; with every capacitor short (hand reference): ${hand}`);
    }
    if (g.points.length > 0) parts.push(`  ${g.name} at ${g.points.map(pointText).join("; ")}`);
    const e = g.edges;
    if (e) {
      const hz = (f: number | null) => (f === null ? "none found" : formatSi(f, "Hz"));
      const who = (list: typeof e.low) => (list[0] ? ` (${list[0].between ? `${list[0].id} ${list[0].between}` : list[0].id} ${Math.round(list[0].share * 100)} %)` : "");
      parts.push(
        `  ${g.name} −3 dB corners: lower ${hz(e.lowCorner)} (short-circuit time constants: ${hz(e.lowEstimate)}${who(e.low)}), upper ${hz(e.highCorner)} (open-circuit time constants: ${hz(e.highEstimate)}${who(e.high)})`,
      );
    }
  }
  for (const e of result.errors) parts.push(`  ${e.gain}: not computed: ${e.message}`);
  return parts.join("\n") + "\n";
}

/** The frequency response of `opgate inspect FILE --sweep`, as a text table. */
export function renderSweep(sweep: SweepResult): string {
  if (sweep.error !== undefined) return `Sweep of ${sweep.gain}: not computed: ${sweep.error}\n`;
  const corner = (f: number | null) => (f === null ? "not inside the sweep" : formatSi(f, "Hz"));
  const head = [
    `Frequency response of ${sweep.gain}`,
    `midband ${sweep.midband === null ? "—" : formatNumber(sweep.midband)} V/V; −3 dB corners relative to ${sweep.reference === null ? "—" : formatNumber(sweep.reference)} V/V`,
    `lower −3 dB: ${corner(sweep.lowCorner)}; upper −3 dB: ${corner(sweep.highCorner)}`,
    "",
  ];
  const rows = sweep.points.map((p) => [formatSi(p.frequency, "Hz"), formatNumber(p.magnitude), formatDb(p.db), `${p.phaseDeg.toFixed(2)}°`]);
  return head.join("\n") + table(["frequency", "|gain| V/V", "gain dB", "phase"], rows) + "\n";
}

/** The sweep as CSV (RFC 4180 plain numbers, full precision, SI units). */
export function sweepCsv(sweep: SweepResult): string {
  const lines = ["frequency_hz,magnitude,db,phase_deg,re,im"];
  for (const p of sweep.points) lines.push([p.frequency, p.magnitude, p.db, p.phaseDeg, p.re, p.im].map(String).join(","));
  return lines.join("\n") + "\n";
}
