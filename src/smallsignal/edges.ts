// The band edges of one gain: which capacitor sets each corner (short-circuit time constants
// for the lower corner, open-circuit time constants for the upper, as hand analysis does them),
// the exact −3 dB corners relative to the flat-band gain, and the value of one capacitor that
// would keep the gain at a band edge within a given number of dB.

import type { Circuit } from "../circuit/types.js";
import type { OperatingPoint } from "../solve/types.js";
import { buildNetwork, factorView, GROUND, type SmallSignalNetwork } from "./network.js";
import { classifyCapacitors, midbandGain, switchable } from "./midband.js";
import { gainAt, resistanceBetween, resolveGain, type ResolvedGain } from "./probe.js";
import type { BandEdges, CapacitorShare, EdgeCapacitorValue } from "./types.js";

/** Decades searched outward from the band centre for a −3 dB crossing before giving up (1e-12…1e12 around it). */
const CORNER_SEARCH_DECADES = 12;
/** Bisection steps on log f inside one decade: 2^-40 of a decade is a relative 2e-12. */
const CORNER_BISECTIONS = 40;
/** The −3 dB level: |H| = reference / √2. */
const HALF_POWER = Math.SQRT1_2;
/** Doublings tried when looking for a capacitor value that meets an edge: 2^40 ≈ 1e12 times. */
const VALUE_DOUBLINGS = 40;
/** Bisection steps on log C between the last failing and the first passing value (relative 1e-9 after ~30). */
const VALUE_BISECTIONS = 40;

function magnitudeAt(net: SmallSignalNetwork, g: ResolvedGain, f: number, replace?: { index: number; value: number }): number | null {
  const v = gainAt(net, g, f, replace);
  return typeof v === "string" ? null : Math.hypot(v.re, v.im);
}

function label(net: SmallSignalNetwork, i: number): { id: string; between?: string } {
  const c = net.capacitors[i]!;
  return c.between ? { id: c.id, between: c.between } : { id: c.id };
}

/**
 * Short-circuit time constants (lower corner) and open-circuit time constants (upper corner)
 * in the flat-band view: each capacitor's τ = C·R, R the resistance it sees with the other
 * coupling/bypass capacitors short and the band-edge capacitors open. The estimates are the
 * textbook sums: f_low ≈ Σ 1/(2π·τ), f_high ≈ 1/(2π·Σ τ).
 */
function timeConstants(net: SmallSignalNetwork, open: Uint8Array): { low: CapacitorShare[]; high: CapacitorShare[] } {
  const low: CapacitorShare[] = [];
  const high: CapacitorShare[] = [];
  const mask = open.slice();
  // Open-circuit: one factorisation of the flat-band view serves every upper-edge capacitor.
  if (factorView(net, { kind: "midband", open: mask }) === null) {
    net.capacitors.forEach((c, i) => {
      const upper = c.branch === GROUND || open[i] === 1;
      if (!upper || c.a === c.b) return;
      const r = resistanceBetween(net, c.a, c.b);
      if (Number.isFinite(r) && r > 0) high.push({ ...label(net, i), value: c.value, resistance: r, timeConstant: r * c.value, share: 0 });
    });
  }
  net.capacitors.forEach((c, i) => {
    if (!switchable(c) || open[i] === 1) return;
    mask[i] = 1;
    const singular = factorView(net, { kind: "midband", open: mask });
    mask[i] = 0;
    if (singular !== null) return;
    const r = resistanceBetween(net, c.a, c.b);
    if (Number.isFinite(r) && r > 0) low.push({ ...label(net, i), value: c.value, resistance: r, timeConstant: r * c.value, share: 0 });
  });
  // Shares: of Σ 1/τ at the lower corner, of Σ τ at the upper.
  const lowSum = low.reduce((s, x) => s + 1 / x.timeConstant, 0);
  const highSum = high.reduce((s, x) => s + x.timeConstant, 0);
  const byShare = (a: CapacitorShare, b: CapacitorShare) => b.share - a.share;
  return {
    low: low.map((x) => ({ ...x, share: 1 / x.timeConstant / lowSum })).sort(byShare),
    high: high.map((x) => ({ ...x, share: x.timeConstant / highSum })).sort(byShare),
  };
}

/** The frequency between lo and hi (lo side in band when `inBandAtLow`) where |H| crosses the level, by bisection on log f. */
function crossing(net: SmallSignalNetwork, g: ResolvedGain, lo: number, hi: number, level: number, inBandAtLow: boolean): number {
  let a = Math.log(lo);
  let b = Math.log(hi);
  for (let k = 0; k < CORNER_BISECTIONS; k++) {
    const m = (a + b) / 2;
    const mag = magnitudeAt(net, g, Math.exp(m));
    if (mag === null) break;
    if (mag >= level === inBandAtLow) a = m;
    else b = m;
  }
  return Math.exp((a + b) / 2);
}

/** The exact −3 dB corners relative to `reference`, searched outward from `centre`; null where none is found. */
function corners(net: SmallSignalNetwork, g: ResolvedGain, reference: number, centre: number): { low: number | null; high: number | null } {
  const level = reference * HALF_POWER;
  const atCentre = magnitudeAt(net, g, centre);
  if (atCentre === null || !(atCentre >= level)) return { low: null, high: null };
  let low: number | null = null;
  let high: number | null = null;
  for (let k = 1, f = centre; k <= CORNER_SEARCH_DECADES; k++) {
    const next = f / 10;
    const m = magnitudeAt(net, g, next);
    if (m === null) break;
    if (m < level) {
      low = crossing(net, g, next, f, level, false);
      break;
    }
    f = next;
  }
  for (let k = 1, f = centre; k <= CORNER_SEARCH_DECADES; k++) {
    const next = f * 10;
    const m = magnitudeAt(net, g, next);
    if (m === null) break;
    if (m < level) {
      high = crossing(net, g, f, next, level, true);
      break;
    }
    f = next;
  }
  return { low, high };
}

/** Band-edge analysis of one gain in its flat-band view (`open` from classifyCapacitors). */
export function bandEdges(net: SmallSignalNetwork, g: ResolvedGain, open: Uint8Array, midband: number, band: { low: number; high: number }): BandEdges {
  const tc = timeConstants(net, open);
  const lowEstimate = tc.low.length > 0 ? tc.low.reduce((s, x) => s + 1 / (2 * Math.PI * x.timeConstant), 0) : null;
  const highEstimate = tc.high.length > 0 ? 1 / (2 * Math.PI * tc.high.reduce((s, x) => s + x.timeConstant, 0)) : null;
  const reference = Math.abs(midband);
  const exact = reference > 0 ? corners(net, g, reference, Math.sqrt(band.low * band.high)) : { low: null, high: null };
  return { lowCorner: exact.low, highCorner: exact.high, lowEstimate, highEstimate, low: tc.low, high: tc.high };
}

/**
 * The value of one capacitor that keeps the gain at `frequency` within `allowedDb` of the
 * flat-band gain, everything else unchanged: larger values are tried for a lower-edge capacitor,
 * smaller for an upper-edge one (doubling, then bisection on log C). `reachable` is false when
 * no value does it alone (another capacitor or the device limits that edge).
 */
export function capacitorForEdge(
  circuit: Circuit,
  op: OperatingPoint,
  gainName: string,
  capacitor: { readonly id: string; readonly between?: string },
  frequency: number,
  edge: "low" | "high",
  allowedDb: number,
): EdgeCapacitorValue | null {
  const spec = circuit.specs.gains.find((s) => s.name === gainName);
  if (!spec) return null;
  const built = buildNetwork(circuit, op);
  if (!built.ok) return null;
  const net = built.network;
  const g = resolveGain(circuit, net, spec);
  if (typeof g === "string") return null;
  const index = net.capacitors.findIndex((c) => c.id === capacitor.id && c.between === capacitor.between);
  if (index < 0) return null;
  const open = classifyCapacitors(net, g);
  const mid = midbandGain(net, g, open);
  if (mid === null || mid === 0) return null;
  const reference = Math.abs(mid);
  const original = net.capacitors[index]!.value;
  const meets = (value: number): boolean | null => {
    const m = magnitudeAt(net, g, frequency, { index, value });
    return m === null ? null : Math.abs(20 * Math.log10(m / reference)) <= allowedDb;
  };
  const step = edge === "low" ? 2 : 0.5;
  let failing = original;
  let passing: number | null = null;
  for (let k = 1, v = original; k <= VALUE_DOUBLINGS; k++) {
    v *= step;
    const ok = meets(v);
    if (ok === null) break;
    if (ok) {
      passing = v;
      break;
    }
    failing = v;
  }
  if (passing === null) return { value: edge === "low" ? original * step ** VALUE_DOUBLINGS : 0, reachable: false };
  let a = Math.log(failing);
  let b = Math.log(passing);
  for (let k = 0; k < VALUE_BISECTIONS; k++) {
    const m = (a + b) / 2;
    if (meets(Math.exp(m))) b = m;
    else a = m;
  }
  return { value: Math.exp(b), reachable: true };
}
