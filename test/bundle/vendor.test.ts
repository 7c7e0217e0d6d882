// Seldom-needed libraries kept out of the bundled CLI's start (src/bundle/vendor.ts): the
// stand-in lists a package's properties without loading it, and loads it on the first read, call
// or construction; a plain one-file check loads none of the groups (each loaded file leaves a
// code-cache entry: the observable), a markdown report loads only the markdown group.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { lazyModule } from "../../src/bundle/vendor.js";

describe("lazyModule", () => {
  it("lists its keys without loading, loads on first use, and behaves as the real exports", () => {
    let loads = 0;
    class Gauge {
      constructor(readonly volts: number) {}
    }
    const real = Object.assign(function glob(p: string) {
      return `found ${p}`;
    }, { Gauge, sync: (p: string) => [p], version: "1.0" });
    Object.defineProperty(real, "__esModule", { value: true, enumerable: false });
    const m = lazyModule(() => (loads++, real), { Gauge: true, sync: true, version: true, __esModule: false }) as typeof real & { __esModule: boolean };
    // What the bundler's interop does at start: list the keys and copy them as getters.
    const copied: Record<string, () => unknown> = {};
    for (const key of Reflect.ownKeys(m)) {
      const d = Reflect.getOwnPropertyDescriptor(m, key)!;
      if (typeof key === "string" && d.enumerable) copied[key] = () => (m as unknown as Record<string, unknown>)[key];
    }
    expect(Object.keys(copied).sort()).toEqual(["Gauge", "sync", "version"]);
    expect(loads).toBe(0);
    expect(m.__esModule).toBe(true);
    expect(loads).toBe(1);
    expect(m("*.yaml")).toBe("found *.yaml");
    expect(m.sync("a")).toEqual(["a"]);
    expect(new m.Gauge(5)).toBeInstanceOf(Gauge);
    expect(copied.version!()).toBe("1.0");
    expect(loads).toBe(1);
  });

  it("can stand for a class", () => {
    class Validator {
      constructor(readonly strict: boolean) {}
    }
    const V = lazyModule(() => Validator, { prototype: false }) as typeof Validator;
    const v = new V(true);
    expect(v).toBeInstanceOf(Validator);
    expect(v.strict).toBe(true);
  });
});

const BUNDLE = fileURLToPath(new URL("../../dist/bundle/bin.js", import.meta.url));
const EXAMPLE = fileURLToPath(new URL("../../examples/tide-gauge-preamp.yaml", import.meta.url));
const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

function loadedFiles(args: readonly string[]): string[] {
  const cache = mkdtempSync(join(tmpdir(), "opgate-vendor-"));
  dirs.push(cache);
  const r = spawnSync(process.execPath, [BUNDLE, ...args], { cwd: cache, encoding: "utf8", env: { ...process.env, OPGATE_CACHE_DIR: cache, NO_COLOR: "1" } });
  expect(r.status, r.stderr).toBe(0);
  return readdirSync(join(cache, "code")).map((n) => n.replace(/-[0-9a-f]{32}\.v8$/, "")).sort();
}

describe("the bundled CLI", () => {
  it("loads no seldom-needed library for a one-file check, and the markdown writer only for a markdown report", () => {
    expect(loadedFiles(["check", EXAMPLE, "-q"])).toEqual(["circuit.cjs", "cli.js", "rule-options.cjs"]);
    expect(loadedFiles(["check", EXAMPLE, "-q", "--markdown=-"])).toEqual(["circuit.cjs", "cli.js", "rule-options.cjs", "vendor-markdown.js"]);
  }, 60_000);
});
