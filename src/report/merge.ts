// Joins the results documents of a sharded run (`--shard k/n` on each CI job) into the one
// document an unsharded run would have written. Refuses anything that would make the merged
// verdict wrong: overlapping files, different tool versions or settings, missing shards.
import { buildDocument, compareText } from "./build.js";
import type { ResultsDocument } from "./document.js";

export class MergeError extends Error {}

function same(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

/** `names[i]` labels `docs[i]` in messages (the file it came from). */
export function mergeDocuments(docs: readonly ResultsDocument[], names: readonly string[] = docs.map((_, i) => `#${i + 1}`)): ResultsDocument {
  if (docs.length === 0) throw new MergeError("nothing to merge: name the shard results files");
  const first = docs[0]!;
  const label = (i: number): string => names[i] ?? `#${i + 1}`;
  docs.forEach((d, i) => {
    if (d.tool.version !== first.tool.version) {
      throw new MergeError(`${label(i)} was written by opgate ${d.tool.version}, ${label(0)} by ${first.tool.version}: re-run every shard with one version`);
    }
    if (d.summary.failOn !== first.summary.failOn) throw new MergeError(`${label(i)} fails on ${d.summary.failOn}, ${label(0)} on ${first.summary.failOn}: the shards ran with different settings`);
    if (!same(d.variation, first.variation)) throw new MergeError(`${label(i)} and ${label(0)} used different variation settings`);
    if (!same(d.rules, first.rules)) throw new MergeError(`${label(i)} and ${label(0)} ran different rules or severities: the shards ran with different configs`);
    if (Boolean(d.shard) !== Boolean(first.shard)) throw new MergeError(`${label(i)} and ${label(0)}: only some documents are shards`);
  });
  if (first.shard) {
    const total = first.shard.count;
    const byIndex = new Map<number, number>();
    docs.forEach((d, i) => {
      if (d.shard!.count !== total) throw new MergeError(`${label(i)} is shard ${d.shard!.index}/${d.shard!.count}, ${label(0)} is shard ${first.shard!.index}/${total}: different shard counts`);
      const prev = byIndex.get(d.shard!.index);
      if (prev !== undefined) throw new MergeError(`${label(prev)} and ${label(i)} are both shard ${d.shard!.index}/${total}`);
      byIndex.set(d.shard!.index, i);
    });
    const missing = [...Array(total).keys()].map((k) => k + 1).filter((k) => !byIndex.has(k));
    if (missing.length > 0) throw new MergeError(`missing shard${missing.length > 1 ? "s" : ""} ${missing.map((k) => `${k}/${total}`).join(", ")}: every shard's results are needed for a verdict`);
  }
  const owner = new Map<string, number>();
  docs.forEach((d, i) => {
    const files = d.shard ? d.shard.files : d.circuits.map((c) => c.file);
    for (const f of files) {
      const prev = owner.get(f);
      if (prev !== undefined) throw new MergeError(`${f} is in both ${label(prev)} and ${label(i)}: the shards overlap`);
      owner.set(f, i);
    }
    for (const c of d.circuits) if (d.shard && !d.shard.files.includes(c.file)) throw new MergeError(`${label(i)} has results for ${c.file}, outside its shard's file list`);
  });
  const circuits = docs.flatMap((d) => d.circuits);
  circuits.sort((a, b) => compareText(a.file, b.file));
  return buildDocument(circuits, {
    rules: first.rules,
    failOn: first.summary.failOn,
    variation: first.variation,
    version: first.tool.version,
    ...(first.generatedAt ? { timestamp: first.generatedAt } : {}),
  });
}
