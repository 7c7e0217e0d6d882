// The result cache (check --cache, src/run/cache.ts): a hit costs no check and gives the same
// bytes in every report; each part of the key (file, config, plugin, version, variation, model
// libraries, recorded dependencies) misses when it changes; corrupt, foreign and unreadable
// entries are ignored with one line; concurrent writers of one entry never leave a partial one.
import { spawn } from "node:child_process";
import { appendFileSync, cpSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { checkFile } from "../../src/pipeline/check-file.js";
import { CACHE_FORMAT, defaultCacheDir, FORMAT_DIR, ResultCache, runKey } from "../../src/run/cache.js";
import { makeCheckContext } from "../../src/run/context.js";
import { EXAMPLES, cli, exampleFiles, makeRepo } from "./repo.js";

let repo: { dir: string; cleanup(): void };
const CONFIG = "opgate.config.yaml";
const files = exampleFiles();

beforeAll(() => {
  repo = makeRepo();
  // The examples' policy (a TypeScript team rule, corners) at the repository root.
  cpSync(join(EXAMPLES, "team-rules"), join(repo.dir, "team-rules"), { recursive: true });
  writeFileSync(join(repo.dir, CONFIG), readFileSync(join(EXAMPLES, CONFIG), "utf8"));
  // The team rule imports opgate, as after npm install.
  mkdirSync(join(repo.dir, "node_modules"));
  symlinkSync(join(EXAMPLES, ".."), join(repo.dir, "node_modules", "opgate"), "dir");
});
afterAll(() => repo.cleanup());

/** All four reports of one run, as text, plus the summary line of the cache. */
async function reports(cacheDir: string | null): Promise<{ code: number; out: Record<string, string>; cacheLine: string }> {
  const outDir = join(repo.dir, "out");
  rmSync(outDir, { recursive: true, force: true });
  const args = ["check", "boards", "-q", "--json", "out/r.json", "--junit", "out/r.xml", "--markdown", "out/r.md", "--sarif", "out/r.sarif"];
  if (cacheDir) args.push("--cache-dir", cacheDir);
  const r = await cli(args, repo.dir);
  const out: Record<string, string> = { console: r.stdout };
  for (const f of ["r.json", "r.xml", "r.md", "r.sarif"]) out[f] = readFileSync(join(outDir, f), "utf8");
  const cacheLine = r.stderr.split("\n").find((l) => l.startsWith("opgate: cache:")) ?? "";
  return { code: r.code, out, cacheLine };
}

const unchanged = (line: string): number => Number(/cache: (\d+) of/.exec(line)?.[1] ?? NaN);

describe("result cache through check", () => {
  const dir = (): string => join(repo.dir, ".cache-a");

  it("gives byte-identical reports cold, warm and without the cache, and a warm run checks nothing", async () => {
    const plain = await reports(null);
    expect(plain.cacheLine).toBe("");
    const cold = await reports(dir());
    expect(unchanged(cold.cacheLine)).toBe(0);
    const warm = await reports(dir());
    expect(warm.cacheLine).toContain(`cache: ${files.length} of ${files.length} files unchanged, 0 checked`);
    for (const run of [cold, warm]) {
      expect(run.code).toBe(plain.code);
      for (const [name, text] of Object.entries(plain.out)) expect(run.out[name], name).toBe(text);
    }
  });

  it("re-checks only a changed file", async () => {
    await reports(dir());
    appendFileSync(join(repo.dir, "boards", files[0]!), "\n# reviewed\n");
    const r = await reports(dir());
    expect(r.cacheLine).toContain(`cache: ${files.length - 1} of ${files.length} files unchanged, 1 checked`);
  });

  it("misses every file when the config, the plugin or the variation settings change", async () => {
    const configPath = join(repo.dir, CONFIG);
    const pluginPath = join(repo.dir, "team-rules", "divider-current.ts");
    const config = readFileSync(configPath, "utf8");
    const plugin = readFileSync(pluginPath, "utf8");
    const changes: [string, () => void][] = [
      ["rule option", () => writeFileSync(configPath, config.replace("fraction: 0.5", "fraction: 0.4"))],
      ["plugin", () => writeFileSync(pluginPath, `${plugin}\n// tightened\n`)],
      ["variation", () => writeFileSync(configPath, config.replace("mode: corners", "mode: nominal"))],
    ];
    try {
      for (const [what, change] of changes) {
        writeFileSync(configPath, config);
        writeFileSync(pluginPath, plugin);
        await reports(dir());
        expect(unchanged((await reports(dir())).cacheLine), `${what} unchanged`).toBe(files.length);
        change();
        expect(unchanged((await reports(dir())).cacheLine), what).toBe(0);
      }
    } finally {
      writeFileSync(configPath, config);
      writeFileSync(pluginPath, plugin);
    }
    // Nine repository runs in corners mode (the worst-case analysis runs 50–150 analyses per file).
  }, 120_000);

  it("ignores corrupt, foreign and unreadable entries with one line, and gives the same reports", async () => {
    const d = join(repo.dir, ".cache-b");
    const plain = await reports(null);
    await reports(d);
    const entries = readdirSync(join(d, FORMAT_DIR), { recursive: true, encoding: "utf8" })
      .filter((f) => f.endsWith(".entry"))
      .map((f) => join(d, FORMAT_DIR, f));
    expect(entries.length).toBe(files.length);
    // Corrupt: cut short; foreign: another file's entry under this name; unreadable: a folder.
    writeFileSync(entries[0]!, readFileSync(entries[0]!, "utf8").slice(0, 100));
    writeFileSync(entries[1]!, readFileSync(entries[2]!, "utf8"));
    rmSync(entries[3]!);
    mkdirSync(entries[3]!);
    writeFileSync(entries[4]!, JSON.stringify({ format: "someone-else/9", key: "x" }));
    const r = await reports(d);
    const lines = r.cacheLine.split("\n");
    expect(lines).toHaveLength(1);
    expect(r.cacheLine).toMatch(/ignored 4 entries that could not be trusted \(first: .*\), those files were checked again/);
    expect(unchanged(r.cacheLine)).toBe(files.length - 4);
    for (const [name, text] of Object.entries(plain.out)) expect(r.out[name], name).toBe(text);
    rmSync(entries[3]!, { recursive: true });
    // The re-checked files were stored again, whole.
    expect(unchanged((await reports(d)).cacheLine)).toBe(files.length - 1);
  });

  it("follows the platform's cache folder, overridable", () => {
    expect(defaultCacheDir({ OPGATE_CACHE_DIR: "/ci/cache" }, "linux", "/home/u")).toBe("/ci/cache");
    expect(defaultCacheDir({ XDG_CACHE_HOME: "/x" }, "linux", "/home/u")).toBe("/x/opgate");
    expect(defaultCacheDir({}, "linux", "/home/u")).toBe("/home/u/.cache/opgate");
    // A relative XDG_CACHE_HOME is ignored (XDG Base Directory Specification).
    expect(defaultCacheDir({ XDG_CACHE_HOME: "rel" }, "linux", "/home/u")).toBe("/home/u/.cache/opgate");
    expect(defaultCacheDir({}, "darwin", "/Users/u")).toBe("/Users/u/Library/Caches/opgate");
  });
});

describe("result cache, key and entries", () => {
  it("misses on another tool version and on a changed model library the config lists", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    expect(runKey(ctx, "0.1.0")).toBe(runKey(ctx, "0.1.0"));
    expect(runKey(ctx, "0.1.0")).not.toBe(runKey(ctx, "0.1.1"));
    const lib = join(repo.dir, "parts.yaml");
    writeFileSync(lib, "models: []\n");
    const before = runKey(ctx, "0.1.0", [lib]);
    expect(before).not.toBe(runKey(ctx, "0.1.0"));
    writeFileSync(lib, "models: [] # revised\n");
    expect(runKey(ctx, "0.1.0", [lib])).not.toBe(before);
  });

  it("re-verifies the dependency files an entry records", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const d = join(repo.dir, ".cache-c");
    const file = { abs: join(repo.dir, "boards", files[1]!), display: `boards/${files[1]}` };
    const dep = join(repo.dir, "shared-models.yaml");
    writeFileSync(dep, "a: 1\n");
    const cache = new ResultCache(d, runKey(ctx, "test"));
    const miss = cache.lookup(file)!;
    expect(miss.result).toBeUndefined();
    const result = await checkFile(file.abs, ctx, file.display);
    cache.store(miss.key, result, [dep]);
    expect(JSON.stringify(cache.lookup(file)!.result)).toBe(JSON.stringify(result));
    writeFileSync(dep, "a: 2\n");
    expect(cache.lookup(file)!.result).toBeUndefined();
    expect(cache.summary()).toMatch(/is stale \(.*shared-models\.yaml changed\)/);
    // Non-finite numbers (an unbounded margin) come back as they were, not as null.
    const odd = { ...result, findings: [{ rule: "x", severity: "warning" as const, subject: "R1", message: "m", measured: NaN, limit: -Infinity, unit: null, margin: Infinity, scenario: "nominal", file: file.display, line: 1, column: 1 }] };
    const key = cache.lookup(file)!.key;
    cache.store(key, odd);
    const back = cache.lookup(file)!.result!;
    expect(back.findings[0]!.margin).toBe(Infinity);
    expect(back.findings[0]!.limit).toBe(-Infinity);
    expect(back.findings[0]!.measured).toBeNaN();
    // Another run key (another policy) never sees the entry.
    expect(new ResultCache(d, runKey(ctx, "other")).lookup(file)!.result).toBeUndefined();
  });

  it("reads a hit's JSON text again when it is used, and refuses it when the entry changed or went away since", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const d = join(repo.dir, ".cache-e");
    const file = { abs: join(repo.dir, "boards", files[3]!), display: `boards/${files[3]}` };
    const cache = new ResultCache(d, runKey(ctx, "test"));
    const key = cache.keyOf(file)!;
    const result = await checkFile(file.abs, ctx, file.display);
    cache.store(key, result);
    const path = cache.entryPath(key);
    const whole = readFileSync(path);
    // Used as found: the JSON text is the one the report would render.
    const hit = cache.probe(file)!.hit!;
    const { jsonCircuit } = await import("../../src/report/json.js");
    expect(cache.parts(hit, file.display)!.json.toString("utf8")).toBe(jsonCircuit(result, true));
    // A byte of the JSON text damaged after the probe: its checksum refuses it.
    const damaged = Buffer.from(whole);
    damaged[damaged.length - 10] = damaged[damaged.length - 10] === 0x20 ? 0x21 : 0x20;
    writeFileSync(path, damaged);
    expect(cache.parts(hit, file.display)).toBeNull();
    expect(cache.summary()).toMatch(/is damaged \(a checksum does not match\)/);
    // Gone after the probe: the caller checks the file (counted as a miss).
    writeFileSync(path, whole);
    const again = cache.probe(file)!.hit!;
    rmSync(path);
    const before = cache.stats.misses;
    expect(cache.parts(again, file.display)).toBeNull();
    expect(cache.stats.misses).toBe(before + 1);
  });

  it("keeps an entry whole while several processes write it at once", async () => {
    const ctx = await makeCheckContext({ cwd: repo.dir });
    const d = join(repo.dir, ".cache-d");
    const file = { abs: join(repo.dir, "boards", files[2]!), display: `boards/${files[2]}` };
    const key = runKey(ctx, "test");
    const result = await checkFile(file.abs, ctx, file.display);
    const resultPath = join(repo.dir, "result.json");
    writeFileSync(resultPath, JSON.stringify(result));
    const cacheModule = fileURLToPath(new URL("../../dist/src/run/cache.js", import.meta.url));
    expect(existsSync(cacheModule), "npm run build first").toBe(true);
    const script =
      `import { ResultCache } from ${JSON.stringify(cacheModule)}; import { readFileSync } from "node:fs";` +
      `const c = new ResultCache(${JSON.stringify(d)}, ${JSON.stringify(key)}); const r = JSON.parse(readFileSync(${JSON.stringify(resultPath)}, "utf8"));` +
      `const f = ${JSON.stringify(file)}; for (let i = 0; i < 150; i++) c.store(c.keyOf(f), r);` +
      `if (c.stats.writeFailed) { console.error(c.stats.writeFailed); process.exit(1); }`;
    const writers = Array.from({ length: 4 }, () => spawn(process.execPath, ["--input-type=module", "-e", script], { stdio: ["ignore", "ignore", "inherit"] }));
    const done = Promise.all(writers.map((w) => new Promise<number>((res) => w.on("exit", (code) => res(code ?? 1)))));
    let finished = false;
    void done.then(() => (finished = true));
    const reader = new ResultCache(d, key);
    let hits = 0;
    while (!finished) {
      const got = reader.lookup(file)!;
      if (got.result) {
        hits++;
        expect(JSON.stringify(got.result)).toBe(JSON.stringify(result));
      }
      await new Promise((res) => setTimeout(res, 1));
    }
    expect(await done).toEqual([0, 0, 0, 0]);
    expect(reader.stats.ignored).toBe(0);
    expect(JSON.stringify(reader.lookup(file)!.result)).toBe(JSON.stringify(result));
    expect(hits + reader.stats.misses).toBeGreaterThan(0);
    // No temporary files left behind.
    const left = readdirSync(join(d, FORMAT_DIR), { recursive: true, encoding: "utf8" }).filter((f) => f.endsWith(".tmp"));
    expect(left).toEqual([]);
    expect(JSON.parse(readFileSync(reader.entryPath(got(reader, file)), "utf8").split("\n")[0]!).format).toBe(CACHE_FORMAT);
  }, 60_000);
});

function got(cache: ResultCache, file: { abs: string; display: string }): string {
  return cache.keyOf(file)!;
}

describe("result cache and model libraries", () => {
  const LIB = (beta: number) => `format: opgate-library/1
models:
  tw-npn: { kind: npn, beta: { min: 100, typ: ${beta}, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
`;
  const OWN = (beta: number) => `format: opgate-library/1
models:
  own-npn: { kind: npn, beta: { min: 100, typ: ${beta}, max: 400 }, saturationCurrent: 1e-14 A }
`;
  const follower = (name: string, model: string, extra = "") => `format: opgate-circuit/1
name: ${name}
${extra}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: RB, kind: resistor, pins: [vcc, b], value: 100k }
  - { id: RB2, kind: resistor, pins: [b, gnd], value: 47k }
  - { id: Q1, kind: npn, model: ${model}, pins: { collector: vcc, base: b, emitter: out } }
  - { id: RE, kind: resistor, pins: [out, gnd], value: 1k }
`;
  let lib: { dir: string; cleanup(): void };
  beforeAll(() => {
    lib = makeRepo({
      "opgate.config.yaml": "libraries: [lib/parts.yaml]\n",
      "lib/parts.yaml": LIB(250),
      "lib/own.yaml": OWN(200),
      "cards/a.yaml": follower("follower-a", "tw-npn"),
      "cards/b.yaml": follower("follower-b", "own-npn", "libraries: [../lib/own.yaml]\n"),
    });
  });
  afterAll(() => lib.cleanup());
  const run = async (): Promise<{ line: string; json: string }> => {
    const r = await cli(["check", "cards", "-q", "--json=-", "--cache-dir", ".c"], lib.dir);
    return { line: r.stderr.split("\n").find((l) => l.startsWith("opgate: cache:")) ?? "", json: r.stdout };
  };

  it("a circuit's own library is a recorded dependency; the config's libraries are part of every key", async () => {
    await run();
    expect((await run()).line).toContain("cache: 2 of 2 files unchanged");
    // The library one circuit names: only that circuit is checked again (the entry's dependency is stale).
    writeFileSync(join(lib.dir, "lib/own.yaml"), OWN(120));
    const own = await run();
    expect(own.line).toContain("cache: 1 of 2 files unchanged, 1 checked");
    expect(own.line).toMatch(/is stale \(.*own\.yaml changed\)/);
    const fresh = await cli(["check", "cards", "-q", "--json=-"], lib.dir);
    expect(own.json).toBe(fresh.stdout);
    // The library the config lists: every circuit.
    writeFileSync(join(lib.dir, "lib/parts.yaml"), LIB(300));
    expect((await run()).line).toContain("cache: 0 of 2 files unchanged, 2 checked");
  });
});
