// Runs a CommonJS module generated at build time (dist/validators/*.cjs: the schema and rule-option
// validators) with a given `require`, so that its `require("ajv/dist/runtime/…")` resolves from
// this package's own dependencies wherever the file sits. The bundled CLI hands in a loader that
// goes through V8's code cache (src/bundle/code-cache.ts): the circuit validator is ~0.5 MB of
// code, ~6–8 ms to compile at every start.
import { readFileSync } from "node:fs";

export type CommonJsLoader = (file: string, require: NodeJS.Require) => unknown;

function evaluate(file: string, require: NodeJS.Require): unknown {
  const module = { exports: {} as unknown };
  const run = new Function("module", "exports", "require", readFileSync(file, "utf8")) as (m: typeof module, e: unknown, r: NodeJS.Require) => void;
  run(module, module.exports, require);
  return module.exports;
}

let loader: CommonJsLoader = evaluate;

/** Used by the bundled CLI: every generated module is loaded through `load` from now on. */
export function provideCommonJsLoader(load: CommonJsLoader): void {
  loader = load;
}

/** The exports of the generated module at `file`; throws when it cannot be read or run. */
export function loadCommonJs(file: string, require: NodeJS.Require): unknown {
  return loader(file, require);
}
