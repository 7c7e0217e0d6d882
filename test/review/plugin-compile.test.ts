// A TypeScript team rule compiled once and kept by content (src/review/plugin-compile.ts): the
// second load is served from the cache (no compile), a changed rule or helper compiles again, a
// damaged or foreign entry is never used (one line says so), local imports and packages resolve
// as if the rule ran in place, compile errors name file:line:column, and concurrent loads leave
// one whole entry. The observable is the outcome of each load and the entry files themselves.
import { spawnSync } from "node:child_process";
import { chmodSync, cpSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { compiledRule, PLUGIN_CACHE_FOLDER, pluginCacheDir } from "../../src/review/plugin-compile.js";

let repo: string;
let cache: string;
beforeEach(() => {
  repo = mkdtempSync(join(tmpdir(), "opgate-plugin-compile-"));
  cache = join(repo, ".cache");
  mkdirSync(join(repo, "team-rules"));
});
afterEach(() => {
  chmodSync(repo, 0o755);
  rmSync(repo, { recursive: true, force: true });
});

const RULE = `import { ceiling } from "./limits.js";
interface Options { readonly volts: number }
export const where: string = import.meta.url;
export default {
  id: "tidewater/collector-ceiling",
  description: "Checks that no collector sits above a set voltage",
  severity: "warning" as const,
  docs: "d",
  check(_view: unknown, _report: unknown): number { return ceiling satisfies number; },
} as const;
`;

function write(rel: string, text: string): string {
  const path = join(repo, rel);
  writeFileSync(path, text);
  return path;
}

function entries(): string[] {
  try {
    return readdirSync(cache).sort();
  } catch {
    return [];
  }
}

describe("TypeScript team rule compile cache", () => {
  it("compiles once: the second load is served from the entry, which is not written again", async () => {
    write("team-rules/limits.ts", "export const ceiling: number = 6;\n");
    const rule = write("team-rules/ceiling.ts", RULE);
    const first = await compiledRule(rule, cache);
    expect(first.outcome).toBe("compiled");
    expect(first.note).toBeUndefined();
    expect(entries()).toHaveLength(1);
    const mtime = statSync(join(cache, entries()[0]!)).mtimeMs;
    const second = await compiledRule(rule, cache);
    expect(second).toEqual({ url: first.url, outcome: "cached" });
    expect(statSync(join(cache, entries()[0]!)).mtimeMs).toBe(mtime);
    const mod = (await import(second.url)) as { default: { id: string; check(): number }; where: string };
    expect(mod.default.id).toBe("tidewater/collector-ceiling");
    expect(mod.default.check()).toBe(6);
    // import.meta.url is the rule's own file, not the cache entry's.
    expect(mod.where).toBe(pathToFileURL(rule).href);
  });

  it("compiles again when the rule or a local file it imports changes", async () => {
    const limits = write("team-rules/limits.ts", "export const ceiling: number = 6;\n");
    const rule = write("team-rules/ceiling.ts", RULE);
    const first = await compiledRule(rule, cache);
    write("team-rules/ceiling.ts", RULE.replace('"warning"', '"error"'));
    const changed = await compiledRule(rule, cache);
    expect(changed.outcome).toBe("compiled");
    expect(changed.url).not.toBe(first.url);
    expect(((await import(changed.url)) as { default: { severity: string } }).default.severity).toBe("error");
    writeFileSync(limits, "export const ceiling: number = 9;\n");
    const helper = await compiledRule(rule, cache);
    expect(helper.outcome).toBe("compiled");
    expect(helper.note).toBeUndefined(); // a changed helper is not damage
    // Same entry name (the rule's text is unchanged), new content: a fresh URL for the import.
    expect(((await import(`${helper.url}?v=2`)) as { default: { check(): number } }).default.check()).toBe(9);
    expect((await compiledRule(rule, cache)).outcome).toBe("cached");
  });

  it("never uses a damaged or foreign entry: compiles again and says so in one line", async () => {
    write("team-rules/limits.ts", "export const ceiling: number = 6;\n");
    const rule = write("team-rules/ceiling.ts", RULE);
    await compiledRule(rule, cache);
    const entry = join(cache, entries()[0]!);
    const good = readFileSync(entry, "utf8");
    writeFileSync(entry, good.replace("return ceiling", "return 1 + ceiling"));
    const damaged = await compiledRule(rule, cache);
    expect(damaged.outcome).toBe("compiled");
    expect(damaged.note).toMatch(/^ignored the plugin cache entry for .*ceiling\.ts \(its code is damaged\); compiled it again$/);
    expect(readFileSync(entry, "utf8")).toBe(good);
    for (const [text, why] of [
      ["console.log('not ours')\n", "not an entry of this cache"],
      [`// opgate compiled team rule {"format":"opgate-plugin-cache/0"}\n`, "its format is opgate-plugin-cache/0"],
      ["// opgate compiled team rule {not json\n", "its record does not parse"],
      [good.slice(0, good.length >> 1), "its code is damaged"],
    ] as const) {
      writeFileSync(entry, text);
      const again = await compiledRule(rule, cache);
      expect(again.outcome).toBe("compiled");
      expect(again.note).toContain(`(${why})`);
    }
    expect(await compiledRule(rule, cache)).toMatchObject({ outcome: "cached" });
  });

  it("resolves a package from the rule's own folder, and compiles again when it is gone", async () => {
    mkdirSync(join(repo, "node_modules", "house-limits"), { recursive: true });
    write("node_modules/house-limits/package.json", JSON.stringify({ name: "house-limits", type: "module", exports: "./index.js" }));
    write("node_modules/house-limits/index.js", "export const ceiling = 7;\n");
    const rule = write("team-rules/ceiling.ts", RULE.replace('"./limits.js"', '"house-limits"'));
    const first = await compiledRule(rule, cache);
    expect(((await import(first.url)) as { default: { check(): number } }).default.check()).toBe(7);
    // Left to Node, not copied in: the entry imports the package's file where it is installed.
    expect(readFileSync(fileURLToPath(first.url), "utf8")).toContain(pathToFileURL(join(repo, "node_modules", "house-limits", "index.js")).href);
    rmSync(join(repo, "node_modules"), { recursive: true });
    await expect(compiledRule(rule, cache)).rejects.toThrow(/Cannot find package 'house-limits' imported from .*ceiling\.ts/);
  });

  it("a rule that imports only the rule API from opgate imports that module, not every stage", async () => {
    mkdirSync(join(repo, "node_modules"));
    symlinkSync(fileURLToPath(new URL("../../", import.meta.url)), join(repo, "node_modules", "opgate"), "dir");
    const narrow = write("team-rules/narrow.ts", 'import { defineRule } from "opgate";\nexport default defineRule({ id: "team/narrow", description: "Checks nothing", severity: "note", docs: "d", check() {} });\n');
    const wide = write("team-rules/wide.ts", 'import { defineRule, loadCircuitText } from "opgate";\nexport const load = typeof loadCircuitText;\nexport default defineRule({ id: "team/wide", description: "Checks nothing", severity: "note", docs: "d", check() {} });\n');
    const a = await compiledRule(narrow, cache);
    const narrowCode = readFileSync(fileURLToPath(a.url), "utf8");
    expect(narrowCode).toMatch(/from "file:\/\/[^"]*\/node_modules\/opgate\/dist\/src\/review\/rule\.js"/);
    expect(narrowCode).not.toContain("dist/src/index.js");
    expect(((await import(a.url)) as { default: { id: string } }).default.id).toBe("team/narrow");
    // More than the rule API: the package's entry, as Node would load it.
    const b = await compiledRule(wide, cache);
    expect(readFileSync(fileURLToPath(b.url), "utf8")).toMatch(/from "file:\/\/[^"]*\/node_modules\/opgate\/dist\/src\/index\.js"/);
    const mod = (await import(b.url)) as { default: { id: string }; load: string };
    expect([mod.default.id, mod.load]).toEqual(["team/wide", "function"]);
  });

  it("names file:line:column of a compile error, and keeps nothing", async () => {
    const rule = write("team-rules/broken.ts", "export default {\n  id: 'x',\n  check( {\n");
    await expect(compiledRule(rule, cache)).rejects.toThrow(/broken\.ts:4:1: /);
    expect(entries()).toEqual([]);
  });

  it("still runs the rule when the cache folder cannot be written, and says so", async () => {
    write("team-rules/limits.ts", "export const ceiling: number = 6;\n");
    const rule = write("team-rules/ceiling.ts", RULE);
    const blocked = write("blocked", "a file where the folder would be\n");
    const r = await compiledRule(rule, join(blocked, "plugins"));
    expect(r.outcome).toBe("compiled");
    expect(r.note).toMatch(/is not writable/);
    expect(((await import(r.url)) as { default: { check(): number } }).default.check()).toBe(6);
  });

  it("loads started at once leave one whole entry", async () => {
    write("team-rules/limits.ts", "export const ceiling: number = 6;\n");
    const rule = write("team-rules/ceiling.ts", RULE);
    const all = await Promise.all([0, 1, 2, 3].map(() => compiledRule(rule, cache)));
    expect(new Set(all.map((r) => r.url)).size).toBe(1);
    expect(entries()).toHaveLength(1);
    expect(entries()[0]).toMatch(/^[0-9a-f]{64}\.mjs$/);
    expect((await compiledRule(rule, cache)).outcome).toBe("cached");
  });

  it("lives in opgate's cache folder", () => {
    expect(pluginCacheDir({ OPGATE_CACHE_DIR: "/var/cache/ci-opgate" })).toBe(join("/var/cache/ci-opgate", PLUGIN_CACHE_FOLDER));
  });
});

const BUNDLE = fileURLToPath(new URL("../../dist/bundle/bin.js", import.meta.url));
const EXAMPLES = fileURLToPath(new URL("../../examples/", import.meta.url));

describe("through the bundled CLI", () => {
  it("compiles the examples' team rule in the first process only", () => {
    cpSync(join(EXAMPLES, "team-rules"), join(repo, "team-rules"), { recursive: true });
    cpSync(join(EXAMPLES, "tide-gauge-preamp.yaml"), join(repo, "tide-gauge-preamp.yaml"));
    writeFileSync(join(repo, "opgate.config.yaml"), readFileSync(join(EXAMPLES, "opgate.config.yaml"), "utf8"));
    mkdirSync(join(repo, "node_modules"));
    symlinkSync(join(EXAMPLES, ".."), join(repo, "node_modules", "opgate"), "dir");
    const env = { ...process.env, OPGATE_CACHE_DIR: join(repo, "cache"), NO_COLOR: "1" };
    const run = () => spawnSync(process.execPath, [BUNDLE, "rules"], { cwd: repo, env, encoding: "utf8" });
    const first = run();
    expect(first.status, first.stderr).toBe(0);
    expect(first.stdout).toContain("tidewater/divider-current");
    const plugins = join(repo, "cache", PLUGIN_CACHE_FOLDER);
    const made = readdirSync(plugins);
    expect(made).toHaveLength(1);
    const mtime = statSync(join(plugins, made[0]!)).mtimeMs;
    const second = run();
    expect(second.stdout).toBe(first.stdout);
    expect(readdirSync(plugins)).toEqual(made);
    expect(statSync(join(plugins, made[0]!)).mtimeMs).toBe(mtime);
  }, 60_000);
});
