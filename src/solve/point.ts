// The operating-point value read off a converged solution: node voltages, source records and
// one record per other component, each from its device module.
import type { DevicePoint, OperatingPoint, SolveStats, SourcePoint } from "./types.js";
import type { Plan } from "./plan.js";

/** Builds the OperatingPoint, or returns the id/node whose value is not finite. */
export function readOperatingPoint(plan: Plan, stats: SolveStats): OperatingPoint | { bad: string } {
  const x = plan.x;
  const nodes: Record<string, number> = { [plan.circuit.ground]: 0 };
  for (const [name, i] of plan.nodeIndex) {
    const v = x[i]!;
    if (!Number.isFinite(v)) return { bad: `node \`${name}\`` };
    nodes[name] = v;
  }
  const sources: Record<string, SourcePoint> = {};
  const devices: Record<string, DevicePoint> = {};
  for (const d of plan.devices) {
    const pt = d.point(x);
    for (const v of Object.values(pt)) if (typeof v === "number" && Number.isNaN(v)) return { bad: d.id };
    if (d.kind === "voltage-source" || d.kind === "current-source") sources[d.id] = pt as SourcePoint;
    else devices[d.id] = pt as DevicePoint;
  }
  return { ok: true, nodes, sources, devices, stats };
}
