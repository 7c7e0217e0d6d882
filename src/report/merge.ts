// Joins the results documents of a sharded run (`--shard k/n` on each CI job) into the one
// document an unsharded run would have written. Refuses anything that would make the merged
// verdict wrong: overlapping files, different tool versions or settings, missing shards, and
// shards that do not prove they are the exact slices of one run (a file added between two shard
// jobs, or results deleted from a shard document, would otherwise drop a failing circuit).
import { createHash } from "node:crypto";
import { buildDocument, compareText } from "./build.js";
import type { ResultsDocument, ShardProvenance } from "./document.js";

export class MergeError extends Error {}

/** The digest of a run's file list (display paths), as every shard of the run records it. */
export function fileListDigest(displays: readonly string[]): string {
  const hash = createHash("sha256");
  for (const d of [...displays].sort(compareText)) hash.update(`${d}\n`);
  return `sha256:${hash.digest("hex")}`;
}

/** Round-robin by position in code-point order: the same rule as `--shard` (src/run/shard.ts). */
function sliceOf(sorted: readonly string[], index: number, count: number): string[] {
  return sorted.filter((_, i) => i % count === index - 1);
}

/** The shard record of slice index/count of a run over `all` whose own files are `files`. */
export function shardProvenance(all: readonly string[], shard: { index: number; count: number }, files: readonly string[]): ShardProvenance {
  return { index: shard.index, count: shard.count, total: all.length, digest: fileListDigest(all), files: [...files] };
}

function checkShardsCoverOneRun(docs: readonly ResultsDocument[], label: (i: number) => string): void {
  const first = docs[0]!.shard!;
  const total = first.count;
  const byIndex = new Map<number, number>();
  docs.forEach((d, i) => {
    const s = d.shard!;
    if (s.count !== total) throw new MergeError(`${label(i)} is shard ${s.index}/${s.count}, ${label(0)} is shard ${first.index}/${total}: different shard counts`);
    if (s.digest !== first.digest || s.total !== first.total)
      throw new MergeError(`${label(i)} and ${label(0)} are shards of different runs (their full file lists differ: ${s.total} vs ${first.total} files): re-run every shard on the same commit`);
    const prev = byIndex.get(s.index);
    if (prev !== undefined) throw new MergeError(`${label(prev)} and ${label(i)} are both shard ${s.index}/${total}`);
    byIndex.set(s.index, i);
  });
  const missing = [...Array(total).keys()].map((k) => k + 1).filter((k) => !byIndex.has(k));
  if (missing.length > 0) throw new MergeError(`missing shard${missing.length > 1 ? "s" : ""} ${missing.map((k) => `${k}/${total}`).join(", ")}: every shard's results are needed for a verdict`);
  const owner = new Map<string, number>();
  docs.forEach((d, i) => {
    for (const f of d.shard!.files) {
      const prev = owner.get(f);
      if (prev !== undefined) throw new MergeError(`${f} is in both ${label(prev)} and ${label(i)}: the shards overlap`);
      owner.set(f, i);
    }
  });
  const all = [...owner.keys()].sort(compareText);
  if (all.length !== first.total || fileListDigest(all) !== first.digest)
    throw new MergeError(`the shards' file lists do not add up to the run they record (${all.length} files listed, ${first.total} in the run): a shard document was altered or is from another run`);
  docs.forEach((d, i) => {
    const s = d.shard!;
    const expected = sliceOf(all, s.index, total);
    const listed = [...s.files].sort(compareText);
    if (expected.length !== listed.length || expected.some((f, k) => f !== listed[k]))
      throw new MergeError(`${label(i)} lists files that are not slice ${s.index}/${total} of the run: it was altered or sliced another way`);
    const entries = new Map<string, number>();
    for (const c of d.circuits) entries.set(c.file, (entries.get(c.file) ?? 0) + 1);
    for (const c of d.circuits) if (!owner.has(c.file) || owner.get(c.file) !== i) throw new MergeError(`${label(i)} has results for ${c.file}, outside its shard's file list`);
    const lost = listed.filter((f) => entries.get(f) !== 1);
    if (lost.length > 0)
      throw new MergeError(
        `${label(i)} lists ${lost.length === 1 ? "a file" : `${lost.length} files`} without exactly one results entry (${lost.slice(0, 3).join(", ")}${lost.length > 3 ? ", …" : ""}): the document was altered`,
      );
  });
}

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
  if (first.shard) checkShardsCoverOneRun(docs, label);
  else {
    const owner = new Map<string, number>();
    docs.forEach((d, i) => {
      for (const c of d.circuits) {
        const prev = owner.get(c.file);
        if (prev !== undefined) throw new MergeError(`${c.file} is in both ${label(prev)} and ${label(i)}: the documents overlap`);
        owner.set(c.file, i);
      }
    });
  }
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
