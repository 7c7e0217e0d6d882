// The run's outline store (src/run/outline-store.ts): outlines kept in memory up to a limit and
// in a temporary file after it read back exactly what was kept, and the file is gone from the
// temporary folder while the run still reads it (POSIX: removed as soon as it is open).
import { readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { describe, expect, it } from "vitest";
import { outlineOf, outlineParts, outlineText } from "../../src/report/outline.js";
import { OutlineStore } from "../../src/run/outline-store.js";
import { fixtureDocument } from "../report/fixtures/documents.js";

const spillFiles = (): string[] => readdirSync(tmpdir()).filter((f) => f.startsWith(`opgate-outlines-${process.pid}-`));

describe("outline store", () => {
  it("reads back every field of every outline, in memory and spilled, and leaves no file in the temporary folder", () => {
    const circuits = fixtureDocument().circuits;
    expect(circuits.length).toBeGreaterThan(1);
    const before = spillFiles();
    const store = new OutlineStore(0);
    // Each circuit twice, so reads at later offsets of the file are covered too.
    const kept = [...circuits, ...circuits].map((c) => store.keep(outlineText(outlineParts(c))));
    expect(store.spilled).toBeGreaterThan(0);
    expect(spillFiles()).toEqual(before);
    [...circuits, ...circuits].forEach((c, i) => {
      const want = outlineOf(c);
      const got = kept[i]!;
      expect([got.file, got.name, got.status, got.findings, got.scenarios, got.monteCarlo, got.libraries, got.operatingPoint, got.gains]).toEqual([
        want.file,
        want.name,
        want.status,
        want.findings,
        want.scenarios,
        want.monteCarlo,
        want.libraries,
        want.operatingPoint,
        want.gains,
      ]);
    });
  });

  it("keeps outlines in memory up to its limit and spills only what comes after", () => {
    const circuits = fixtureDocument().circuits;
    const texts = circuits.map((c) => outlineText(outlineParts(c)));
    const first = Buffer.byteLength(texts[0]!.text);
    const store = new OutlineStore(first);
    store.keep(texts[0]!);
    expect(store.spilled).toBe(0);
    store.keep(texts[1]!);
    expect(store.spilled).toBe(Buffer.byteLength(texts[1]!.text));
  });
});
