// Monte Carlo over the parameters: seeded samples, streamed (each sample is analysed, judged and
// dropped; only its readings are kept, one number per judged quantity), then the yield with its
// confidence interval and per-quantity distributions.
import type { Parameter } from "./parameters.js";
import { normal, triangular, type Random } from "./random.js";
import type { DistributionEntry } from "../report/document.js";

/** Tolerance bands are read as ±3σ of a normal distribution (common practice for Monte Carlo). */
export const SIGMAS_PER_BAND = 3;

/** z of a two-sided 95 % interval: Φ⁻¹(0.975) = 1.959964 (standard normal tables). */
export const Z95 = 1.959963984540054;

/**
 * One sample's values: component values normal with the band as ±3σ (clipped to the band),
 * model spreads triangular on min/typ/max, temperature uniform over its range. Parameters without
 * a band stay nominal and draw nothing, so adding an exact part does not change other samples.
 */
export function sampleValues(params: readonly Parameter[], random: Random, out: Float64Array): Float64Array {
  for (let i = 0; i < params.length; i++) {
    const p = params[i]!;
    if (!(p.max > p.min)) {
      out[i] = p.nominal;
      continue;
    }
    if (p.kind === "temperature") out[i] = p.min + (p.max - p.min) * random();
    else if (p.kind === "spread") out[i] = triangular(random, p.min, p.nominal, p.max);
    else {
      const z = normal(random);
      const sigma = (z < 0 ? p.nominal - p.min : p.max - p.nominal) / SIGMAS_PER_BAND;
      out[i] = Math.min(p.max, Math.max(p.min, p.nominal + z * sigma));
    }
  }
  return out;
}

/**
 * Wilson score interval for a binomial proportion (Wilson 1927): centre (k + z²/2)/(n + z²),
 * half-width z·√(k(n−k)/n + z²/4)/(n + z²). Unlike the normal approximation it stays inside
 * [0, 1] and is sound at a yield of 100 %, the usual case of a good design.
 */
export function wilsonInterval(passed: number, n: number, z = Z95): { low: number; high: number } {
  if (n <= 0) return { low: 0, high: 1 };
  const z2 = z * z;
  const centre = (passed + z2 / 2) / (n + z2);
  const half = (z * Math.sqrt((passed * (n - passed)) / n + z2 / 4)) / (n + z2);
  return { low: Math.max(0, centre - half), high: Math.min(1, centre + half) };
}

/** One quantity's statistics over the samples (σ is the sample standard deviation, n − 1). */
export type Distribution = Omit<DistributionEntry, "rule" | "subject" | "unit">;

/** Percentile by linear interpolation between order statistics (the common "type 7" definition). */
function percentile(sorted: Float64Array, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

/** The values one quantity took over the samples (those where the rule reported it). */
export class Collector {
  #values: Float64Array;
  /** The sample each value came from (0-based). */
  #samples: Int32Array;
  #count = 0;
  constructor(capacity: number) {
    this.#values = new Float64Array(Math.max(1, capacity));
    this.#samples = new Int32Array(Math.max(1, capacity));
  }
  add(v: number, sample: number = this.#count): void {
    if (this.#count === this.#values.length) {
      const bigger = new Float64Array(this.#values.length * 2);
      bigger.set(this.#values);
      this.#values = bigger;
      const more = new Int32Array(this.#samples.length * 2);
      more.set(this.#samples);
      this.#samples = more;
    }
    this.#samples[this.#count] = sample;
    this.#values[this.#count++] = v;
  }
  get count(): number {
    return this.#count;
  }
  /** The values laid out by sample, NaN where the quantity was not read. */
  bySample(samples: number): Float64Array {
    const out = new Float64Array(samples).fill(NaN);
    for (let k = 0; k < this.#count; k++) out[this.#samples[k]!] = this.#values[k]!;
    return out;
  }
  summary(): Distribution | null {
    const n = this.#count;
    if (n === 0) return null;
    const v = this.#values.subarray(0, n);
    let sum = 0;
    for (let i = 0; i < n; i++) sum += v[i]!;
    const mean = sum / n;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (v[i]! - mean) ** 2;
    const sorted = Float64Array.from(v).sort();
    return {
      samples: n,
      min: sorted[0]!,
      p1: percentile(sorted, 0.01),
      median: percentile(sorted, 0.5),
      p99: percentile(sorted, 0.99),
      max: sorted[n - 1]!,
      mean,
      sigma: n > 1 ? Math.sqrt(ss / (n - 1)) : 0,
    };
  }
}
