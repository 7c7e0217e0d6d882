// Public entry of the circuit stage: file or text → validated, resolved, topology-checked Circuit.
import { dirname, extname } from "node:path";
import { readFileSync, statSync } from "node:fs";
import { ResolveContext } from "./fields.js";
import { circuitLibraryRef, loadLibrary, type LibraryRef } from "./library.js";
import { circuitSubject, describeCircuitPath, rewriteCircuitError } from "./messages.js";
import { MAX_FILE_BYTES, parseDocumentWithPositions } from "./parse.js";
import { loadShippedSchema } from "./precompile.js";
import { resolveCircuit } from "./resolve.js";
import { checkTopology } from "./topology.js";
import type { Circuit, InputError, LibraryUse, LoadResult, Model } from "./types.js";
import { validateWithSchema } from "./validate.js";

export type * from "./types.js";
export { parseDocumentWithPositions, MAX_FILE_BYTES } from "./parse.js";
export { positionOf, pointerToPath, type PositionedDocument, type PathSegment } from "./positions.js";
export { validateWithSchema, compileSchema, reduceErrors, type ValidateOptions } from "./validate.js";
export { parseValue, parseFraction, type Quantity } from "./values.js";
export { evaluateExpression } from "./expressions.js";
export { closest, didYouMean, editDistance } from "./suggest.js";
export { loadLibrary, LIBRARY_FORMAT, sha256, type LibraryRef, type LibraryResult, type LoadedLibrary } from "./library.js";

/** Where a circuit is and which model libraries it gets besides its own. */
export interface LoadOptions {
  /** The circuit file on disk: its own `libraries` are resolved against its folder. */
  readonly path?: string;
  /** The repository folder: a circuit's library paths must stay inside it (default: the circuit's folder). */
  readonly root?: string;
  /** Libraries every circuit uses (from the repository config), in order. */
  readonly libraries?: readonly LibraryRef[];
}

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

/**
 * The models of the circuit's libraries (the config's, then its own, a later one winning over an
 * earlier one with a warning), with their uses; errors at the library's file:line or at the
 * circuit's `libraries` entry.
 */
function libraryModels(ctx: ResolveContext, root: Record<string, unknown>, opts: LoadOptions, file: string) {
  const refs: LibraryRef[] = [...(opts.libraries ?? [])];
  const written = Array.isArray(root["libraries"]) ? (root["libraries"] as string[]) : [];
  written.forEach((w, i) => {
    if (opts.path === undefined) {
      ctx.error(["libraries", i], `library \`${w}\` cannot be found: the circuit was not read from a file`, "check circuit files from disk to use libraries");
      return;
    }
    const ref = circuitLibraryRef(w, opts.path, opts.root ?? dirname(opts.path), file);
    if ("error" in ref) ctx.error(["libraries", i], `library \`${w}\` ${ref.error}`, "write the path relative to this circuit file, e.g. ../lib/parts.yaml");
    else refs.push(ref);
  });
  const models = new Map<string, Model>();
  const uses: LibraryUse[] = [];
  const errors: InputError[] = [];
  const seen = new Set<string>();
  for (const ref of refs) {
    if (seen.has(ref.path)) continue;
    seen.add(ref.path);
    const r = loadLibrary(ref, loadCircuitSchema());
    if (!r.ok) {
      errors.push(...r.errors);
      if (r.use) uses.push(r.use);
      continue;
    }
    uses.push(r.library.use);
    for (const [id, m] of r.library.models) {
      const earlier = models.get(id);
      if (earlier)
        ctx.warnings.push({ file: m.pos.file, line: m.pos.line, column: m.pos.column, message: `model \`${id}\` is defined in two libraries (${earlier.pos.file}:${earlier.pos.line} and here); this one is used`, hint: "keep one definition per id across the libraries a circuit uses", parts: [id] });
      models.set(id, m);
    }
  }
  return { models, uses, errors };
}

/** Parses, validates, resolves and checks circuit text; `file` names it in every message. */
export function loadCircuitText(text: string, file: string, opts: LoadOptions = {}): LoadResult {
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
  const lib = libraryModels(ctx, root, opts, file);
  const used = lib.uses.length ? { libraries: Object.freeze(lib.uses) } : {};
  if (lib.errors.length || ctx.errors.length) return { ok: false, errors: [...ctx.errors.sort(byPosition), ...lib.errors], ...used };
  const circuit = resolveCircuit(ctx, root, lib.models);
  if (ctx.errors.length) return { ok: false, errors: [...ctx.errors].sort(byPosition), ...used };
  const topo = checkTopology(circuit);
  if (topo.errors.length) return { ok: false, errors: topo.errors.sort(byPosition), ...used };
  const withWarnings: Circuit = Object.freeze({ ...circuit, warnings: Object.freeze([...circuit.warnings, ...topo.warnings]), ...used });
  return { ok: true, circuit: withWarnings };
}

/** The first line (1-based) holding bytes that are not UTF-8, or undefined for valid text. */
function invalidUtf8Line(buffer: Buffer): number | undefined {
  const strict = new TextDecoder("utf-8", { fatal: true });
  try {
    strict.decode(buffer);
    return undefined;
  } catch {
    // Find the line: decode line by line (a multi-byte character never contains the byte 0x0A).
    let start = 0;
    for (let line = 1; ; line++) {
      const end = buffer.indexOf(10, start);
      try {
        strict.decode(buffer.subarray(start, end < 0 ? buffer.length : end));
      } catch {
        return line;
      }
      if (end < 0) return line;
      start = end + 1;
    }
  }
}

/** Reads and loads a circuit file; `displayPath` (e.g. repository-relative) names it in messages. */
export async function loadCircuitFile(path: string, opts: { displayPath?: string; root?: string; libraries?: readonly LibraryRef[] } = {}): Promise<LoadResult> {
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
  const invalid = invalidUtf8Line(buffer);
  if (invalid !== undefined) {
    return { ok: false, errors: [{ file: shown, line: invalid, column: 1, message: "the file is not valid UTF-8 text", hint: "save it as UTF-8" }] };
  }
  return loadCircuitText(text, shown, { path, ...(opts.root !== undefined ? { root: opts.root } : {}), ...(opts.libraries ? { libraries: opts.libraries } : {}) });
}
