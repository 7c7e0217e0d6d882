// Judging a value against a { min?, max? } window, the way gain-window does: a failure names
// the side it crossed; a pass reports the nearer edge so that its margin shows how close it came.
import type { ValueWindow } from "../circuit/types.js";
import type { Bound } from "./rule.js";

export interface WindowVerdict {
  readonly ok: boolean;
  readonly limit: number;
  readonly bound: Bound;
}

/** Relative distance to an edge (absolute when the edge is 0). */
function distance(value: number, edge: number, bound: Bound): number {
  const scale = edge === 0 ? 1 : Math.abs(edge);
  return (bound === "max" ? edge - value : value - edge) / scale;
}

export function judgeWindow(value: number, w: ValueWindow): WindowVerdict {
  if (w.max !== undefined && !(value <= w.max)) return { ok: false, limit: w.max, bound: "max" };
  if (w.min !== undefined && !(value >= w.min)) return { ok: false, limit: w.min, bound: "min" };
  if (w.min !== undefined && w.max !== undefined) {
    return distance(value, w.max, "max") <= distance(value, w.min, "min") ? { ok: true, limit: w.max, bound: "max" } : { ok: true, limit: w.min, bound: "min" };
  }
  return w.max !== undefined ? { ok: true, limit: w.max, bound: "max" } : { ok: true, limit: w.min as number, bound: "min" };
}
