// Property: whatever the text, the loader returns a result (a circuit or InputErrors with the
// file named) and never throws — bad input must never become a stack trace.
import fc from "fast-check";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { loadCircuitText } from "../../src/circuit/index.js";

const SEED_TEXT = readFileSync(fileURLToPath(new URL("../../examples/tide-gauge-preamp.yaml", import.meta.url)), "utf8");

function neverThrows(text: string, file: string): boolean {
  const r = loadCircuitText(text, file);
  if (r.ok) return r.circuit.file === file;
  return r.errors.length > 0 && r.errors.every((e) => e.file === file && typeof e.message === "string" && e.message.length > 0 && !/\n\s+at /.test(e.message));
}

describe("loader robustness", () => {
  it("survives random edits of a real circuit file", () => {
    const edit = fc.record({ at: fc.nat({ max: SEED_TEXT.length }), cut: fc.nat({ max: 12 }), insert: fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom(":", "{", "}", "[", "]", ",", "\n", "  ", "&a", "*a", "!!str", "=", "= 1/0", "%", "µ", "__proto__: 1", "- ", "---\n")) });
    fc.assert(
      fc.property(fc.array(edit, { minLength: 1, maxLength: 4 }), (edits) => {
        let text = SEED_TEXT;
        for (const e of edits) text = text.slice(0, e.at) + e.insert + text.slice(e.at + e.cut);
        return neverThrows(text, "fuzz.yaml");
      }),
      { numRuns: 300, seed: 4711 },
    );
  });

  it("survives arbitrary JSON values as a .json file", () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), (v) => neverThrows(JSON.stringify(v), "fuzz.json")), { numRuns: 300, seed: 4712 });
  });

  it("survives arbitrary text", () => {
    fc.assert(fc.property(fc.string({ maxLength: 300 }), (s) => neverThrows(s, "fuzz.yaml")), { numRuns: 300, seed: 4713 });
  });

  it("keeps the seed file loadable (so the edits above start from a valid circuit)", () => {
    expect(loadCircuitText(SEED_TEXT, "seed.yaml").ok).toBe(true);
  });
});
