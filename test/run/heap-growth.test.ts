// The run's bound on heap growth (src/run/heap-growth.ts) gives way to the user's own flag.
// Its effect on memory is measured in bench/repo.ts (peak memory at 8,000 files), not here.
import { describe, expect, it } from "vitest";
import { boundHeapGrowth } from "../../src/run/heap-growth.js";

// The flag is recorded, not set: V8's flags are the test process's, and a changed flag voids
// the code caches other tests make.
describe("heap growth bound", () => {
  it("is set when node was started without the flag", () => {
    const set: string[] = [];
    expect(boundHeapGrowth(["--enable-source-maps"], (f) => set.push(f))).toBe(true);
    expect(set).toEqual(["--heap-growing-percent=50"]);
  });
  it("leaves the user's own --heap-growing-percent (either spelling) alone", () => {
    const set: string[] = [];
    expect(boundHeapGrowth(["--heap-growing-percent=80"], (f) => set.push(f))).toBe(false);
    expect(boundHeapGrowth(["--heap_growing_percent=80"], (f) => set.push(f))).toBe(false);
    expect(set).toEqual([]);
  });
});
