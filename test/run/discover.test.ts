// Which files a run checks and how their paths are shown.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { discoverCircuitFiles, displayPath } from "../../src/run/discover.js";

const dir = mkdtempSync(join(tmpdir(), "opgate-discover-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
for (const rel of ["boards/b.yaml", "boards/a.json", "boards/sub/c.yml", "boards/node_modules/x.yaml", "boards/notes.txt", "policy/opgate.config.yaml"]) {
  mkdirSync(join(dir, rel, ".."), { recursive: true });
  writeFileSync(join(dir, rel), "x");
}
const options = { cwd: dir, root: dir, include: ["**/*.{json,yaml,yml}"], exclude: ["**/node_modules/**", "**/opgate.config.*"] };

describe("discoverCircuitFiles", () => {
  it("expands folders with the include globs, minus excludes, sorted by display path", async () => {
    const found = await discoverCircuitFiles(["boards"], options);
    expect(found.map((f) => f.display)).toEqual(["boards/a.json", "boards/b.yaml", "boards/sub/c.yml"]);
  });

  it("uses the include globs under the root when no path is given, and keeps explicit files", async () => {
    expect((await discoverCircuitFiles([], options)).map((f) => f.display)).toEqual(["boards/a.json", "boards/b.yaml", "boards/sub/c.yml"]);
    expect((await discoverCircuitFiles(["boards/notes.txt", "boards/*.yaml"], options)).map((f) => f.display)).toEqual(["boards/b.yaml", "boards/notes.txt"]);
  });

  it("shows files outside a config's folder relative to the working directory", () => {
    expect(displayPath(join(dir, "boards", "b.yaml"), join(dir, "policy"), dir)).toBe("boards/b.yaml");
    expect(displayPath(join(dir, "policy", "x.yaml"), join(dir, "policy"), dir)).toBe("policy/x.yaml");
    // A config found by walking up (root above the working directory) keeps paths repository-relative.
    expect(displayPath(join(dir, "boards", "sub", "c.yml"), dir, join(dir, "boards"))).toBe("boards/sub/c.yml");
  });
});
