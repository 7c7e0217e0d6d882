// A Monte Carlo sample as a parameter set a reviewer can read. A sample moves every varied
// parameter at once, so listing all of them says nothing; a finding's worst sample instead names
// the few parameters that moved its quantity most in that sample, like a corner does.
//
// The effect of each parameter is estimated from the samples themselves, by least squares of the
// quantity on every varied parameter at once over the samples where it was read (multiple linear
// regression, in any textbook on regression):  q ≈ q̄ + Σᵢ bᵢ·(xᵢ − x̄ᵢ),  (XᵀX)·b = Xᵀq on centred
// values, solved by Cholesky. bᵢ estimates the first-order sensitivity ∂q/∂xᵢ, and parameter i's
// part in the sample's deviation is bᵢ·(xᵢ − nominalᵢ). The largest |bᵢ·Δxᵢ| are named, among the
// slopes that stand out from the scatter: |t| = |bᵢ|/se(bᵢ) ≥ SIGNIFICANT_T, with
// se(bᵢ)² = s²·((XᵀX)⁻¹)ᵢᵢ and s² = residual sum of squares / (n − p − 1). A part that does not
// move the quantity would otherwise be named now and then for a large deviation times a slope that
// is noise. With more parameters than MAX_JOINT (or too few samples for them) each slope is fitted
// on its own (one regressor; the others count as scatter, so fewer stand out). No analysis is
// re-run: the samples are drawn again from the seed (the same draws as the run), and the
// quantity's values are those the run recorded.
import type { CornerEntry } from "../report/document.js";
import { sampleValues } from "./monte-carlo.js";
import { describeSettings, hasBand, settingsOf, type Parameter } from "./parameters.js";
import { seededRandom } from "./random.js";

/** Parameters a sample's label names (temperature is named besides, as in corners). */
export const SAMPLE_TOP_PARAMETERS = 3;

/** Fewer readings than this and no slope is estimated: the parameters are ranked by how far into their band they sit. */
const MIN_READINGS = 10;

/**
 * A slope is taken as real when it is this many standard errors from zero: for a parameter with
 * no effect |t| exceeds 3 in about 0.3 % of runs (normal tables), so a dozen parameters rarely
 * bring in a spurious one.
 */
export const SIGNIFICANT_T = 3;

export interface SampleRequest {
  /** 0-based sample index. */
  readonly sample: number;
  /** The quantity's value in every sample (NaN where it was not read), or null when the finding has no quantity. */
  readonly quantity: Float64Array | null;
}

/** Parameters fitted jointly at most (the normal equations are p × p). */
export const MAX_JOINT = 120;

interface Fit {
  /** Sums over the samples read, of dx (per fitted parameter), dx·dxᵀ (p × p), dx·q, q and q². */
  readonly sx: Float64Array;
  readonly sxx: Float64Array;
  readonly sxq: Float64Array;
  n: number;
  sq: number;
  sqq: number;
}

/** In-place Cholesky factor (lower triangle) of a symmetric p × p matrix; false when it is not positive definite. */
function cholesky(a: Float64Array, p: number): boolean {
  for (let j = 0; j < p; j++) {
    let d = a[j * p + j]!;
    for (let k = 0; k < j; k++) d -= a[j * p + k]! * a[j * p + k]!;
    if (!(d > 0)) return false;
    const l = Math.sqrt(d);
    a[j * p + j] = l;
    for (let i = j + 1; i < p; i++) {
      let v = a[i * p + j]!;
      for (let k = 0; k < j; k++) v -= a[i * p + k]! * a[j * p + k]!;
      a[i * p + j] = v / l;
    }
  }
  return true;
}

/** Solves L·Lᵀ·x = b in place with the factor from cholesky(). */
function choleskySolve(l: Float64Array, p: number, b: Float64Array): void {
  for (let i = 0; i < p; i++) {
    let v = b[i]!;
    for (let k = 0; k < i; k++) v -= l[i * p + k]! * b[k]!;
    b[i] = v / l[i * p + i]!;
  }
  for (let i = p - 1; i >= 0; i--) {
    let v = b[i]!;
    for (let k = i + 1; k < p; k++) v -= l[k * p + i]! * b[k]!;
    b[i] = v / l[i * p + i]!;
  }
}

/** Per fitted parameter: its slope where it stands out from the scatter, else 0. */
function significantSlopes(fit: Fit, p: number): Float64Array {
  const { n } = fit;
  const slopes = new Float64Array(p);
  const cq = new Float64Array(p);
  for (let i = 0; i < p; i++) cq[i] = fit.sxq[i]! - (fit.sx[i]! * fit.sq) / n;
  const sqq = fit.sqq - (fit.sq * fit.sq) / n;
  if (fit.sxx.length === p * p && p > 1 && n > p + 10) {
    const l = new Float64Array(p * p);
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) l[i * p + j] = fit.sxx[i * p + j]! - (fit.sx[i]! * fit.sx[j]!) / n;
    if (cholesky(l, p)) {
      const b = Float64Array.from(cq);
      choleskySolve(l, p, b);
      let explained = 0;
      for (let i = 0; i < p; i++) explained += b[i]! * cq[i]!;
      const s2 = Math.max(0, sqq - explained) / (n - p - 1);
      const e = new Float64Array(p);
      for (let i = 0; i < p; i++) {
        e.fill(0);
        e[i] = 1;
        choleskySolve(l, p, e);
        const se = Math.sqrt(s2 * e[i]!);
        if (Math.abs(b[i]!) >= SIGNIFICANT_T * se) slopes[i] = b[i]!;
      }
      return slopes;
    }
  }
  // One regressor at a time (too many parameters, too few samples, or a parameter that never moved).
  const diagonal = (i: number): number => (fit.sxx.length === p * p ? fit.sxx[i * p + i]! : fit.sxx[i]!);
  for (let i = 0; i < p; i++) {
    const sxx = diagonal(i) - (fit.sx[i]! * fit.sx[i]!) / n;
    if (!(sxx > 0) || n < 3) continue;
    const slope = cq[i]! / sxx;
    const se = Math.sqrt(Math.max(0, sqq - slope * cq[i]!) / ((n - 2) * sxx));
    if (Math.abs(slope) >= SIGNIFICANT_T * se) slopes[i] = slope;
  }
  return slopes;
}

/** The corner entry of each requested sample, in request order. */
export function sampleCorners(params: readonly Parameter[], seed: number, count: number, requests: readonly SampleRequest[]): CornerEntry[] {
  const banded = params.map((p, i) => (hasBand(p) ? i : -1)).filter((i) => i >= 0);
  const p = banded.length;
  const joint = p <= MAX_JOINT;
  const fits = new Map<Float64Array, Fit>();
  for (const r of requests) {
    if (r.quantity && !fits.has(r.quantity)) fits.set(r.quantity, { sx: new Float64Array(p), sxx: new Float64Array(joint ? p * p : p), sxq: new Float64Array(p), n: 0, sq: 0, sqq: 0 });
  }
  const wanted = new Map<number, Float64Array | null>(requests.map((r) => [r.sample, null]));
  const random = seededRandom(seed);
  const values = new Float64Array(params.length);
  const dx = new Float64Array(p);
  for (let k = 0; k < count; k++) {
    sampleValues(params, random, values);
    if (wanted.has(k)) wanted.set(k, Float64Array.from(values));
    for (let j = 0; j < p; j++) dx[j] = values[banded[j]!]! - params[banded[j]!]!.nominal;
    for (const [q, fit] of fits) {
      const v = q[k]!;
      if (Number.isNaN(v)) continue;
      fit.n++;
      fit.sq += v;
      fit.sqq += v * v;
      for (let i = 0; i < p; i++) {
        const di = dx[i]!;
        fit.sx[i] = fit.sx[i]! + di;
        fit.sxq[i] = fit.sxq[i]! + di * v;
        if (joint) for (let j = 0; j < p; j++) fit.sxx[i * p + j] = fit.sxx[i * p + j]! + di * dx[j]!;
        else fit.sxx[i] = fit.sxx[i]! + di * di;
      }
    }
  }
  const slopesOf = new Map<Fit, Float64Array>();
  for (const fit of fits.values()) if (fit.n >= MIN_READINGS) slopesOf.set(fit, significantSlopes(fit, p));
  const t = params.findIndex((q) => q.kind === "temperature");
  const varied = banded.filter((i) => i !== t).length;
  return requests.map((r) => {
    const x = wanted.get(r.sample)!;
    const fit = r.quantity ? fits.get(r.quantity)! : null;
    const slopes = fit ? slopesOf.get(fit) : undefined;
    const effect = (j: number): number => {
      const q = params[banded[j]!]!;
      const d = x[banded[j]!]! - q.nominal;
      return slopes ? slopes[j]! * d : d / (q.max - q.min); // without a fit: the share of its band
    };
    const ranked = banded
      .map((i, j) => ({ i, e: i === t ? 0 : Math.abs(effect(j)) }))
      .filter((c) => c.e > 0)
      .sort((a, b) => b.e - a.e || a.i - b.i)
      .slice(0, SAMPLE_TOP_PARAMETERS)
      .map((c) => c.i);
    // The chosen parameters in order of effect; temperature last, as in a corner.
    const order = t >= 0 ? [...ranked, t] : ranked;
    const shown = new Set(order);
    const only = Float64Array.from(params, (q, i) => (shown.has(i) ? x[i]! : q.nominal));
    const all = settingsOf(params, only);
    const settings = order.map((i) => all.find((s) => s.parameter === params[i]!.key)).filter((s) => s !== undefined);
    const why = !slopes
      ? `the ${ranked.length} of ${varied} varied parameters furthest into their bands`
      : ranked.length
        ? `the ${ranked.length} of ${varied} varied parameters that moved it most`
        : `none of its ${varied} varied parameters stands out`;
    return { label: `${describeSettings(settings)} (Monte Carlo sample; ${why})`, parameters: settings };
  });
}
