// The validators generated ahead of time (src/circuit/precompile.ts) must behave exactly like
// the schemas compiled at run time, and must never be used for a schema they were not made from.
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { parseDocumentWithPositions } from "../../src/circuit/parse.js";
import { loadGenerated, PRECOMPILED_SCHEMAS, validatorSource } from "../../src/circuit/precompile.js";
import { compileSchema, useCompiled, validateWithSchema } from "../../src/circuit/validate.js";
import { describeCircuitPath, rewriteCircuitError, circuitSubject } from "../../src/circuit/messages.js";
import { PACKAGE_ROOT, schemaPath } from "../../src/paths.js";

const dir = mkdtempSync(join(tmpdir(), "opgate-precompile-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function generated(name: string, text: string) {
  const file = join(dir, `${name}.cjs`);
  writeFileSync(file, validatorSource(text));
  return { file, validate: loadGenerated(file, text) };
}

/** Text edits that each break an example against the schema in a different way. */
const MUTATIONS: readonly [RegExp, string][] = [
  [/kind: resistor/, "kind: resistr"],
  [/value:/, "vaule:"],
  [/\bname: .*/, ""],
  [/kind: npn/, "kind: 7"],
  [/tolerance: [^,}\n]+/, "tolerance: [1]"],
  [/components:/, "parts:"],
];

/** Every circuit-like file the repository has (the bad-input corpus, the examples) and mutants of the examples. */
function corpus(): { name: string; text: string }[] {
  const from = (folder: string) =>
    readdirSync(folder)
      .filter((f) => /\.(ya?ml|json)$/.test(f) && !f.startsWith("opgate.config."))
      .map((f) => ({ name: f, text: readFileSync(join(folder, f), "utf8") }));
  const examples = from(join(PACKAGE_ROOT, "examples"));
  const mutants = examples.flatMap((e) => MUTATIONS.filter(([re]) => re.test(e.text)).map(([re, by], i) => ({ name: `${e.name}#${i}`, text: e.text.replace(re, by) })));
  return [...from(join(PACKAGE_ROOT, "test", "bad-inputs")), ...examples, ...mutants];
}

describe("generated validators", () => {
  it("give the same errors as the compiled circuit schema on every corpus file", () => {
    const text = readFileSync(schemaPath("circuit"), "utf8");
    const { validate } = generated("circuit", text);
    expect(validate).toBeTypeOf("function");
    // Two copies of the schema: one validated by the generated code, one compiled here.
    const ahead = JSON.parse(text) as object;
    const compiled = JSON.parse(text) as object;
    useCompiled(ahead, validate!);
    expect(compileSchema(ahead)).toBe(validate);
    expect(compileSchema(compiled)).not.toBe(validate);
    const options = { describe: describeCircuitPath, rewrite: rewriteCircuitError, subject: circuitSubject };
    let withErrors = 0;
    const files = corpus();
    for (const { name, text: body } of files) {
      const parsed = parseDocumentWithPositions(body, name, { json: name.endsWith(".json") });
      if (!parsed.ok) continue;
      const a = validateWithSchema(ahead, parsed.value, parsed.positioned, options);
      const b = validateWithSchema(compiled, parsed.value, parsed.positioned, options);
      expect(a, name).toEqual(b);
      if (a.length) withErrors++;
    }
    // The comparison must have covered schema errors, not only valid files.
    expect(withErrors).toBeGreaterThan(30);
    expect(files.length).toBeGreaterThan(70);
  });

  it.each(PRECOMPILED_SCHEMAS)("are made for %s and accept what the compiled schema accepts", (name) => {
    const text = readFileSync(schemaPath(name), "utf8");
    const { validate } = generated(name, text);
    const compiled = compileSchema(JSON.parse(text) as object);
    for (const value of [{}, { format: "opgate-circuit/1" }, { include: ["**/*.yaml"] }, [], "text", null]) {
      expect(validate!(value)).toBe(compiled(value));
      expect(validate!.errors ?? null).toEqual(compiled.errors ?? null);
    }
  });

  it("are ignored when the schema changed after the build, or the file is missing or damaged", () => {
    const text = readFileSync(schemaPath("config"), "utf8");
    const { file } = generated("config-stale", text);
    expect(loadGenerated(file, text)).toBeTypeOf("function");
    expect(loadGenerated(file, text.replace(/}\s*$/, "} "))).toBeUndefined();
    expect(loadGenerated(join(dir, "missing.cjs"), text)).toBeUndefined();
    const damaged = join(dir, "damaged.cjs");
    writeFileSync(damaged, "module.exports = (;");
    expect(loadGenerated(damaged, text)).toBeUndefined();
  });
});
