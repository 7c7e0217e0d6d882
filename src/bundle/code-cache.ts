// Loads a file of the bundled CLI (CommonJS: dist/bundle/cli.js, the generated validators) with
// V8's code cache, so that a process start does not parse and compile the same ~2 MB of
// JavaScript again: the bytecode V8 made the last time is kept in opgate's cache folder (the
// result cache's, src/run/cache.ts), folder `code`, one entry per file. An entry is keyed by the
// file's path, length and CRC-32 (0.4 ms for 2 MB; a SHA-256 of the text costs ~8 ms of every
// start), the Node and V8 versions, Node's options and the machine: V8 itself tells sources apart only by their
// length, and runs its stale bytecode for an edited file of the same length. V8 checks an entry
// too (its own version and flags, the source's length) and refuses a foreign one; V8 checks its
// payload's checksum only in debug builds, so each entry also carries a CRC-32 of its bytes (as
// Node's own compile cache does) and a damaged one is never handed to V8. A refused or damaged
// entry: the file is compiled from source and the entry written again. Entries are
// written when the process ends (they then hold what the run compiled lazily as well), through a
// temporary file and a rename, so two processes never see half an entry; only the newest few per
// file are kept. Every failure here is silent: the cache only saves time, and a run's output is
// the same with it, without it (OPGATE_CODE_CACHE=off) and from source. Node ≥ 22.1 has a compile
// cache of its own (module.enableCompileCache); this one also works on the Node 20 the package
// supports, and is one code path on both.
import { createHash, randomBytes } from "node:crypto";
import { mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import Module, { createRequire } from "node:module";
import { basename, dirname, join } from "node:path";
import { flagsSetHere } from "../run/heap-growth.js";
import { Script, constants as vmConstants } from "node:vm";
import { crc32 } from "node:zlib";
import { defaultCacheDir } from "../run/cache.js";

/** Folder of the code cache inside opgate's cache folder. */
export const CODE_CACHE_FOLDER = "code";

/** Entries kept per file name: a few builds or installations side by side, no unbounded growth. */
export const ENTRIES_PER_FILE = 4;

/** The code cache's folder, or undefined when OPGATE_CODE_CACHE=off. */
export function codeCacheDir(env: Readonly<Record<string, string | undefined>>): string | undefined {
  if (env.OPGATE_CODE_CACHE === "off") return undefined;
  return join(defaultCacheDir(env), CODE_CACHE_FOLDER);
}

/** What happened to a file's entry: no cache, used, missing, or damaged / refused by V8 (then rewritten). */
export type CodeCacheOutcome = "off" | "hit" | "miss" | "refused";

/** An entry: "opgate-v8\0", the payload's length and CRC-32 (big-endian), V8's payload. */
const MAGIC = Buffer.from("opgate-v8\0", "latin1");
const HEADER = MAGIC.length + 8;

/** V8's payload of an entry, or undefined when the entry is not whole. */
export function entryPayload(entry: Buffer): Buffer | undefined {
  if (entry.length < HEADER || !entry.subarray(0, MAGIC.length).equals(MAGIC)) return undefined;
  const payload = entry.subarray(HEADER);
  if (entry.readUInt32BE(MAGIC.length) !== payload.length || entry.readUInt32BE(MAGIC.length + 4) !== crc32(payload)) return undefined;
  return payload;
}

function entryBytes(payload: Buffer): Buffer {
  const head = Buffer.alloc(HEADER);
  MAGIC.copy(head);
  head.writeUInt32BE(payload.length, MAGIC.length);
  head.writeUInt32BE(crc32(payload), MAGIC.length + 4);
  return Buffer.concat([head, payload]);
}

/** The outcome of every file loaded in this process, by path (for tests and the benchmark). */
export const outcomes = new Map<string, CodeCacheOutcome>();

/** Scripts whose entry is missing or was refused: written when the process ends. */
const pending: { readonly script: Script; readonly entry: string; readonly flags: string }[] = [];
let writeAtExit = false;

function entryPrefix(file: string): string {
  return `${basename(file).replace(/[^\w.-]/g, "_")}-`;
}

function entryName(file: string, bytes: Buffer): string {
  // Node's options too: V8 refuses an entry made under other engine flags, and two ways of
  // starting opgate (with and without NODE_OPTIONS) would otherwise replace each other's entry.
  // And the flags set while running (src/run/heap-growth.ts), for files loaded after that.
  const flags = `${process.execArgv.join(" ")}\0${process.env.NODE_OPTIONS ?? ""}\0${flagsSetHere.join(" ")}`;
  const key = createHash("sha256").update(`${file}\0${bytes.length}\0${crc32(bytes)}\0${process.version}\0${process.versions.v8}\0${process.arch}\0${flags}`).digest("hex");
  return `${entryPrefix(file)}${key.slice(0, 32)}.v8`;
}

/**
 * Runs the CommonJS file `file` and returns its exports, through the code cache in `dir` (none
 * when undefined); `require` is the one the module gets (by default, one resolving from `file`).
 */
export function loadBundled(file: string, dir: string | undefined, require: NodeJS.Require = createRequire(file)): unknown {
  const bytes = readFileSync(file);
  const source = bytes.toString("utf8");
  let cachedData: Buffer | undefined;
  let entry: string | undefined;
  let damaged = false;
  if (dir !== undefined) {
    try {
      entry = join(dir, entryName(file, bytes));
      cachedData = entryPayload(readFileSync(entry));
      damaged = cachedData === undefined;
    } catch {
      cachedData = undefined;
    }
  }
  const script = new Script(Module.wrap(source), {
    filename: file,
    ...(cachedData ? { cachedData } : {}),
    // import() inside the file goes to Node's own loader — but on Node 20 only when the script is
    // compiled from source: from cached data the callback is lost ("A dynamic import callback was
    // not specified"). So a file loaded here require()s what it loads on demand (the build refuses
    // a literal import() of a package in cli.js; the plugin host, which imports team rules, is not
    // loaded through this cache).
    importModuleDynamically: vmConstants.USE_MAIN_CONTEXT_DEFAULT_LOADER,
  });
  const outcome: CodeCacheOutcome = entry === undefined ? "off" : damaged || script.cachedDataRejected ? "refused" : !cachedData ? "miss" : "hit";
  outcomes.set(file, outcome);
  if (entry !== undefined && outcome !== "hit") {
    pending.push({ script, entry, flags: flagsSetHere.join(" ") });
    if (!writeAtExit) {
      writeAtExit = true;
      process.once("exit", writePending);
    }
  }
  const wrapper = script.runInThisContext() as (exports: unknown, require: NodeJS.Require, module: unknown, filename: string, dirname: string) => void;
  const module = { exports: {} as unknown, filename: file, id: file, loaded: false };
  wrapper.call(module.exports, module.exports, require, module, file, dirname(file));
  module.loaded = true;
  return module.exports;
}

/** Writes the entries of the files this process missed or had refused (temporary file, then rename). */
export function writePending(): void {
  for (const { script, entry, flags } of pending.splice(0)) {
    // Made now, the data would carry flags set since the file was loaded: V8 would refuse it
    // under the entry's key (src/run/heap-growth.ts). Another run writes it.
    if (flags !== flagsSetHere.join(" ")) continue;
    const temp = `${entry}.${process.pid}.${randomBytes(4).toString("hex")}.tmp`;
    try {
      const data = script.createCachedData();
      mkdirSync(dirname(entry), { recursive: true });
      writeFileSync(temp, entryBytes(data));
      renameSync(temp, entry);
      prune(dirname(entry), basename(entry));
    } catch {
      try {
        rmSync(temp, { force: true });
      } catch {
        // nothing more to do: the cache only saves time
      }
    }
  }
}

/** Keeps the newest ENTRIES_PER_FILE entries of the file `kept` is one of. */
function prune(dir: string, kept: string): void {
  const prefix = kept.slice(0, kept.length - "0123456789abcdef0123456789abcdef.v8".length);
  const entries = readdirSync(dir)
    .filter((n) => n.startsWith(prefix) && n.endsWith(".v8") && n.length === kept.length)
    .map((n) => {
      try {
        return { n, t: statSync(join(dir, n)).mtimeMs };
      } catch {
        return { n, t: 0 };
      }
    })
    .sort((a, b) => b.t - a.t);
  for (const { n } of entries.slice(ENTRIES_PER_FILE)) if (n !== kept) rmSync(join(dir, n), { force: true });
}
