// The lock file's root entry must say what package.json says: `npm install` copies these fields
// into package-lock.json's `packages[""]`, so any difference means the first `npm install` of a
// fresh clone rewrites the lock and leaves the tree dirty (npm's package-lock.json documentation:
// the "" entry is the root package). .ci/run also re-resolves the whole lock and compares it.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { PACKAGE_ROOT } from "../../src/paths.js";

const json = (name: string) => JSON.parse(readFileSync(join(PACKAGE_ROOT, name), "utf8")) as Record<string, unknown>;

describe("package-lock.json", () => {
  it("has the root entry npm would write from package.json", () => {
    const pkg = json("package.json");
    const lock = json("package-lock.json") as { name: string; version: string; packages: Record<string, Record<string, unknown>> };
    expect(lock.name).toBe(pkg.name);
    expect(lock.version).toBe(pkg.version);
    const root = lock.packages[""]!;
    for (const key of ["name", "version", "license", "bin", "dependencies", "devDependencies", "optionalDependencies", "peerDependencies", "engines"]) {
      expect(root[key], key).toEqual(pkg[key]);
    }
  });
});
