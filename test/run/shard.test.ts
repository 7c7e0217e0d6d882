// Shard selection: every file in exactly one shard, deterministic, balanced.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parseShard, selectShard } from "../../src/run/shard.js";

describe("selectShard", () => {
  it("covers every file exactly once for n = 1..7", () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string({ minLength: 1, maxLength: 12 }), { maxLength: 60 }), (names) => {
        const sorted = [...names].sort();
        for (let n = 1; n <= 7; n++) {
          const parts = Array.from({ length: n }, (_, k) => selectShard(sorted, { index: k + 1, count: n }));
          const all = parts.flat().sort();
          expect(all).toEqual(sorted);
          const sizes = parts.map((p) => p.length);
          expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
        }
      }),
    );
  });

  it("is round-robin over the sorted list", () => {
    expect(selectShard(["a", "b", "c", "d", "e"], { index: 2, count: 2 })).toEqual(["b", "d"]);
    expect(selectShard(["a", "b", "c", "d", "e"], { index: 1, count: 3 })).toEqual(["a", "d"]);
  });
});

describe("parseShard", () => {
  it("accepts k/n and explains what it rejects", () => {
    expect(parseShard("2/4")).toEqual({ index: 2, count: 4 });
    expect(parseShard(" 1 / 1 ")).toEqual({ index: 1, count: 1 });
    expect(parseShard("5/4")).toMatch(/k must be between 1 and 4/);
    expect(parseShard("0/4")).toMatch(/k must be between/);
    expect(parseShard("1/0")).toMatch(/shard count must be/);
    expect(parseShard("2of4")).toMatch(/expected k\/n/);
  });
});
