// `opgate init`: writes a starter config and the example team rule, refuses to overwrite,
// and what it writes loads (once the package is installed in the repository).
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterEach, beforeEach, expect, it } from "vitest";
import { run } from "../../src/cli/main.js";
import type { CliIo } from "../../src/cli/io.js";
import { loadConfig } from "../../src/review/config.js";

const PACKAGE = resolve(import.meta.dirname, "..", "..");
let repo: string;
beforeEach(() => {
  repo = mkdtempSync(join(tmpdir(), "opgate-init-"));
  writeFileSync(join(repo, "package.json"), JSON.stringify({ name: "tidewater-boards", private: true, type: "module" }));
});
afterEach(() => rmSync(repo, { recursive: true, force: true }));

function fakeIo(cwd: string): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { cwd, env: {}, isTTY: false, out, err, stdout: (t) => out.push(t), stderr: (t) => err.push(t) };
}

it("writes a commented config and the example rule, and refuses to overwrite without --force", async () => {
  const io = fakeIo(repo);
  expect(await run(["init"], io)).toBe(0);
  expect(io.out.join("")).toContain("wrote opgate.config.yaml");
  const config = readFileSync(join(repo, "opgate.config.yaml"), "utf8");
  expect(config).toMatch(/^# opgate repository config/);
  expect(readFileSync(join(repo, "team-rules", "divider-current.ts"), "utf8")).toBe(readFileSync(join(PACKAGE, "examples", "team-rules", "divider-current.ts"), "utf8"));

  const again = fakeIo(repo);
  expect(await run(["init"], again)).toBe(2);
  expect(again.err.join("")).toContain("opgate.config.yaml, team-rules/divider-current.ts and lib/parts.yaml already exist; nothing written");

  writeFileSync(join(repo, "opgate.config.yaml"), "# mine\n");
  expect(await run(["init", "--force"], fakeIo(repo))).toBe(0);
  expect(readFileSync(join(repo, "opgate.config.yaml"), "utf8")).toBe(config);
});

it("writes a config that validates, whose plugin needs the opgate package installed", async () => {
  expect(await run(["init"], fakeIo(repo))).toBe(0);
  const c = await loadConfig({ cwd: repo });
  expect(c).toMatchObject({ failOn: "error", variation: { mode: "corners" } });
  expect(c.plugins).toEqual([join(repo, "team-rules", "divider-current.ts")]);
  // The starter library is listed, and it loads (a valid opgate-library/1 file).
  expect(c.libraries).toEqual([join(repo, "lib", "parts.yaml")]);
  const { loadLibrary, loadCircuitSchema } = await import("../../src/circuit/index.js");
  const lib = loadLibrary({ path: c.libraries[0]!, shown: "lib/parts.yaml" }, loadCircuitSchema());
  expect(lib.ok && [...lib.library.models.keys()]).toEqual(["tw-npn", "tw-pnp", "tw-ref-5v1", "tw-status-led"]);

  const missing = fakeIo(repo);
  expect(await run(["rules"], missing)).toBe(2);
  expect(missing.err.join("")).toContain("install opgate in the repository");

  // As after `npm install --save-dev opgate` (the package's `exports` point at its build).
  if (!existsSync(join(PACKAGE, "dist", "src", "index.js"))) throw new Error("build the package first (npm run build): the plugin imports its dist");
  mkdirSync(join(repo, "node_modules"));
  symlinkSync(PACKAGE, join(repo, "node_modules", "opgate"), "dir");
  const io = fakeIo(repo);
  expect(await run(["rules", "tidewater/divider-current"], io)).toBe(0);
  expect(io.out.join("")).toContain("tidewater/divider-current  [warning]  team-rules/divider-current.ts");
});
