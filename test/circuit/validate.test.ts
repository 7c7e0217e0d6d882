// The generic helpers the config loader reuses: parse with positions, JSON Pointer decoding,
// schema errors mapped to lines, oneOf reduction.
import { describe, expect, it } from "vitest";
import { parseDocumentWithPositions } from "../../src/circuit/parse.js";
import { pointerToPath, positionOf, type PositionedDocument } from "../../src/circuit/positions.js";
import { editDistance } from "../../src/circuit/suggest.js";
import { validateWithSchema } from "../../src/circuit/validate.js";

function parsed(text: string, file = "opgate.config.yaml"): { value: unknown; positioned: PositionedDocument } {
  const r = parseDocumentWithPositions(text, file);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join("; "));
  return r;
}

describe("JSON Pointer (RFC 6901) decoding", () => {
  it("decodes ~1 as / and ~0 as ~, in that order", () => {
    expect(pointerToPath("")).toEqual([]);
    expect(pointerToPath("/a~1b/c~0d/~01")).toEqual(["a/b", "c~d", "~1"]);
  });
});

describe("positions", () => {
  const text = "rules:\n  gain-window:\n    severity: error\n  a/b: { severity: warning }\nlist:\n  - x\n  - y\n";
  const p = parsed(text);
  it("finds values and keys by path, including keys with slashes", () => {
    expect(positionOf(p.positioned, ["rules", "gain-window", "severity"])).toMatchObject({ line: 3, column: 15 });
    expect(positionOf(p.positioned, ["rules", "gain-window", "severity"], { key: true })).toMatchObject({ line: 3, column: 5 });
    expect(positionOf(p.positioned, ["rules", "a/b", "severity"])).toMatchObject({ line: 4, column: 20 });
    expect(positionOf(p.positioned, ["list", 1])).toMatchObject({ line: 7, column: 5 });
  });
  it("falls back to the deepest existing ancestor for a missing key", () => {
    expect(positionOf(p.positioned, ["rules", "gain-window", "missing"])).toMatchObject({ line: 3, column: 5 });
  });
});

describe("validateWithSchema with a schema of its own (as the config loader uses it)", () => {
  const schema = {
    type: "object",
    additionalProperties: false,
    properties: {
      failOn: { enum: ["error", "warning", "note"] },
      variation: {
        oneOf: [
          { type: "string", enum: ["nominal", "corners"] },
          { type: "object", additionalProperties: false, required: ["mode"], properties: { mode: { const: "monte-carlo" }, samples: { type: "integer", minimum: 1 } } },
        ],
      },
    },
  };
  it("reports a typo key with its line, column and a suggestion", () => {
    const p = parsed("failOn: error\nvariaton: corners\n");
    expect(validateWithSchema(schema, p.value, p.positioned)).toEqual([
      { file: "opgate.config.yaml", line: 2, column: 1, message: "unknown key `variaton` in the top level", hint: "did you mean `variation`?" },
    ]);
  });
  it("reduces oneOf to the branch that matches the data's shape", () => {
    const p = parsed("variation:\n  mode: monte-carlo\n  sampels: 100\n");
    const errs = validateWithSchema(schema, p.value, p.positioned);
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ line: 3, column: 3, message: expect.stringMatching(/unknown key `sampels`/), hint: "did you mean `samples`?" });
  });
  it("gives one message when no oneOf branch fits", () => {
    const p = parsed("variation: 3\n");
    const errs = validateWithSchema(schema, p.value, p.positioned);
    expect(errs).toHaveLength(1);
    expect(errs[0]!.message).toMatch(/`variation` has the wrong shape/);
  });
  it("suggests enum values", () => {
    const p = parsed("failOn: eror\n");
    expect(validateWithSchema(schema, p.value, p.positioned)[0]).toMatchObject({ line: 1, column: 9, hint: "did you mean `error`?" });
  });
});

describe("parse guards", () => {
  it("duplicate keys, prototype keys and alias bombs are errors with positions where there are some", () => {
    const dup = parseDocumentWithPositions("a: 1\nb: 2\na: 3\n", "f.yaml");
    expect(!dup.ok && dup.errors[0]).toMatchObject({ line: 3, column: 1, message: expect.stringMatching(/duplicate key/) });
    const proto = parseDocumentWithPositions("x:\n  __proto__: 1\n", "f.yaml");
    expect(!proto.ok && proto.errors[0]).toMatchObject({ line: 2, column: 3, message: "key `__proto__` is not allowed" });
    let bomb = "a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n";
    for (let i = 1; i < 8; i++) bomb += `a${i}: &a${i} [${Array(10).fill(`*a${i - 1}`).join(", ")}]\n`;
    const b = parseDocumentWithPositions(bomb, "f.yaml");
    expect(!b.ok && b.errors[0]!.message).toMatch(/too many YAML alias expansions/);
  });
  it("a few aliases are fine", () => {
    expect(parseDocumentWithPositions("a: &v 1\nb: *v\nc: *v\n", "f.yaml").ok).toBe(true);
  });
  it("strict JSON for .json: trailing commas are located", () => {
    const r = parseDocumentWithPositions('{\n  "a": [1, 2,],\n  "b": "x,]"\n}\n', "f.json", { json: true });
    expect(!r.ok && r.errors[0]).toMatchObject({ line: 2, column: 13, message: "invalid JSON: a comma after the last item" });
  });
  it("edit distance counts a swap of neighbours as one edit (optimal string alignment)", () => {
    expect(editDistance("vaule", "value")).toBe(1);
    expect(editDistance("kitten", "sitting")).toBe(3); // the classic Levenshtein example
    expect(editDistance("", "abc")).toBe(3);
  });
});
