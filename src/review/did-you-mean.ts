// "Did you mean …?" for misspelt rule ids, option keys and enum values.

/** Levenshtein distance, case-insensitive (a typo in case is still a typo worth suggesting). */
export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  let prev = Array.from({ length: t.length + 1 }, (_, j) => j);
  for (let i = 1; i <= s.length; i++) {
    const cur = [i];
    for (let j = 1; j <= t.length; j++) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      cur.push(Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + cost));
    }
    prev = cur;
  }
  return prev[t.length]!;
}

/** A candidate the word is the start of, else the closest candidate within a third of the word's length (at least 2 edits), or undefined. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  const list = [...candidates];
  // A clipped word ("warn" for "warning") is a likelier slip than any edit distance suggests.
  const extended = list.filter((c) => word.length >= 3 && c.toLowerCase().startsWith(word.toLowerCase())).sort();
  if (extended.length === 1) return extended[0];
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const c of list) {
    const d = editDistance(word, c);
    if (d < bestDistance || (d === bestDistance && best !== undefined && c < best)) {
      best = c;
      bestDistance = d;
    }
  }
  const allowed = Math.max(2, Math.floor(word.length / 3));
  return bestDistance <= allowed ? best : undefined;
}

export function didYouMean(word: string, candidates: Iterable<string>): string | undefined {
  const c = closest(word, candidates);
  return c === undefined ? undefined : `did you mean \`${c}\`?`;
}
