// Model libraries: device models shared by the circuit files of a repository, kept in files of
// format opgate-library/1 (schemas/library.schema.json). A library is parsed, validated and its
// models resolved with positions in the library file itself, so a mistake there is reported at
// the library's file:line:column. Each use is recorded with the SHA-256 of the file's bytes (the
// results document names the library version a circuit was checked with; caches key on it).
import { createHash } from "node:crypto";
import { readFileSync, statSync } from "node:fs";
import { extname, isAbsolute, relative, resolve, sep } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { schemaPath } from "../paths.js";
import { ResolveContext } from "./fields.js";
import { circuitSubject, describeCircuitPath, rewriteCircuitError } from "./messages.js";
import { MAX_FILE_BYTES, parseDocumentWithPositions } from "./parse.js";
import { resolveModel } from "./resolve.js";
import type { InputError, LibraryUse, Model } from "./types.js";
import { useCompiled, validateWithSchema, VALIDATOR_OPTIONS } from "./validate.js";

export const LIBRARY_FORMAT = "opgate-library/1";
const EXTENSIONS = [".yaml", ".yml", ".json"];

/** A library file to load: where it is on disk and how messages name it. */
export interface LibraryRef {
  readonly path: string;
  readonly shown: string;
}

export interface LoadedLibrary {
  readonly use: LibraryUse;
  readonly models: ReadonlyMap<string, Model>;
}

export type LibraryResult =
  | { readonly ok: true; readonly library: LoadedLibrary }
  | { readonly ok: false; readonly errors: readonly InputError[]; readonly use?: LibraryUse };

let librarySchema: object | undefined;

/** The library schema, compiled once beside the circuit schema whose model definitions it uses. */
function schema(circuitSchema: object): object {
  if (librarySchema) return librarySchema;
  const s = JSON.parse(readFileSync(schemaPath("library"), "utf8")) as object;
  const ajv = new Ajv2020({ ...VALIDATOR_OPTIONS });
  ajv.addSchema(circuitSchema);
  useCompiled(s, ajv.compile(s));
  librarySchema = s;
  return s;
}

/** Loaded libraries by digest of path and bytes: a run over many circuits reads a library once per change. */
const cache = new Map<string, LibraryResult>();
const CACHE_LIMIT = 64;

export function sha256(bytes: Buffer | string): string {
  return createHash("sha256").update(bytes).digest("hex");
}

/** Reads and resolves one library file; never throws. */
export function loadLibrary(ref: LibraryRef, circuitSchema: object): LibraryResult {
  const file = ref.shown;
  if (!EXTENSIONS.includes(extname(ref.path).toLowerCase())) return { ok: false, errors: [{ file, message: `model library \`${file}\` is not a .yaml, .yml or .json file`, hint: "name a library file of format opgate-library/1" }] };
  let bytes: Buffer;
  try {
    const st = statSync(ref.path);
    if (!st.isFile()) return { ok: false, errors: [{ file, message: `model library \`${file}\` is not a file`, hint: "name a library file of format opgate-library/1" }] };
    if (st.size > MAX_FILE_BYTES) return { ok: false, errors: [{ file, message: `model library is too large (${st.size} bytes; the limit is ${MAX_FILE_BYTES} bytes)`, hint: "split it into several libraries" }] };
    bytes = readFileSync(ref.path);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    return { ok: false, errors: [{ file, message: code === "ENOENT" ? `model library \`${file}\` not found` : `cannot read model library \`${file}\` (${code ?? "unknown error"})`, hint: "check the path (circuit files: relative to the circuit; the config: relative to the config file)" }] };
  }
  const use: LibraryUse = { file, sha256: sha256(bytes) };
  const key = `${ref.path}\0${file}\0${use.sha256}`;
  const known = cache.get(key);
  if (known) return known;
  const result = resolveLibrary(bytes, use, circuitSchema);
  if (cache.size >= CACHE_LIMIT) cache.delete(cache.keys().next().value!);
  cache.set(key, result);
  return result;
}

function resolveLibrary(bytes: Buffer, use: LibraryUse, circuitSchema: object): LibraryResult {
  const file = use.file;
  const text = bytes.toString("utf8").replace(/^\uFEFF/, "");
  const parsed = parseDocumentWithPositions(text, file, { json: extname(file).toLowerCase() === ".json" });
  if (!parsed.ok) return { ok: false, errors: parsed.errors, use };
  const root = parsed.value;
  if (root === null || typeof root !== "object" || Array.isArray(root))
    return { ok: false, errors: [{ file, line: 1, column: 1, message: "a model library must be a mapping of keys (format, models)", hint: `start with \`format: ${LIBRARY_FORMAT}\`` }], use };
  const errors = validateWithSchema(schema(circuitSchema), root, parsed.positioned, { describe: describeCircuitPath, rewrite: rewriteCircuitError, subject: circuitSubject });
  if (errors.length) return { ok: false, errors, use };
  const ctx = new ResolveContext(parsed.positioned, root);
  const models = new Map<string, Model>();
  for (const [id, raw] of Object.entries((root as { models: Record<string, Record<string, unknown>> }).models)) {
    const m = resolveModel(ctx, id, raw);
    if (m) models.set(id, m);
  }
  if (ctx.errors.length) return { ok: false, errors: ctx.errors, use };
  return { ok: true, library: { use, models } };
}

/**
 * A library path written in a circuit file (untrusted: it comes from a pull request), resolved
 * against the circuit's folder. It must stay inside `root` (the repository), so a circuit cannot
 * make the tool read files elsewhere on the runner; undefined with a reason otherwise.
 */
export function circuitLibraryRef(written: string, circuitPath: string, root: string, shownCircuit: string): LibraryRef | { error: string } {
  if (isAbsolute(written) || /^[A-Za-z]:/.test(written)) return { error: "must be a path relative to the circuit file" };
  const path = resolve(circuitPath, "..", written);
  const inside = relative(resolve(root), path);
  if (inside === "" || inside.startsWith("..") || isAbsolute(inside)) return { error: "must stay inside the repository" };
  const shownDir = shownCircuit.includes("/") ? shownCircuit.slice(0, shownCircuit.lastIndexOf("/") + 1) : "";
  const shown = normalise(`${shownDir}${written.split(sep).join("/")}`);
  return { path, shown };
}

/** "a/b/../c/./d" → "a/c/d" (forward slashes; leading ".." kept). */
function normalise(p: string): string {
  const out: string[] = [];
  for (const part of p.split("/")) {
    if (part === "" || part === ".") continue;
    if (part === ".." && out.length && out[out.length - 1] !== "..") out.pop();
    else out.push(part);
  }
  return out.join("/");
}
