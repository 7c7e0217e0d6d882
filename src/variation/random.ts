// A small seeded pseudo-random generator, so Monte Carlo runs repeat bit for bit.
// mulberry32: 32-bit state, full period 2^32, plenty for a few thousand samples per circuit.

export type Random = () => number;

export function seededRandom(seed: number): Random {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviate by Box–Muller (one of the pair; simplicity over speed here). */
export function normal(random: Random): number {
  const u = Math.max(random(), Number.MIN_VALUE);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** Triangular distribution on [min, max] with its mode at typ. */
export function triangular(random: Random, min: number, typ: number, max: number): number {
  if (max <= min) return typ;
  const u = random();
  const cut = (typ - min) / (max - min);
  return u < cut
    ? min + Math.sqrt(u * (max - min) * (typ - min))
    : max - Math.sqrt((1 - u) * (max - min) * (max - typ));
}
