// A TypeScript team rule compiled once, not at every process and lane start: esbuild turns the
// rule, with the local files it imports, into one ES module, kept in opgate's cache folder
// (src/run/cache.ts's location, folder `plugins`) under the SHA-256 of the rule's path, its
// text and the compiler's version. Later runs import the kept module directly: no compiler, no
// loader hooks. What the module was made from is recorded in it and checked at every use: the
// text of each local file it took in (a changed helper compiles the rule again) and the files its
// package imports resolved to. An entry that is damaged, foreign or unreadable is never used: the
// rule is compiled again and the run says so in one line. Entries are written to a temporary
// file and renamed into place, so lanes compiling the same rule at once never see half of one.
//
// Supported: `.ts`/`.mts` rules importing local `.ts`/`.js`/`.json` files (bundled in) and
// packages (left to Node, resolved from the rule's own folder, as if it ran in place);
// `import.meta.url`, `import.meta.dirname` and `import.meta.filename` keep the rule's own file;
// `require` resolves from the rule's folder. Not supported: TypeScript inside a package the rule
// imports (Node loads packages as JavaScript), and `__dirname`/`__filename` (an ES module has none).
import { createHash, randomBytes } from "node:crypto";
import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from "node:fs";
import { createRequire, isBuiltin } from "node:module";
import { dirname, extname, join, relative, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { defaultCacheDir } from "../run/cache.js";

/** Folder of compiled team rules inside opgate's cache folder. */
export const PLUGIN_CACHE_FOLDER = "plugins";

/** First line of an entry: this marker, then the record of what the code was made from. */
const HEADER = "// opgate compiled team rule ";
const FORMAT = "opgate-plugin-cache/1";

interface Recorded {
  readonly format: string;
  readonly compiler: string;
  /** The rule's file (the key covers its text). */
  readonly source: string;
  /** Other local files bundled in, with the SHA-256 of their bytes. */
  readonly inputs: readonly { readonly path: string; readonly sha256: string }[];
  /** Files the rule's package imports resolved to (they must still be there). */
  readonly resolved: readonly string[];
  /** SHA-256 of the code after the first line. */
  readonly sha256: string;
}

export type CompileOutcome = "compiled" | "cached";

export interface CompiledRule {
  /** file: URL of the module to import. */
  readonly url: string;
  readonly outcome: CompileOutcome;
  /** One line when a kept entry could not be trusted (it was replaced). */
  readonly note?: string;
}

const sha256 = (data: string | Uint8Array): string => createHash("sha256").update(data).digest("hex");

/** The plugin cache's folder for this environment. */
export function pluginCacheDir(env: Readonly<Record<string, string | undefined>>): string {
  return join(defaultCacheDir(env), PLUGIN_CACHE_FOLDER);
}

let compilerVersion: string | undefined;

async function compiler(): Promise<typeof import("esbuild")> {
  const esbuild = await import("esbuild");
  compilerVersion = esbuild.version;
  return esbuild;
}

/**
 * The version of the compiler that makes entries. Read from esbuild's package file rather than by
 * loading esbuild, so that a run served from the cache never loads the compiler.
 */
function installedCompilerVersion(): string {
  compilerVersion ??= String((createRequire(import.meta.url)("esbuild/package.json") as { version?: string }).version);
  return compilerVersion;
}

/** Why a kept entry cannot be used, or undefined when it can. */
function untrusted(text: string, path: string): string | undefined {
  const nl = text.indexOf("\n");
  if (!text.startsWith(HEADER) || nl < 0) return "not an entry of this cache";
  let r: Recorded;
  try {
    r = JSON.parse(text.slice(HEADER.length, nl)) as Recorded;
  } catch {
    return "its record does not parse";
  }
  if (r.format !== FORMAT) return `its format is ${String(r.format)}`;
  if (r.source !== path) return "it was made for another file";
  if (sha256(text.slice(nl + 1)) !== r.sha256) return "its code is damaged";
  for (const input of r.inputs) {
    let now: string;
    try {
      now = sha256(readFileSync(input.path));
    } catch {
      return "stale";
    }
    if (now !== input.sha256) return "stale";
  }
  for (const file of r.resolved) {
    try {
      statSync(file);
    } catch {
      return "stale";
    }
  }
  return undefined;
}

/**
 * The compiled module for the TypeScript rule at `path` (absolute): from the cache in `dir` when
 * an entry made from this text by this compiler is there and can be trusted, else compiled now
 * (and kept). Throws the compiler's message (file:line:column) when the rule does not compile.
 */
export async function compiledRule(path: string, dir: string): Promise<CompiledRule> {
  const text = readFileSync(path);
  const key = sha256(`${FORMAT}\0${installedCompilerVersion()}\0${path}\0${sha256(text)}`);
  const entry = join(dir, `${key}.mjs`);
  let note: string | undefined;
  let kept: string | undefined;
  try {
    kept = readFileSync(entry, "utf8");
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code !== "ENOENT") note = `the plugin cache entry for ${path} could not be read (${code ?? String(err)}); compiled it again`;
  }
  if (kept !== undefined) {
    const why = untrusted(kept, path);
    if (why === undefined) return { url: pathToFileURL(entry).href, outcome: "cached" };
    // A changed helper file is not damage: compile again without a word.
    if (why !== "stale") note = `ignored the plugin cache entry for ${path} (${why}); compiled it again`;
  }
  const code = await compile(path);
  try {
    mkdirSync(dir, { recursive: true });
    const temp = `${entry}.${process.pid}.${randomBytes(4).toString("hex")}.tmp`;
    writeFileSync(temp, code);
    renameSync(temp, entry);
  } catch (err) {
    // An unwritable cache costs the next run a compile, nothing else: run from memory.
    return { url: `data:text/javascript;base64,${Buffer.from(code.slice(code.indexOf("\n") + 1)).toString("base64")}`, outcome: "compiled", note: `the plugin cache folder ${dir} is not writable (${(err as NodeJS.ErrnoException).code ?? String(err)}); ${path} is compiled at every run` };
  }
  return { url: pathToFileURL(entry).href, outcome: "compiled", ...(note ? { note } : {}) };
}

const SOURCE_EXTENSIONS = /\.(m|c)?(t|j)sx?$/;

/**
 * The rule API's own module in an installed opgate package, when `index` (its entry, as resolved)
 * takes `defineRule` and friends from it: the names and the module's URL. A rule that imports only
 * those names from "opgate" then imports that one module instead of the entry, which loads every
 * stage of the tool (~140 ms of the plugin thread's start, against ~4 ms) — the very same
 * functions, from the very same files of the same installation.
 */
function ruleApiOf(index: string): { readonly names: readonly string[]; readonly file: string } | undefined {
  try {
    const pkg = JSON.parse(readFileSync(join(dirname(dirname(dirname(index))), "package.json"), "utf8")) as { name?: string };
    if (pkg.name !== "opgate") return undefined;
    const m = /^export \{([\w\s,]+)\} from "\.\/review\/rule\.js";$/m.exec(readFileSync(index, "utf8"));
    const file = join(dirname(index), "review", "rule.js");
    if (!m) return undefined;
    statSync(file);
    return { names: m[1]!.split(",").map((n) => n.trim()).filter(Boolean), file };
  } catch {
    return undefined;
  }
}

/** Compiles the rule into the text of an entry (record line + one ES module). */
async function compile(path: string): Promise<string> {
  try {
    return await compileWith(path, true);
  } catch (err) {
    // The rule imports more than the rule API from "opgate": the whole entry, as Node would.
    if (err instanceof RuleApiTooNarrow) return compileWith(path, false);
    throw err;
  }
}

class RuleApiTooNarrow extends Error {}

async function compileWith(path: string, ruleApiOnly: boolean): Promise<string> {
  const esbuild = await compiler();
  const entryUrl = pathToFileURL(path).href;
  const resolved = new Set<string>();
  const result = await esbuild.build({
    entryPoints: [path],
    bundle: true,
    write: false,
    format: "esm",
    platform: "node",
    target: "node20",
    metafile: true,
    logLevel: "silent",
    absWorkingDir: dirname(path),
    // A package reached through a link (a workspace, \`npm link\`) is still a package.
    preserveSymlinks: true,
    // `require` inside the rule resolves from the rule's own folder.
    banner: { js: `import { createRequire as __opgateCreateRequire } from "node:module";\nconst require = __opgateCreateRequire(${JSON.stringify(entryUrl)});` },
    plugins: [
      {
        name: "opgate-rule-in-place",
        setup(build) {
          // Packages stay outside the module, resolved now from the importing file (as Node
          // would, running the rule in place) and imported by absolute location.
          build.onResolve({ filter: /^[^./]/ }, async (args) => {
            if (args.pluginData === "inner") return undefined;
            if (isBuiltin(args.path) || args.path.startsWith("file:")) return { path: args.path, external: true };
            const found = await build.resolve(args.path, { kind: args.kind, resolveDir: args.resolveDir, pluginData: "inner" });
            if (found.errors.length > 0 || !found.path) {
              throw new Error(`Cannot find package '${args.path}' imported from ${args.importer}`);
            }
            const api = ruleApiOnly && args.path === "opgate" && args.kind === "import-statement" ? ruleApiOf(found.path) : undefined;
            if (api) {
              resolved.add(api.file);
              return { path: api.file, namespace: "opgate-rule-api", pluginData: api };
            }
            if (found.external) return { path: found.path, external: true };
            // Resolved into the repository itself (a tsconfig path alias): local code, bundled in.
            if (!/[\\/]node_modules[\\/]/.test(found.path)) return { path: found.path };
            resolved.add(found.path);
            return { path: args.kind === "require-call" ? found.path : pathToFileURL(found.path).href, external: true };
          });
          build.onLoad({ filter: /.*/, namespace: "opgate-rule-api" }, (args) => {
            const api = args.pluginData as { names: readonly string[]; file: string };
            return { contents: `export { ${api.names.join(", ")} } from ${JSON.stringify(pathToFileURL(api.file).href)};\n`, loader: "js" };
          });
          // import.meta of each local file keeps that file's own location.
          build.onLoad({ filter: SOURCE_EXTENSIONS }, (args) => {
            const source = readFileSync(args.path, "utf8");
            const url = pathToFileURL(args.path).href;
            const contents = source
              .replace(/\bimport\.meta\.url\b/g, JSON.stringify(url))
              .replace(/\bimport\.meta\.dirname\b/g, JSON.stringify(dirname(args.path)))
              .replace(/\bimport\.meta\.filename\b/g, JSON.stringify(args.path));
            const ext = extname(args.path).toLowerCase();
            const loader = ext.endsWith("x") ? (ext.includes("t") ? "tsx" : "jsx") : ext.includes("t") ? "ts" : "js";
            return { contents, loader, resolveDir: dirname(args.path) };
          });
        },
      },
    ],
  }).catch((err: unknown) => {
    const errors = (err as { errors?: { text: string; location?: { file: string } | null }[] }).errors ?? [];
    if (ruleApiOnly && errors.some((e) => e.location?.file.startsWith("opgate-rule-api:") || /No matching export in "opgate-rule-api:/.test(e.text))) throw new RuleApiTooNarrow();
    throw new Error(compileMessage(err, path));
  });
  const code = result.outputFiles[0]!.text;
  const inputs = Object.keys(result.metafile.inputs)
    .filter((p) => !p.startsWith("opgate-rule-api:"))
    .map((p) => resolve(dirname(path), p))
    .filter((p) => p !== path)
    .sort()
    .map((p) => ({ path: p, sha256: sha256(readFileSync(p)) }));
  const record: Recorded = { format: FORMAT, compiler: esbuild.version, source: path, inputs, resolved: [...resolved].sort(), sha256: sha256(code) };
  return `${HEADER}${JSON.stringify(record)}\n${code}`;
}

/** The compiler's first messages as `file:line:column: text`, relative to the rule's folder. */
function compileMessage(err: unknown, path: string): string {
  const errors = (err as { errors?: { text: string; location?: { file: string; line: number; column: number } | null; detail?: unknown }[] }).errors;
  if (!errors || errors.length === 0) return err instanceof Error ? err.message : String(err);
  return errors
    .slice(0, 3)
    .map((e) => {
      if (e.detail instanceof Error) return e.detail.message;
      const where = e.location ? `${relative(dirname(path), resolve(dirname(path), e.location.file)) || e.location.file}:${e.location.line}:${e.location.column + 1}: ` : "";
      return `${where}${e.text}`;
    })
    .join("; ");
}
