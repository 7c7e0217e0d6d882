// Writes dist/validators/<schema>.cjs: the shipped schemas' validators, generated ahead of time
// so that runs do not compile them (see src/circuit/precompile.ts). Part of `npm run build`,
// after tsc (it uses the compiled generator from dist/).
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { PRECOMPILED_DIR, PRECOMPILED_SCHEMAS, validatorSource } from "../dist/src/circuit/precompile.js";
import { schemaPath } from "../dist/src/paths.js";

mkdirSync(PRECOMPILED_DIR, { recursive: true });
for (const name of PRECOMPILED_SCHEMAS) {
  writeFileSync(join(PRECOMPILED_DIR, `${name}.cjs`), validatorSource(readFileSync(schemaPath(name), "utf8")));
}

// The built-in rules' option schemas (src/review/options-generated.ts).
const { builtinRules } = await import("../dist/rules/index.js");
const { RULE_OPTIONS_FILE, ruleOptionsSource } = await import("../dist/src/review/options-generated.js");
writeFileSync(RULE_OPTIONS_FILE, await ruleOptionsSource(builtinRules()));
