// Content-hash result cache (`check --cache`): a file whose content, policy and tool are unchanged
// since a run that checked it gets that run's result back instead of being checked again.
//
// The key of a file's entry is the SHA-256 of the run key and the file's display path and bytes.
// The run key covers everything else a result depends on: the tool and engine version, the
// resolved policy (rules with their severities and options, fail-on, variation settings), the
// content of every team-rule plugin and of every model library the config lists. An entry can
// also record further files it depends on with their digests; they are re-read and compared on
// every hit. An entry that cannot be read, does not parse, or was written for another key or
// format is never trusted: the file is checked again and the run says so in one line.
//
// Entries are written to a temporary name and renamed into place, so a reader (another lane,
// another CI job sharing the folder) sees a whole entry or none; two writers of the same entry
// write the same bytes, and the last rename wins.
import { createHash, randomBytes } from "node:crypto";
import { closeSync, fstatSync, mkdirSync, openSync, readdirSync, readFileSync, readSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { crc32 } from "node:zlib";
import { homedir } from "node:os";
import { basename, dirname, join, relative, resolve, sep } from "node:path";
import { fileURLToPath } from "node:url";
import type { CheckContext } from "../pipeline/check-file.js";
import type { CircuitResult } from "../report/document.js";
import { jsonCircuit } from "../report/json.js";
import { outlineParts, type OutlineParts, type OutlineText } from "../report/outline.js";
import { parseTagged, stringifyTagged } from "../report/tagged-json.js";
import type { CircuitFile } from "./discover.js";

/** Written into every entry; a change of layout changes it (and the folder entries live in). */
export const CACHE_FORMAT = "opgate-result-cache/3";
export const FORMAT_DIR = "v3";

/** A file an entry depends on besides the circuit file: re-read and compared on every hit. */
export interface CacheDependency {
  readonly path: string;
  readonly sha256: string;
}

/**
 * Where the cache lives: OPGATE_CACHE_DIR when set; else the platform's per-user cache folder —
 * %LOCALAPPDATA%\opgate\Cache on Windows, ~/Library/Caches/opgate on macOS, and
 * $XDG_CACHE_HOME/opgate (default ~/.cache/opgate) elsewhere (XDG Base Directory Specification).
 */
export function defaultCacheDir(env: Readonly<Record<string, string | undefined>>, platform: string = process.platform, home: string = homedir()): string {
  if (env.OPGATE_CACHE_DIR) return env.OPGATE_CACHE_DIR;
  if (platform === "win32") return join(env.LOCALAPPDATA || join(home, "AppData", "Local"), "opgate", "Cache");
  if (platform === "darwin") return join(home, "Library", "Caches", "opgate");
  const xdg = env.XDG_CACHE_HOME;
  // The specification: a relative XDG_CACHE_HOME is invalid and ignored.
  return join(xdg && xdg.startsWith("/") ? xdg : join(home, ".cache"), "opgate");
}

export function sha256(data: string | Uint8Array): string {
  return createHash("sha256").update(data).digest("hex");
}

/** Digest of a file's bytes, or null when it cannot be read. */
function fileDigest(path: string): string | null {
  try {
    return sha256(readFileSync(path));
  } catch {
    return null;
  }
}

/** The model libraries the config lists (every circuit uses them): their content is part of the run key. */
export function configModels(ctx: CheckContext): readonly string[] {
  return ctx.config.libraries ?? [];
}

/**
 * The files a result depends on beyond the circuit file and the run key: the model libraries it
 * records (a library the circuit names itself), with the digests it was checked with.
 */
export function resultDependencies(result: CircuitResult, root: string): CacheDependency[] {
  return (result.libraries ?? []).map((l) => ({ path: resolve(root, l.file), sha256: l.sha256 }));
}

let codeDigestCache: string | undefined;

/**
 * Digest of the tool's own code (every module it runs from, and the shipped schemas): a built-in
 * rule or a model changed without a version bump must not be answered from results of the old
 * code. The bundled CLI runs from dist/bundle/ alone (its few files, ~3 MB, with the generated
 * validators and the schemas); from source or dist/src, src/ and rules/ are read. Once per run,
 * only when the cache is on.
 */
export function codeDigest(): string {
  if (codeDigestCache !== undefined) return codeDigestCache;
  const here = dirname(fileURLToPath(import.meta.url));
  const hash = createHash("sha256");
  let base: string;
  const walk = (dir: string): void => {
    let names: string[];
    try {
      names = readdirSync(dir).sort();
    } catch {
      return;
    }
    for (const name of names) {
      const path = join(dir, name);
      if (name.endsWith(".js") || name.endsWith(".ts") || name.endsWith(".cjs") || name.endsWith(".json")) {
        if (name.endsWith(".test.ts") || name.endsWith(".d.ts")) continue;
        hash.update(relative(base, path)).update("\0").update(readFileSync(path)).update("\0");
      } else if (!name.includes(".")) walk(path);
    }
  };
  if (basename(here) === "bundle") {
    // <package>/dist/bundle/cli.js: the bundle holds every module it runs (and its dependencies).
    const dist = dirname(here);
    base = dirname(dist);
    walk(here);
    walk(join(dist, "validators"));
    walk(join(base, "schemas"));
  } else {
    // This module is <code root>/run/cache.(js|ts); the code root is src/ (or dist/src/), beside rules/ and schemas/.
    const srcDir = dirname(here);
    base = dirname(srcDir);
    walk(srcDir);
    walk(join(base, "rules"));
    walk(join(base, "validators"));
    walk(join(base, base.endsWith(`${sep}dist`) ? join("..", "schemas") : "schemas"));
  }
  codeDigestCache = hash.digest("hex");
  return codeDigestCache;
}

/**
 * The run key: everything besides the circuit file that its result depends on. `models` are the
 * shared model libraries the config lists (absolute paths); `version` the tool's version.
 */
export function runKey(ctx: CheckContext, version: string, models: readonly string[] = []): string {
  const { config } = ctx;
  const strip = (setting: { severity?: unknown; options?: unknown }) => ({ severity: setting.severity ?? null, options: setting.options ?? null });
  const rel = (p: string) => relative(ctx.root, p).split(sep).join("/");
  const policy = {
    format: CACHE_FORMAT,
    version,
    code: codeDigest(),
    // Floating-point library functions (exp, log, pow) may round differently in another engine.
    engine: process.versions.v8,
    rules: ctx.rules.map((r) => [r.id, r.severity, r.source === "builtin" ? "builtin" : rel(r.source)]),
    settings: Object.keys(config.rules)
      .sort()
      .map((id) => [id, strip(config.rules[id]!)]),
    configured: ctx.configured.map((c) => [c.rule.id, c.severity, c.options]),
    failOn: config.failOn,
    variation: config.variation,
    plugins: config.plugins.map((p) => [rel(p), fileDigest(p)]),
    models: [...models].sort().map((p) => [rel(p), fileDigest(p)]),
  };
  return sha256(JSON.stringify(policy));
}

/**
 * An entry is one line of JSON (this header), then five parts back to back, their lengths in
 * bytes in the header (`parts`) with a CRC-32 of each (`crc`): the result's outline (light
 * fields, operating point, gains; see src/report/outline.ts), the whole result, and the result's
 * text in the JSON report. A warm run reads the header and the outline when it looks an entry
 * up, and only the JSON text when it writes the report: the whole result is read and parsed only
 * for a report that needs it (JUnit, HTML, charts). Numbers are tagged JSON
 * (src/report/tagged-json.ts). The checksums catch a damaged entry; the folder itself is trusted
 * like the repository (a checksum, not a signature).
 */
interface Header {
  readonly format: string;
  readonly key: string;
  readonly file: string;
  readonly deps: readonly CacheDependency[];
  /** Byte lengths: outline (light, operating point, gains), result, JSON text. */
  readonly parts: readonly number[];
  /** CRC-32 of each part. */
  readonly crc: readonly number[];
}

const PARTS = 5;
const [LIGHT, OPERATING_POINT, GAINS, RESULT, JSON_TEXT] = [0, 1, 2, 3, 4] as const;
/** First read of an entry: its header and, for most entries, its outline. */
const FIRST_READ = 16 * 1024;
/** A header longer than this (a dependency list gone wild) is not read. */
const HEADER_MAX = 1024 * 1024;

export interface CacheLookup {
  readonly key: string;
  /** The stored result when the entry is present, whole and still valid. */
  readonly result?: CircuitResult;
}

/** Where a valid entry's parts are: what parts() needs to read them again. */
export type CacheEntryPlace = Omit<CacheHit, "outline">;

/** A valid entry found by probe(): its outline now, the rest read when it is used. */
export interface CacheHit {
  readonly key: string;
  /** The entry's outline, as bytes (src/run/outline-store.ts keeps it, or spills it to disk). */
  readonly outline: OutlineText;
  /** The header line as read (a replaced entry has another). */
  readonly header: Buffer;
  /** Offsets of the parts in the entry (PARTS + 1 values). */
  readonly at: readonly number[];
  readonly crc: readonly number[];
}

/** An entry's parts as a report uses them (read again, and verified again, when used). */
export interface CachedParts {
  /** The text of the circuit in the JSON report (jsonCircuit(result, true)), as bytes. */
  readonly json: Buffer;
  /** The whole result, parsed on first call. */
  result(): CircuitResult;
}

export interface CacheStats {
  hits: number;
  misses: number;
  /** Entries present but not trusted (corrupt, foreign, stale dependency, unreadable). */
  ignored: number;
  firstIgnored?: string;
  writeFailed?: string;
}


export class ResultCache {
  readonly stats: CacheStats = { hits: 0, misses: 0, ignored: 0 };
  private readonly root: string;

  constructor(
    readonly dir: string,
    /** The run's policy key (see runKey): a worker opens the same cache with it. */
    readonly runKeyHex: string,
  ) {
    this.root = join(dir, FORMAT_DIR);
  }

  /** Path of the entry for a key (two-level fan-out keeps folders small). */
  entryPath(key: string): string {
    return join(this.root, key.slice(0, 2), `${key}.entry`);
  }

  /** The key of a file from its bytes (read now); null when it cannot be read (it is checked, and reports that). */
  keyOf(file: CircuitFile): string | null {
    let bytes: Buffer;
    try {
      bytes = readFileSync(file.abs);
    } catch {
      return null;
    }
    return createHash("sha256").update(this.runKeyHex).update("\0").update(file.display).update("\0").update(bytes).digest("hex");
  }

  /**
   * Looks a file up: null when the file cannot be read (no key), else its key and, when a valid
   * entry is present, its outline. Counts a hit or a miss.
   */
  probe(file: CircuitFile): { key: string; hit?: CacheHit } | null {
    const key = this.keyOf(file);
    if (key === null) return null;
    const hit = this.readHead(key, file.display);
    if (!hit) {
      this.stats.misses++;
      return { key };
    }
    this.stats.hits++;
    return { key, hit };
  }

  /**
   * The parts of a hit found by probe(), read again (only the header and the JSON text; the
   * entry may have been removed or replaced since); null when it no longer holds (the caller
   * checks the file).
   */
  parts(hit: CacheEntryPlace, display: string): CachedParts | null {
    const path = this.entryPath(hit.key);
    const why = withFile(path, (fd) => {
      const header = readAt(fd, 0, hit.header.length);
      if (!header.equals(hit.header)) return "was replaced during the run";
      return readPart(fd, hit, JSON_TEXT);
    });
    if (!(why instanceof Buffer)) {
      this.ignore(path, why as string);
      this.stats.hits--;
      this.stats.misses++;
      return null;
    }
    let result: CircuitResult | undefined;
    return {
      json: why,
      result: () => {
        if (result) return result;
        const bytes = withFile(path, (fd) => readPart(fd, hit, RESULT));
        if (!(bytes instanceof Buffer)) throw new Error(`the result cache entry ${path} ${bytes} while in use: run again (or without --cache)`);
        result = parseTagged(bytes.toString("utf8")) as CircuitResult;
        return result;
      },
    };
  }

  /** Looks a file up and parses its whole result (tests; a run uses probe and parts). */
  lookup(file: CircuitFile): CacheLookup | null {
    const found = this.probe(file);
    if (!found?.hit) return found;
    const parts = this.parts(found.hit, file.display);
    return parts ? { key: found.key, result: parts.result() } : { key: found.key };
  }

  /** The header and outline of an entry, checked; null (with the reason noted) when it cannot be trusted. */
  private readHead(key: string, display: string): CacheHit | null {
    const path = this.entryPath(key);
    const got = withFile(path, (fd): CacheHit | string => {
      const size = fstatSync(fd).size;
      // Into the scratch buffer: everything kept from it below is copied out.
      let head = readAt(fd, 0, Math.min(size, FIRST_READ), firstRead);
      let eol = head.indexOf(10);
      if (eol < 0 && head.length < size && size > FIRST_READ) {
        head = readAt(fd, 0, Math.min(size, HEADER_MAX));
        eol = head.indexOf(10);
      }
      if (eol < 0) return "is not an entry of this cache format";
      let header: Header;
      try {
        header = JSON.parse(head.toString("utf8", 0, eol)) as Header;
      } catch {
        return "is not an entry of this cache format";
      }
      if (header === null || typeof header !== "object" || header.format !== CACHE_FORMAT) return "is not an entry of this cache format";
      if (header.key !== key || header.file !== display) return "belongs to another file or policy";
      const sizes = header.parts;
      const crc = header.crc;
      const whole = (xs: unknown): xs is number[] => Array.isArray(xs) && xs.length === PARTS && xs.every((n) => Number.isSafeInteger(n) && n >= 0);
      if (!whole(sizes) || !whole(crc)) return "is not an entry of this cache format";
      const at = [eol + 1];
      for (const n of sizes) at.push(at[at.length - 1]! + n);
      if (at[PARTS] !== size) return "is cut short or padded";
      if (!Array.isArray(header.deps)) return "has no dependency list";
      for (const dep of header.deps) {
        if (typeof dep?.path !== "string" || fileDigest(dep.path) !== dep.sha256) return `is stale (${typeof dep?.path === "string" ? dep.path : "a dependency"} changed)`;
      }
      const outlineEnd = at[RESULT]!;
      const bytes = outlineEnd <= head.length ? head : readAt(fd, 0, outlineEnd);
      const part = (i: number): Buffer => bytes.subarray(at[i], at[i + 1]);
      for (const i of [LIGHT, OPERATING_POINT, GAINS]) if (crc32(part(i)) !== crc[i]) return "is damaged (a checksum does not match)";
      let light: OutlineParts["light"];
      try {
        light = parseTagged(part(LIGHT).toString("utf8")) as OutlineParts["light"];
      } catch {
        return "holds an outline that is not valid JSON";
      }
      if (light === null || typeof light !== "object" || light.file !== display || !Array.isArray(light.findings)) return "holds no result";
      // Copies: a slice would keep the whole read in memory for as long as the run keeps the outline.
      const outline: OutlineText = {
        file: light.file,
        name: light.name,
        status: light.status,
        text: Buffer.from(bytes.subarray(at[LIGHT], at[RESULT])),
        lightEnd: at[OPERATING_POINT]! - at[LIGHT]!,
        operatingPointEnd: at[GAINS]! - at[LIGHT]!,
      };
      return { key, outline, header: Buffer.from(head.subarray(0, eol + 1)), at, crc };
    });
    if (typeof got === "string") {
      if (got !== MISSING) this.ignore(path, got);
      return null;
    }
    return got;
  }

  private ignore(path: string, why: string): void {
    this.stats.ignored++;
    this.stats.firstIgnored ??= `${path} ${why}`;
  }

  /**
   * Stores a result under its key (whole file, renamed into place); a failure is remembered, not
   * thrown. `result` is stored as given: a run stores it normalised, as its reports show it.
   */
  store(key: string, result: CircuitResult, deps: readonly (string | CacheDependency)[] = [], outline: OutlineParts = outlineParts(result)): void {
    const parts = [stringifyTagged(outline.light), outline.operatingPoint, outline.gains, stringifyTagged(result), jsonCircuit(result, true)].map((t) => Buffer.from(t, "utf8"));
    const body = Buffer.concat(parts);
    const header: Header = {
      format: CACHE_FORMAT,
      key,
      file: result.file,
      // A path alone is digested now; a dependency with its digest keeps the one the result was made with.
      deps: deps.map((d) => (typeof d === "string" ? { path: d, sha256: fileDigest(d) ?? "" } : d)),
      parts: parts.map((p) => p.length),
      crc: parts.map((p) => crc32(p)),
    };
    const path = this.entryPath(key);
    const temp = `${path}.${process.pid}.${randomBytes(6).toString("hex")}.tmp`;
    try {
      mkdirSync(join(this.root, key.slice(0, 2)), { recursive: true });
      writeFileSync(temp, Buffer.concat([Buffer.from(`${JSON.stringify(header)}\n`, "utf8"), body]));
      renameSync(temp, path);
    } catch (err) {
      rmSync(temp, { force: true });
      this.stats.writeFailed ??= `${path}: ${(err as NodeJS.ErrnoException).code ?? (err instanceof Error ? err.message : String(err))}`;
    }
  }

  /** One line for the run (nothing when there is nothing to say beyond the counts). */
  summary(): string {
    const s = this.stats;
    const total = s.hits + s.misses;
    let line = `cache: ${s.hits} of ${total} file${total === 1 ? "" : "s"} unchanged, ${s.misses} checked (${this.dir})`;
    if (s.ignored > 0) line += `; ignored ${s.ignored} entr${s.ignored === 1 ? "y" : "ies"} that could not be trusted (first: ${s.firstIgnored}), those files were checked again`;
    if (s.writeFailed) line += `; could not write to the cache (${s.writeFailed}), results of this run are not cached`;
    return line;
  }
}

/** An entry that is not there: a miss, nothing to say. */
const MISSING = "is missing";

/** Runs `use` on the open entry; its result, or why the entry cannot be used. */
function withFile<T>(path: string, use: (fd: number) => T | string): T | string {
  let fd: number;
  try {
    fd = openSync(path, "r");
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    return code === "ENOENT" ? MISSING : `cannot be read (${code ?? "error"})`;
  }
  try {
    return use(fd);
  } catch (err) {
    return `cannot be read (${(err as NodeJS.ErrnoException).code ?? "error"})`;
  } finally {
    closeSync(fd);
  }
}

/** `length` bytes at `position` (fewer at the end of the file). */
/**
 * The first read of every entry looked up: one buffer for the run. A new 16 KiB buffer per entry
 * cost 57 ms of a 1.06 s cached re-run of 2,000 files (CPU profile, 2026-12-02).
 */
const firstRead = Buffer.allocUnsafe(FIRST_READ);

/** `length` bytes at `position` (fewer at the end of the file), in `into` when given (it must be long enough). */
function readAt(fd: number, position: number, length: number, into?: Buffer): Buffer {
  const buf = into ? into.subarray(0, length) : Buffer.allocUnsafe(length);
  let got = 0;
  while (got < length) {
    const n = readSync(fd, buf, got, length - got, position + got);
    if (n === 0) break;
    got += n;
  }
  return got === length ? buf : buf.subarray(0, got);
}

/** One part of an entry found by probe(), checked against its checksum. */
function readPart(fd: number, hit: CacheEntryPlace, i: number): Buffer | string {
  const bytes = readAt(fd, hit.at[i]!, hit.at[i + 1]! - hit.at[i]!);
  if (bytes.length !== hit.at[i + 1]! - hit.at[i]!) return "is cut short";
  return crc32(bytes) === hit.crc[i] ? bytes : "is damaged (a checksum does not match)";
}
