// `--shard k/n`: a deterministic slice of the sorted file list. Round-robin by index: the file at
// position i (0-based, in code-point order of display paths) belongs to shard (i mod n) + 1.
// Every machine sorts the same way, so the n shards cover every file exactly once, and their
// sizes differ by at most one.

export interface Shard {
  readonly index: number;
  readonly count: number;
}

/** Largest shard count accepted; more than any CI matrix allows. */
export const MAX_SHARDS = 256;

/** Parses "k/n"; returns an error sentence for anything else. */
export function parseShard(text: string): Shard | string {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m) return `--shard ${text}: expected k/n, e.g. --shard 2/4`;
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || count > MAX_SHARDS) return `--shard ${text}: the shard count must be 1 to ${MAX_SHARDS}`;
  if (index < 1 || index > count) return `--shard ${text}: k must be between 1 and ${count}`;
  return { index, count };
}

/** The items of shard k/n from a list already sorted the canonical way. */
export function selectShard<T>(sorted: readonly T[], shard: Shard): T[] {
  return sorted.filter((_, i) => i % shard.count === shard.index - 1);
}
