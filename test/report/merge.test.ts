// Joining shard documents, and refusing what would give a wrong merged verdict.
import { describe, expect, it } from "vitest";
import { buildDocument } from "../../src/report/build.js";
import type { CircuitResult } from "../../src/report/document.js";
import { renderJson } from "../../src/report/json.js";
import { MergeError, mergeDocuments } from "../../src/report/merge.js";
import { BROKEN, FAILING, HOSTILE, OPTIONS, PASSING } from "./fixtures/documents.js";

function shard(index: number, count: number, circuits: CircuitResult[], version = "0.1.0") {
  return buildDocument(circuits, { ...OPTIONS, version, shard: { index, count, files: circuits.map((c) => c.file) } });
}

describe("mergeDocuments", () => {
  it("joins shards into the unsharded document, byte for byte", () => {
    const merged = mergeDocuments([shard(2, 2, [FAILING, BROKEN]), shard(1, 2, [PASSING, HOSTILE])]);
    expect(renderJson(merged)).toBe(renderJson(buildDocument([PASSING, FAILING, BROKEN, HOSTILE], OPTIONS)));
  });

  it("refuses overlapping, mixed-version, mixed-count and incomplete shards", () => {
    expect(() => mergeDocuments([shard(1, 2, [PASSING]), shard(2, 2, [PASSING])], ["a.json", "b.json"])).toThrow(
      /boards\/tide-gauge\/preamp.yaml is in both a.json and b.json/,
    );
    expect(() => mergeDocuments([shard(1, 2, [PASSING]), shard(2, 2, [FAILING], "0.2.0")])).toThrow(/opgate 0.2.0/);
    expect(() => mergeDocuments([shard(1, 2, [PASSING]), shard(2, 3, [FAILING])])).toThrow(/different shard counts/);
    expect(() => mergeDocuments([shard(1, 4, [PASSING]), shard(3, 4, [FAILING])])).toThrow(/missing shards 2\/4, 4\/4/);
    expect(() => mergeDocuments([shard(1, 2, [PASSING]), shard(1, 2, [FAILING])])).toThrow(/both shard 1\/2/);
    const other = buildDocument([FAILING], { ...OPTIONS, failOn: "warning", shard: { index: 2, count: 2, files: [FAILING.file] } });
    expect(() => mergeDocuments([shard(1, 2, [PASSING]), other])).toThrow(MergeError);
    expect(() => mergeDocuments([])).toThrow(/nothing to merge/);
  });

  it("merges unsharded documents that do not overlap", () => {
    const merged = mergeDocuments([buildDocument([PASSING], OPTIONS), buildDocument([FAILING], OPTIONS)]);
    expect(merged.summary.circuits).toBe(2);
    expect(() => mergeDocuments([buildDocument([PASSING], OPTIONS), buildDocument([PASSING], OPTIONS)])).toThrow(/overlap/);
  });
});
