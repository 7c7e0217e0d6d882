// "Did you mean …?" for misspelt rule ids, option keys, severities and enum values: the circuit
// loader's edit-distance suggestions, plus clipped words ("warn" for "warning").
import { closest as closestByDistance } from "../circuit/suggest.js";

/** A candidate the word is the unique start of, else the closest within a small edit distance. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  const list = [...candidates];
  const extended = list.filter((c) => word.length >= 3 && c !== word && c.toLowerCase().startsWith(word.toLowerCase()));
  if (extended.length === 1) return extended[0];
  return closestByDistance(word, list);
}

export function didYouMean(word: string, candidates: Iterable<string>): string | undefined {
  const c = closest(word, candidates);
  return c === undefined ? undefined : `did you mean \`${c}\`?`;
}
