// Public entry of the circuit stage: file or text → validated, resolved, topology-checked Circuit.
import { extname } from "node:path";
import { readFileSync, statSync } from "node:fs";
import { ResolveContext } from "./fields.js";
import { circuitSubject, describeCircuitPath, rewriteCircuitError } from "./messages.js";
import { MAX_FILE_BYTES, parseDocumentWithPositions } from "./parse.js";
import { loadShippedSchema } from "./precompile.js";
import { resolveCircuit } from "./resolve.js";
import { checkTopology } from "./topology.js";
import type { Circuit, InputError, LoadResult } from "./types.js";
import { validateWithSchema } from "./validate.js";

export type * from "./types.js";
export { parseDocumentWithPositions, MAX_FILE_BYTES } from "./parse.js";
export { positionOf, pointerToPath, type PositionedDocument, type PathSegment } from "./positions.js";
export { validateWithSchema, compileSchema, reduceErrors, type ValidateOptions } from "./validate.js";
export { parseValue, parseFraction, type Quantity } from "./values.js";
export { evaluateExpression } from "./expressions.js";
export { closest, didYouMean, editDistance } from "./suggest.js";

export const CIRCUIT_EXTENSIONS: readonly string[] = [".json", ".yaml", ".yml"];

let circuitSchema: object | undefined;
/** The circuit schema, read once from schemas/circuit.schema.json. */
export function loadCircuitSchema(): object {
  circuitSchema ??= loadShippedSchema("circuit");
  return circuitSchema;
}

function byPosition(a: InputError, b: InputError): number {
  return (a.line ?? 0) - (b.line ?? 0) || (a.column ?? 0) - (b.column ?? 0);
}

/** Parses, validates, resolves and checks circuit text; `file` names it in every message. */
export function loadCircuitText(text: string, file: string): LoadResult {
  const parsed = parseDocumentWithPositions(text, file, { json: extname(file).toLowerCase() === ".json" });
  if (!parsed.ok) return parsed;
  if (parsed.value === null || typeof parsed.value !== "object" || Array.isArray(parsed.value)) {
    return { ok: false, errors: [{ file, line: 1, column: 1, message: "a circuit file must be a mapping of keys (format, name, components…)", hint: "start with `format: opgate-circuit/1`" }] };
  }
  const root = parsed.value as Record<string, unknown>;
  if (root["format"] !== "opgate-circuit/1") {
    // Check the format first: a file of another kind should get one clear message, not dozens.
    const pos = parsed.positioned;
    const errs = validateWithSchema({ type: "object", required: ["format"], properties: { format: { const: "opgate-circuit/1" } } }, root, pos, { describe: describeCircuitPath });
    if (errs.length) return { ok: false, errors: errs.map((e) => ({ ...e, hint: "circuit files start with `format: opgate-circuit/1`" })) };
  }
  const schemaErrors = validateWithSchema(loadCircuitSchema(), root, parsed.positioned, { describe: describeCircuitPath, rewrite: rewriteCircuitError, subject: circuitSubject });
  if (schemaErrors.length) return { ok: false, errors: [...schemaErrors].sort(byPosition) };
  const ctx = new ResolveContext(parsed.positioned, root);
  const circuit = resolveCircuit(ctx, root);
  if (ctx.errors.length) return { ok: false, errors: [...ctx.errors].sort(byPosition) };
  const topo = checkTopology(circuit);
  if (topo.errors.length) return { ok: false, errors: topo.errors.sort(byPosition) };
  const withWarnings: Circuit = topo.warnings.length ? Object.freeze({ ...circuit, warnings: Object.freeze([...circuit.warnings, ...topo.warnings]) }) : circuit;
  return { ok: true, circuit: withWarnings };
}

/** Reads and loads a circuit file; `displayPath` (e.g. repository-relative) names it in messages. */
export async function loadCircuitFile(path: string, opts: { displayPath?: string } = {}): Promise<LoadResult> {
  const shown = opts.displayPath ?? path;
  const ext = extname(path).toLowerCase();
  if (!CIRCUIT_EXTENSIONS.includes(ext)) {
    return { ok: false, errors: [{ file: shown, message: `unknown file type \`${ext || "(none)"}\``, hint: "circuit files end in .yaml, .yml or .json" }] };
  }
  // Synchronous on purpose: files are small and checked one after another, and each await of an
  // fs/promises call is a round trip through the libuv thread pool (five per readFile). Measured
  // on the 2,000-file repository: ~1 s of the main thread idle and ~27 futex calls per file.
  let buffer: Buffer;
  try {
    const st = statSync(path);
    if (!st.isFile()) return { ok: false, errors: [{ file: shown, message: "not a file", hint: "name a circuit file or a folder of them" }] };
    if (st.size > MAX_FILE_BYTES) return { ok: false, errors: [{ file: shown, message: `file is too large (${st.size} bytes; the limit is ${MAX_FILE_BYTES} bytes)`, hint: "split the design into several circuit files" }] };
    buffer = readFileSync(path);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    return { ok: false, errors: [{ file: shown, message: code === "ENOENT" ? "file not found" : `cannot read the file (${code ?? "unknown error"})`, hint: "check the path and permissions" }] };
  }
  const text = buffer.toString("utf8").replace(/^\uFEFF/, "");
  if (text.includes("\uFFFD") && !buffer.includes(Buffer.from("\uFFFD"))) {
    return { ok: false, errors: [{ file: shown, message: "the file is not valid UTF-8 text", hint: "save it as UTF-8" }] };
  }
  return loadCircuitText(text, shown);
}
