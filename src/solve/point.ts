// The operating-point value read off a converged solution: node voltages, source records and
// one record per other component, each from its device module.
import type { DevicePoint, OperatingPoint, SolveStats, SourcePoint } from "./types.js";
import { describeUnknown, type Plan } from "./plan.js";

/**
 * Builds the OperatingPoint, or returns the unknown whose value is not finite. Every device
 * record is a finite function of finite unknowns (each conductance has a leakage floor, so no
 * 1/0), which is why only x is checked.
 */
export function readOperatingPoint(plan: Plan, stats: SolveStats): OperatingPoint | { bad: string } {
  const x = plan.x;
  for (let i = 0; i < plan.n; i++) if (!Number.isFinite(x[i]!)) return { bad: describeUnknown(plan.unknowns[i]!) };
  const nodes: Record<string, number> = { [plan.circuit.ground]: 0 };
  const { nodeNames, nodeSlots, devices: all } = plan;
  for (let k = 0; k < nodeNames.length; k++) nodes[nodeNames[k]!] = x[nodeSlots[k]!]!;
  const sources: Record<string, SourcePoint> = {};
  const devices: Record<string, DevicePoint> = {};
  for (let k = 0; k < all.length; k++) {
    const d = all[k]!;
    const pt = d.point(x);
    if (d.kind === "voltage-source" || d.kind === "current-source") sources[d.id] = pt as SourcePoint;
    else devices[d.id] = pt as DevicePoint;
  }
  return { ok: true, nodes, sources, devices, stats };
}
