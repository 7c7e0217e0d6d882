// Keeps the rules/ folder, the registry and the docs in step: every rule file is registered,
// has a test beside it, documents itself, and every option has a default.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { BUILTIN_RULES } from "../../rules/index.js";
import { defaultOptions } from "../../src/review/options.js";
import { ruleShapeProblems } from "../../src/review/rule.js";

const RULES_DIR = join(import.meta.dirname, "..", "..", "rules");
const files = readdirSync(RULES_DIR);
const ruleFiles = files.filter((f) => f.endsWith(".ts") && !f.endsWith(".test.ts") && f !== "index.ts").map((f) => f.slice(0, -3));

// DESIGN.md section 4: the built-in rule set.
const DESIGNED = ["band-edges", "band-flatness", "capacitor-polarity", "capacitor-voltage", "coil-drive", "device-current", "device-power", "device-ratings", "gain-window", "headroom", "impedance-window", "node-level", "region", "resistor-power", "signal-swing", "solve", "supply-budget"];

describe("built-in rule registry", () => {
  it("holds exactly the rules of DESIGN.md section 4, sorted by id", () => {
    expect([...BUILTIN_RULES.keys()]).toEqual(DESIGNED);
    expect([...BUILTIN_RULES.keys()]).toEqual([...BUILTIN_RULES.keys()].sort());
  });

  it("has one file per rule, named by its id, with a test file beside it", () => {
    expect(ruleFiles.sort()).toEqual([...BUILTIN_RULES.keys()]);
    for (const id of ruleFiles) {
      expect(files, `rules/${id}.test.ts`).toContain(`${id}.test.ts`);
      expect(BUILTIN_RULES.get(id)!.id).toBe(id);
    }
  });

  for (const [id, rule] of BUILTIN_RULES) {
    it(`${id}: shape, one-line description, docs with why and how to fix, defaults for every option`, () => {
      expect(ruleShapeProblems(rule)).toEqual([]);
      expect(rule.description).toMatch(/^Checks [^\n]+[^.]$/);
      expect(rule.docs).toMatch(/Why it matters:/);
      expect(rule.docs).toMatch(/How to fix:/);
      const props = (rule.options.properties ?? {}) as Record<string, { default?: unknown; description?: string }>;
      const defaults = defaultOptions(rule);
      for (const [key, schema] of Object.entries(props)) {
        expect(schema.default, `${id}.${key} default`).toBeDefined();
        expect(schema.description, `${id}.${key} description`).toBeTruthy();
        expect(defaults[key]).toEqual(schema.default);
      }
      expect(rule.options.additionalProperties).toBe(false);
    });

    it(`${id}: every option default has a source or common-practice comment in the rule file`, () => {
      const text = readFileSync(join(RULES_DIR, `${id}.ts`), "utf8");
      for (const key of Object.keys(rule.options.properties ?? {})) {
        const line = text.split("\n").findIndex((l) => new RegExp(`^\\s+${key}: \\{`).test(l));
        expect(line, `${id}.${key} declared`).toBeGreaterThan(0);
        const above = text.split("\n").slice(Math.max(0, line - 6), line).join("\n");
        expect(above, `${id}.${key} comment`).toMatch(/common practice|IEC|from memory|datasheet|rather than/i);
      }
    });
  }
});
