// "Did you mean" suggestions by edit distance, for typo keys, kinds and references.

/** Optimal-string-alignment distance: insert, delete, substitute, or swap two neighbours; each costs 1 (a swap is the commonest typo). */
export function editDistance(a: string, b: string): number {
  const d: number[][] = Array.from({ length: a.length + 1 }, (_, i) => Array.from({ length: b.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, d[i - 2]![j - 2]! + 1);
      d[i]![j] = v;
    }
  }
  return d[a.length]![b.length]!;
}

/** Largest distance still offered as a suggestion: a third of the word, at least 1, at most 3 (common practice for typo hints). */
function maxDistance(word: string): number {
  return Math.max(1, Math.min(3, Math.floor(word.length / 3)));
}

/** The closest candidate within a small edit distance (case-insensitive match first), or undefined. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  for (const c of candidates) {
    if (c.toLowerCase() === word.toLowerCase() && c !== word) return c;
    const d = editDistance(word, c);
    if (d < bestD) {
      bestD = d;
      best = c;
    }
  }
  return best !== undefined && bestD <= maxDistance(word) && best !== word ? best : undefined;
}

export function didYouMean(word: string, candidates: Iterable<string>): string | undefined {
  const c = closest(word, candidates);
  return c === undefined ? undefined : `did you mean \`${c}\`?`;
}
