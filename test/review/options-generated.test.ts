// The built-in rules' option validators generated at build time (src/review/options-generated.ts)
// against ajv compiling the same schema at run time with the same options: the same verdict, the
// same error objects and the same defaults filled in, for valid, empty and wrong options.
import { Ajv } from "ajv";
import { describe, expect, it } from "vitest";
import { builtinRules } from "../../rules/index.js";
import { generatedOptionsValidator, OPTIONS_AJV } from "../../src/review/options-generated.js";

describe("generated rule option validators", () => {
  it("exist for every built-in rule (after npm run build) and judge like a run-time compile", () => {
    const ajv = new Ajv(OPTIONS_AJV);
    for (const rule of builtinRules()) {
      const generated = generatedOptionsValidator(rule);
      expect(generated, `${rule.id}: npm run build writes dist/validators/rule-options.cjs`).toBeDefined();
      const compiled = ajv.compile(rule.options);
      const props = Object.keys(rule.options.properties ?? {});
      const inputs: unknown[] = [{}, { notAnOption: 1 }, ...props.map((p) => ({ [p]: "wrong" })), ...props.map((p) => ({ [p]: -1e300 })), "not an object"];
      for (const input of inputs) {
        const a = structuredClone(input);
        const b = structuredClone(input);
        expect(generated!(a), `${rule.id} ${JSON.stringify(input)}`).toBe(compiled(b));
        expect(generated!.errors ?? null).toEqual(compiled.errors ?? null);
        expect(a).toEqual(b);
      }
    }
  });

  it("are not used for a schema that differs from the one they were made from", () => {
    const rule = builtinRules()[0]!;
    expect(generatedOptionsValidator({ ...rule, options: { ...rule.options, description: "changed" } })).toBeUndefined();
  });
});
