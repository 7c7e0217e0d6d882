// The bundled CLI's code cache (src/bundle/code-cache.ts): a file is compiled once and its V8
// bytecode reused by later loads; a changed file misses; a damaged entry is refused by V8, the
// file compiled from source and the entry written again; the folder keeps a few entries per file;
// OPGATE_CODE_CACHE=off turns it off; processes starting at once all run and leave a whole entry.
// The check that V8 reuses the bytes is V8's own (`Script#cachedDataRejected`, Node's vm docs).
import { spawn, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { CODE_CACHE_FOLDER, codeCacheDir, ENTRIES_PER_FILE, entryPayload } from "../../src/bundle/code-cache.js";

const BUILT = fileURLToPath(new URL("../../dist/src/bundle/code-cache.js", import.meta.url));

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), "opgate-code-cache-"));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

function module(name: string, body: string): string {
  const file = join(dir, name);
  writeFileSync(file, body);
  return file;
}

const BODY = `const helper = require("./helper.cjs");\nmodule.exports = { sum: (a, b) => helper.twice(a) / 2 + b, file: __filename };\n`;

/**
 * Loads `file` through the code cache in a process of its own (as the CLI does: one load per
 * process; within one process V8 keeps a compiled script in memory and never reads the entry
 * again). The entry is written when that process ends. Uses the built module (npm run build).
 */
function load(file: string, cache: string | undefined, call = "m.sum(2, 3)", execArgv: readonly string[] = []): { outcome: string; value: unknown } {
  // One script text for every load: Node's options (the script of -e among them) are part of the key.
  const script = `import { loadBundled, outcomes } from ${JSON.stringify(pathToFileURL(BUILT).href)};
const { TEST_FILE: file, TEST_CACHE: cache, TEST_CALL: call } = process.env;
const m = loadBundled(file, cache || undefined);
console.log(JSON.stringify({ outcome: outcomes.get(file), value: new Function("m", "return " + call)(m) }));`;
  const env = { ...process.env, TEST_FILE: file, TEST_CACHE: cache ?? "", TEST_CALL: call };
  const r = spawnSync(process.execPath, [...execArgv, "--input-type=module", "-e", script], { encoding: "utf8", env });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout) as { outcome: string; value: unknown };
}

describe("code cache", () => {
  it("compiles once: a miss writes the entry when the process ends, the next process uses it", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const cache = join(dir, "cache");
    expect(load(file, cache, "[m.sum(2, 3), m.file]")).toEqual({ outcome: "miss", value: [5, file] });
    const entries = readdirSync(cache);
    expect(entries).toHaveLength(1);
    expect(entries[0]).toMatch(/^lib\.js-[0-9a-f]{32}\.v8$/);
    const before = statSync(join(cache, entries[0]!)).mtimeMs;
    expect(load(file, cache, "m.sum(4, 1)")).toEqual({ outcome: "hit", value: 5 });
    // Nothing to write after a hit: the entry is not touched.
    expect(statSync(join(cache, entries[0]!)).mtimeMs).toBe(before);
  });

  it("keeps one entry per set of Node options (V8 refuses an entry made under other flags)", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const cache = join(dir, "cache");
    expect(load(file, cache).outcome).toBe("miss");
    expect(load(file, cache, "m.sum(2, 3)", ["--stack-size=900"]).outcome).toBe("miss");
    expect(load(file, cache).outcome).toBe("hit");
    expect(load(file, cache, "m.sum(2, 3)", ["--stack-size=900"]).outcome).toBe("hit");
    expect(readdirSync(cache)).toHaveLength(2);
  });

  it("a V8 flag set while running (a long run's heap bound) keys the files loaded after it, and voids no entry", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const before = module("before.js", BODY);
    const after = module("after.js", BODY);
    const cache = join(dir, "cache");
    const heap = pathToFileURL(fileURLToPath(new URL("../../dist/src/run/heap-growth.js", import.meta.url))).href;
    // Loads `before`, sets the flag as a run of 1,000 files does (with TEST_SET_FLAG=1), then loads `after`.
    const script = `import { loadBundled, outcomes } from ${JSON.stringify(pathToFileURL(BUILT).href)};
import { boundHeapGrowth } from ${JSON.stringify(heap)};
const { TEST_BEFORE: before, TEST_AFTER: after, TEST_CACHE: cache, TEST_SET_FLAG: flag } = process.env;
loadBundled(before, cache);
if (flag === "1") boundHeapGrowth([]);
loadBundled(after, cache);
console.log(JSON.stringify([outcomes.get(before), outcomes.get(after)]));`;
    const run = (setFlag: boolean): string[] => {
      const env = { ...process.env, TEST_BEFORE: before, TEST_AFTER: after, TEST_CACHE: cache, TEST_SET_FLAG: setFlag ? "1" : "0" };
      const r = spawnSync(process.execPath, ["--input-type=module", "-e", script], { encoding: "utf8", env });
      if (r.status !== 0) throw new Error(r.stderr);
      return JSON.parse(r.stdout) as string[];
    };
    const entries = (prefix: string): number => readdirSync(cache).filter((n) => n.startsWith(prefix)).length;
    expect(run(true)).toEqual(["miss", "miss"]);
    // `before` was loaded under other flags than its data would be made with: no entry for it.
    expect(entries("before.js-")).toBe(0);
    expect(run(true)).toEqual(["miss", "hit"]);
    // A run without the flag has its own entry for `after` and leaves the other one alone.
    expect(run(false)).toEqual(["miss", "miss"]);
    expect([entries("before.js-"), entries("after.js-")]).toEqual([1, 2]);
    expect(run(false)).toEqual(["hit", "hit"]);
    expect(run(true)).toEqual(["hit", "hit"]);
    expect(run(false)).toEqual(["hit", "hit"]);
  });

  it("misses when the file changes", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const cache = join(dir, "cache");
    load(file, cache);
    // Same length, other code, same modification time: V8 would run the old code for it.
    const { atime, mtime } = statSync(file);
    writeFileSync(file, BODY.replace("+ b", "- b"));
    utimesSync(file, atime, mtime);
    expect(load(file, cache)).toEqual({ outcome: "miss", value: -1 });
  });

  it("refuses a damaged or foreign entry, runs the file from source and writes the entry again", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const cache = join(dir, "cache");
    load(file, cache);
    const entry = join(cache, readdirSync(cache)[0]!);
    const good = readFileSync(entry);
    // V8 checks its payload's checksum only in debug builds: the entry's own CRC-32 catches this.
    const damaged = Buffer.from(good);
    for (let i = 40; i < damaged.length; i += 7) damaged[i] = damaged[i]! ^ 0x5a;
    writeFileSync(entry, damaged);
    expect(load(file, cache)).toEqual({ outcome: "refused", value: 5 });
    expect(readFileSync(entry).equals(damaged)).toBe(false);
    expect(load(file, cache)).toEqual({ outcome: "hit", value: 5 });
    // Not an entry at all (another tool's file, a truncated copy).
    writeFileSync(entry, "not a code cache");
    expect(load(file, cache)).toEqual({ outcome: "refused", value: 5 });
    writeFileSync(entry, good.subarray(0, good.length >> 1));
    expect(load(file, cache)).toEqual({ outcome: "refused", value: 5 });
    // Whole, but made for another file: V8's own check refuses it (the source's length differs).
    const other = module("other.js", `${BODY}\n// a longer file\n`);
    load(other, cache);
    writeFileSync(entry, readFileSync(join(cache, readdirSync(cache).find((n) => n.startsWith("other.js-"))!)));
    expect(load(file, cache)).toEqual({ outcome: "refused", value: 5 });
    expect(load(file, cache)).toEqual({ outcome: "hit", value: 5 });
  });

  it(`keeps the newest ${ENTRIES_PER_FILE} entries per file`, () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const cache = join(dir, "cache");
    for (let i = 0; i < ENTRIES_PER_FILE + 2; i++) {
      writeFileSync(file, `${BODY}// build ${i}\n`);
      expect(load(file, cache).outcome).toBe("miss");
    }
    expect(readdirSync(cache).filter((n) => n.startsWith("lib.js-"))).toHaveLength(ENTRIES_PER_FILE);
  });

  it("is off without a folder, and with OPGATE_CODE_CACHE=off", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    expect(load(file, undefined)).toEqual({ outcome: "off", value: 5 });
    expect(codeCacheDir({ OPGATE_CODE_CACHE: "off", OPGATE_CACHE_DIR: dir })).toBeUndefined();
    expect(codeCacheDir({ OPGATE_CACHE_DIR: dir })).toBe(join(dir, CODE_CACHE_FOLDER));
  });

  it("an unwritable cache folder costs nothing but the cache", () => {
    module("helper.cjs", "exports.twice = (x) => 2 * x;\n");
    const file = module("lib.js", BODY);
    const blocked = module("blocked", "a file where the folder would be\n");
    expect(load(file, join(blocked, "code"))).toEqual({ outcome: "miss", value: 5 });
    expect(load(file, join(blocked, "code"))).toEqual({ outcome: "miss", value: 5 });
  });

  it("entryPayload takes only a whole entry", () => {
    expect(entryPayload(Buffer.from(""))).toBeUndefined();
    expect(entryPayload(Buffer.from("opgate-v8\0\0\0\0\0\0\0\0\0"))).toEqual(Buffer.alloc(0));
  });
});

const BUNDLE = fileURLToPath(new URL("../../dist/bundle/bin.js", import.meta.url));
const EXAMPLE = fileURLToPath(new URL("../../examples/tide-gauge-preamp.yaml", import.meta.url));

function runBundle(cacheDir: string): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [BUNDLE, "check", EXAMPLE, "--json=-", "-q"], { cwd: dir, env: { ...process.env, OPGATE_CACHE_DIR: cacheDir, NO_COLOR: "1" } });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d: Buffer) => (stdout += d.toString()));
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    child.on("close", (code) => resolve({ code, stdout, stderr }));
  });
}

describe("the bundled CLI with its code cache", () => {
  it("four processes starting at once on an empty cache all run; the entries are whole and then used", async () => {
    expect(existsSync(BUNDLE), "npm run build writes dist/bundle/").toBe(true);
    const cache = join(dir, "cache");
    const runs = await Promise.all([0, 1, 2, 3].map(() => runBundle(cache)));
    const off = await runBundle(join(dir, "unused"));
    for (const r of runs) expect(r).toEqual({ ...off, stdout: expect.any(String) as string });
    const strip = (s: string) => s.replace(/"(generatedAt|durationMs|elapsedMs)":\s*[^,}\n]+/g, "");
    for (const r of runs) expect(strip(r.stdout)).toBe(strip(off.stdout));
    const code = join(cache, CODE_CACHE_FOLDER);
    const entries = readdirSync(code);
    expect(entries.filter((n) => n.endsWith(".tmp"))).toEqual([]);
    expect(entries.some((n) => n.startsWith("cli.js-"))).toBe(true);
    // A later run is served from the entries: it writes none of them again.
    const times = new Map(entries.map((n) => [n, statSync(join(code, n)).mtimeMs]));
    const later = await runBundle(cache);
    expect(later.code).toBe(off.code);
    for (const [n, t] of times) expect(statSync(join(code, n)).mtimeMs, n).toBe(t);
  }, 60_000);
});
