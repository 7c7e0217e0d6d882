// Joining shard documents, and refusing what would give a wrong merged verdict.
import { describe, expect, it } from "vitest";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { renderJson } from "../../src/report/json.js";
import { MergeError, mergeDocuments, shardProvenance } from "../../src/report/merge.js";
import { BROKEN, FAILING, HOSTILE, OPTIONS, PASSING } from "./fixtures/documents.js";

const RUN = [PASSING, FAILING, BROKEN, HOSTILE];
/** The exact slice k/n of RUN. */
function slice(k: number, n: number): CircuitResult[] {
  const files = RUN.map((c) => c.file).sort();
  return RUN.filter((c) => files.indexOf(c.file) % n === k - 1);
}
function runShard(k: number, n: number, circuits: CircuitResult[] = slice(k, n), files: string[] = slice(k, n).map((c) => c.file)) {
  return buildDocument(circuits, { ...OPTIONS, shard: shardProvenance(RUN.map((c) => c.file), { index: k, count: n }, files) });
}

describe("mergeDocuments", () => {
  it("joins shards into the unsharded document, byte for byte", () => {
    const merged = mergeDocuments([runShard(2, 2), runShard(1, 2)]);
    expect(renderJson(merged)).toBe(renderJson(buildDocument([PASSING, FAILING, BROKEN, HOSTILE], OPTIONS)));
  });

  it("refuses overlapping, mixed-version, mixed-count and incomplete shards", () => {
    const both = slice(1, 2);
    expect(() => mergeDocuments([runShard(1, 2), runShard(2, 2, [...slice(2, 2), both[0]!], [...slice(2, 2), both[0]!].map((c) => c.file))], ["a.json", "b.json"])).toThrow(
      new RegExp(`${both[0]!.file} is in both a.json and b.json`),
    );
    const newer = buildDocument(slice(2, 2), { ...OPTIONS, version: "0.2.0", shard: runShard(2, 2).shard! });
    expect(() => mergeDocuments([runShard(1, 2), newer])).toThrow(/opgate 0.2.0/);
    expect(() => mergeDocuments([runShard(1, 2), runShard(2, 3)])).toThrow(/different shard counts/);
    expect(() => mergeDocuments([runShard(1, 4), runShard(3, 4)])).toThrow(/missing shards 2\/4, 4\/4/);
    expect(() => mergeDocuments([runShard(1, 2), runShard(1, 2)])).toThrow(/both shard 1\/2/);
    const other = buildDocument(slice(2, 2), { ...OPTIONS, failOn: "warning", shard: runShard(2, 2).shard! });
    expect(() => mergeDocuments([runShard(1, 2), other])).toThrow(MergeError);
    expect(() => mergeDocuments([])).toThrow(/nothing to merge/);
  });

  // Issue 12 item 2: shards of two runs whose file lists differ, and a shard whose failing
  // circuit's results were deleted, merged with the failing circuit missing and exit 0.
  it("refuses shards of different runs (a file added between the two jobs)", () => {
    const before = RUN.filter((c) => c !== FAILING);
    const sorted = before.map((c) => c.file).sort();
    const oldFirst = buildDocument(before.filter((c) => sorted.indexOf(c.file) % 2 === 0), { ...OPTIONS, shard: shardProvenance(sorted, { index: 1, count: 2 }, sorted.filter((_, i) => i % 2 === 0)) });
    expect(() => mergeDocuments([oldFirst, runShard(2, 2)], ["old-1.json", "new-2.json"])).toThrow(/shards of different runs/);
  });

  it("refuses a shard whose results were removed while its file list stayed, or whose list was trimmed too", () => {
    const holder = slice(1, 2).some((c) => c === FAILING) ? 1 : 2;
    const other = holder === 1 ? 2 : 1;
    const gutted = runShard(holder, 2, slice(holder, 2).filter((c) => c !== FAILING));
    expect(() => mergeDocuments([gutted, runShard(other, 2)])).toThrow(/without exactly one results entry.*altered/);
    const trimmed = runShard(holder, 2, slice(holder, 2).filter((c) => c !== FAILING), slice(holder, 2).filter((c) => c !== FAILING).map((c) => c.file));
    expect(() => mergeDocuments([trimmed, runShard(other, 2)])).toThrow(/do not add up/);
    // Untouched, the same two shards merge and the failing circuit fails the merged verdict.
    expect(mergeDocuments([runShard(holder, 2), runShard(other, 2)]).summary.verdict).not.toBe("pass");
  });

  it("merges unsharded documents that do not overlap", () => {
    const merged = mergeDocuments([buildDocument([PASSING], OPTIONS), buildDocument([FAILING], OPTIONS)]);
    expect(merged.summary.circuits).toBe(2);
    expect(() => mergeDocuments([buildDocument([PASSING], OPTIONS), buildDocument([PASSING], OPTIONS)])).toThrow(/overlap/);
  });
});
