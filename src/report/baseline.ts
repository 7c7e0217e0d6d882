// Baselines: what changed between an earlier results document (e.g. the target branch) and this
// run, per circuit — midband gains, supply currents, transistor headroom, new and fixed findings.
// A pure value; the markdown and console renderers show it.
import { compareText } from "./build.js";
import type { CircuitStatus, Finding } from "./document.js";
import type { CircuitOutline, ReportDocument } from "./outline.js";

/**
 * Relative change below which a figure counts as unchanged: solver noise sits many decades lower,
 * and no design review cares about 0.01 %.
 */
export const CHANGE_TOLERANCE = 1e-4;

/** Sources delivering less than this in both runs (signal inputs at 0 V dc) are not supplies. */
export const SUPPLY_MIN_CURRENT = 1e-9;

export interface FigureChange {
  /** Gain name, source id or device id. */
  readonly subject: string;
  readonly before: number | null;
  readonly after: number | null;
  readonly unit: string;
}

export interface CircuitDiff {
  readonly file: string;
  readonly name: string | null;
  /** added: not in the baseline; removed: only in the baseline. */
  readonly change: "added" | "removed" | "changed";
  readonly statusBefore: CircuitStatus | null;
  readonly statusAfter: CircuitStatus | null;
  readonly gains: readonly FigureChange[];
  readonly supplies: readonly FigureChange[];
  readonly headroom: readonly FigureChange[];
  readonly newFindings: readonly Finding[];
  readonly fixedFindings: readonly Finding[];
}

export interface BaselineDiff {
  /** Only circuits with something to show, sorted by file. */
  readonly circuits: readonly CircuitDiff[];
  readonly unchanged: number;
}

function differs(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a !== b;
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a !== b;
  const scale = Math.max(Math.abs(a), Math.abs(b));
  return scale > 0 && Math.abs(a - b) > CHANGE_TOLERANCE * scale;
}

function changes(before: ReadonlyMap<string, number>, after: ReadonlyMap<string, number>, unit: string): FigureChange[] {
  const keys = [...new Set([...before.keys(), ...after.keys()])].sort(compareText);
  const out: FigureChange[] = [];
  for (const k of keys) {
    const b = before.get(k) ?? null;
    const a = after.get(k) ?? null;
    if (differs(b, a)) out.push({ subject: k, before: b, after: a, unit });
  }
  return out;
}

function gainsOf(c: CircuitOutline | undefined): Map<string, number> {
  return new Map((c?.gains ?? []).map((g) => [g.name, g.midband]));
}

function suppliesOf(c: CircuitOutline | undefined): Map<string, number> {
  const out = new Map<string, number>();
  for (const [id, s] of Object.entries(c?.operatingPoint?.sources ?? {})) out.set(id, s.current);
  return out;
}

function headroomOf(c: CircuitOutline | undefined): Map<string, number> {
  const out = new Map<string, number>();
  for (const [id, d] of Object.entries(c?.operatingPoint?.devices ?? {})) {
    if (typeof d.headroom === "number") out.set(id, d.headroom);
  }
  return out;
}

/** Findings are matched by rule and subject, not line: moving a component is not a new finding. */
function findingKey(f: Finding): string {
  return `${f.rule}\u0000${f.subject}`;
}

function findingDelta(before: readonly Finding[], after: readonly Finding[]): { added: Finding[]; fixed: Finding[] } {
  const b = new Set(before.map(findingKey));
  const a = new Set(after.map(findingKey));
  return { added: after.filter((f) => !b.has(findingKey(f))), fixed: before.filter((f) => !a.has(findingKey(f))) };
}

function diffCircuit(base: CircuitOutline | undefined, head: CircuitOutline | undefined): CircuitDiff {
  const any = (head ?? base)!;
  const supplyBefore = suppliesOf(base);
  const supplyAfter = suppliesOf(head);
  const supplies = changes(supplyBefore, supplyAfter, "A").filter(
    (ch) => Math.abs(ch.before ?? 0) >= SUPPLY_MIN_CURRENT || Math.abs(ch.after ?? 0) >= SUPPLY_MIN_CURRENT,
  );
  const { added, fixed } = findingDelta(base?.findings ?? [], head?.findings ?? []);
  return {
    file: any.file,
    name: head?.name ?? base?.name ?? null,
    change: base === undefined ? "added" : head === undefined ? "removed" : "changed",
    statusBefore: base?.status ?? null,
    statusAfter: head?.status ?? null,
    gains: changes(gainsOf(base), gainsOf(head), "V/V"),
    supplies,
    headroom: changes(headroomOf(base), headroomOf(head), "V"),
    newFindings: added,
    fixedFindings: fixed,
  };
}

function isEmpty(d: CircuitDiff): boolean {
  return (
    d.change === "changed" &&
    d.statusBefore === d.statusAfter &&
    d.gains.length === 0 &&
    d.supplies.length === 0 &&
    d.headroom.length === 0 &&
    d.newFindings.length === 0 &&
    d.fixedFindings.length === 0
  );
}

export function diffDocuments(base: ReportDocument, head: ReportDocument): BaselineDiff {
  const before = new Map(base.circuits.map((c) => [c.file, c]));
  const after = new Map(head.circuits.map((c) => [c.file, c]));
  const files = [...new Set([...before.keys(), ...after.keys()])].sort(compareText);
  const circuits: CircuitDiff[] = [];
  let unchanged = 0;
  for (const file of files) {
    const d = diffCircuit(before.get(file), after.get(file));
    if (isEmpty(d)) unchanged++;
    else circuits.push(d);
  }
  return { circuits, unchanged };
}
