// A readable text rendering of an operating point: node voltages, sources and one table per
// device family, SI-prefixed values with units in aligned columns (for `opgate inspect`).
import { formatSiPrefixed } from "../units/si-format.js";
import type { OperatingPoint, SolveResult } from "./types.js";

/** Formats an SI value with a prefix and three significant digits: 0.00123 A → "1.23 mA". */
export function formatSi(value: number, unit: string): string {
  return formatSiPrefixed(value, unit, "by-size");
}

/** Left-aligns the first column and right-aligns the rest. */
export function alignTable(rows: readonly (readonly string[])[]): string {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, [...c].length)));
  return rows
    .map((r) =>
      r
        .map((c, i) => {
          const pad = " ".repeat(widths[i]! - [...c].length);
          return i === 0 ? c + pad : pad + c;
        })
        .join("  ")
        .trimEnd(),
    )
    .join("\n");
}

function section(title: string, header: readonly string[], rows: string[][]): string {
  if (rows.length === 0) return "";
  return `${title}\n${alignTable([header, ...rows])
    .split("\n")
    .map((l) => `  ${l}`)
    .join("\n")}\n`;
}

export function renderOperatingPoint(op: OperatingPoint): string {
  const out: string[] = [];
  out.push(
    section(
      "Node voltages",
      ["node", "voltage"],
      Object.keys(op.nodes)
        .sort()
        .map((n) => [n, formatSi(op.nodes[n]!, "V")]),
    ),
  );
  out.push(
    section(
      "Sources",
      ["source", "voltage", "current", "power"],
      Object.entries(op.sources).map(([id, s]) => [id, formatSi(s.voltage, "V"), formatSi(s.current, "A"), formatSi(s.power, "W")]),
    ),
  );
  const bjts: string[][] = [];
  const mos: string[][] = [];
  const diodes: string[][] = [];
  const passive: string[][] = [];
  for (const [id, d] of Object.entries(op.devices)) {
    switch (d.kind) {
      case "npn":
      case "pnp":
        bjts.push([id, d.kind, d.region, formatSi(d.collectorCurrent, "A"), formatSi(d.baseCurrent, "A"), formatSi(d.baseEmitterVoltage, "V"), formatSi(d.collectorEmitterVoltage, "V"), formatSi(d.headroom, "V"), formatSi(d.power, "W")]);
        break;
      case "nmos":
      case "pmos":
        mos.push([id, d.kind, d.region, formatSi(d.drainCurrent, "A"), formatSi(d.gateSourceVoltage, "V"), formatSi(d.drainSourceVoltage, "V"), formatSi(d.overdrive, "V"), formatSi(d.threshold, "V"), formatSi(d.headroom, "V"), formatSi(d.power, "W")]);
        break;
      case "diode":
        diodes.push([id, formatSi(d.current, "A"), formatSi(d.voltage, "V"), formatSi(d.dynamicResistance, "Ω"), formatSi(d.power, "W")]);
        break;
      case "resistor":
      case "inductor":
        passive.push([id, d.kind, formatSi(d.voltage, "V"), formatSi(d.current, "A"), formatSi(d.power, "W")]);
        break;
      case "capacitor":
        passive.push([id, d.kind, formatSi(d.voltage, "V"), "", ""]);
        break;
      default:
        passive.push([id, d.kind, formatSi(d.voltage, "V"), formatSi(d.current, "A"), formatSi(d.power, "W")]);
    }
  }
  out.push(section("Bipolar transistors", ["part", "kind", "region", "IC", "IB", "VBE", "VCE", "headroom", "power"], bjts));
  out.push(section("MOSFETs", ["part", "kind", "region", "ID", "VGS", "VDS", "Vov", "Vt", "headroom", "power"], mos));
  out.push(section("Diodes", ["part", "ID", "VD", "rd", "power"], diodes));
  out.push(section("Other components", ["part", "kind", "voltage", "current", "power"], passive));
  const s = op.stats;
  out.push(`Solved in ${s.iterations} Newton iterations (aid: ${s.aid}), largest KCL residual ${formatSi(s.residual, "A")}.\n`);
  return out.filter(Boolean).join("\n");
}

/** The table for a solved circuit, or the reason and the parts for one that could not be solved. */
export function renderSolveResult(result: SolveResult): string {
  if (result.ok) return renderOperatingPoint(result);
  const parts = result.parts.length ? `\n  parts: ${result.parts.join(", ")}` : "";
  const nodes = result.nodes.length ? `\n  nodes: ${result.nodes.join(", ")}` : "";
  return `No operating point: ${result.reason}${parts}${nodes}\n`;
}
