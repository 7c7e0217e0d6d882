// Breadth-first path between two nodes of an undirected graph given as a list of edges, shared by
// the loader's topology check and the solver's singular-system diagnosis (both name the branches
// that close a loop of voltage-fixing parts).

/** The edges of a path with the fewest edges from `from` to `to`; ties go to edges earlier in the list; [] when there is none. */
export function shortestPath<E>(edges: readonly E[], ends: (e: E) => readonly [string, string], from: string, to: string): E[] {
  const adj = new Map<string, { next: string; e: E }[]>();
  for (const e of edges) {
    const [p, q] = ends(e);
    (adj.get(p) ?? adj.set(p, []).get(p)!).push({ next: q, e });
    (adj.get(q) ?? adj.set(q, []).get(q)!).push({ next: p, e });
  }
  const back = new Map<string, { prev: string; e: E }>();
  const queue = [from];
  const seen = new Set([from]);
  while (queue.length) {
    const cur = queue.shift()!;
    if (cur === to) break;
    for (const { next, e } of adj.get(cur) ?? []) {
      if (seen.has(next)) continue;
      seen.add(next);
      back.set(next, { prev: cur, e });
      queue.push(next);
    }
  }
  const path: E[] = [];
  for (let cur = to; cur !== from; ) {
    const step = back.get(cur);
    if (!step) break;
    path.unshift(step.e);
    cur = step.prev;
  }
  return path;
}
