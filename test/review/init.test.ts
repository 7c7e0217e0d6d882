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
  expect(readFileSync(join(repo, "team-rules", "divider-current.mjs"), "utf8")).toBe(readFileSync(join(PACKAGE, "src", "cli", "starter", "divider-current.mjs"), "utf8"));

  const again = fakeIo(repo);
  expect(await run(["init"], again)).toBe(2);
  expect(again.err.join("")).toContain("opgate.config.yaml, team-rules/divider-current.mjs and lib/parts.yaml already exist; nothing written");

  writeFileSync(join(repo, "opgate.config.yaml"), "# mine\n");
  expect(await run(["init", "--force"], fakeIo(repo))).toBe(0);
  expect(readFileSync(join(repo, "opgate.config.yaml"), "utf8")).toBe(config);
});

it("writes a starter that works as written in an empty repository: opgate init, then opgate check", async () => {
  // An empty repository: no package.json, no node_modules, nothing installed.
  rmSync(join(repo, "package.json"));
  expect(await run(["init"], fakeIo(repo))).toBe(0);
  const c = await loadConfig({ cwd: repo });
  expect(c).toMatchObject({ failOn: "error", variation: { mode: "corners" } });
  expect(c.plugins).toEqual([join(repo, "team-rules", "divider-current.mjs")]);
  const rule = readFileSync(join(repo, "team-rules", "divider-current.mjs"), "utf8");
  // A plain object: no import of a package that the repository does not have.
  expect(rule).not.toMatch(/^\s*import\s/m);
  expect(rule).not.toMatch(/require\(/);
  // No demo company's rule id in a user's repository.
  expect(`${rule}${readFileSync(join(repo, "opgate.config.yaml"), "utf8")}`).not.toMatch(/tidewater/i);
  // The starter library is listed, and it loads (a valid opgate-library/1 file).
  expect(c.libraries).toEqual([join(repo, "lib", "parts.yaml")]);
  const { loadLibrary, loadCircuitSchema } = await import("../../src/circuit/index.js");
  const lib = loadLibrary({ path: c.libraries[0]!, shown: "lib/parts.yaml" }, loadCircuitSchema());
  expect(lib.ok && [...lib.library.models.keys()]).toEqual(["tw-npn", "tw-pnp", "tw-ref-5v1", "tw-status-led"]);

  const rules = fakeIo(repo);
  expect(await run(["rules", "team/divider-current"], rules)).toBe(0);
  expect(rules.out.join("")).toContain("team/divider-current  [warning]  team-rules/divider-current.mjs");

  // A circuit with a weak base divider (about 0.1 mA against a base current near 40 µA): the team
  // rule runs and reports it, and the check exits as the config says (warnings do not fail).
  mkdirSync(join(repo, "boards"));
  writeFileSync(
    join(repo, "boards", "stage.yaml"),
    [
      "format: opgate-circuit/1",
      "name: stage",
      "models:",
      "  small-npn: { kind: npn, beta: 100, saturationCurrent: 1e-14 }",
      "components:",
      "  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }",
      "  - { id: R1, kind: resistor, pins: [vcc, b], value: 100k }",
      "  - { id: R2, kind: resistor, pins: [b, gnd], value: 47k }",
      "  - { id: Q1, kind: npn, model: small-npn, pins: { collector: c, base: b, emitter: e } }",
      "  - { id: RC, kind: resistor, pins: [vcc, c], value: 1k }",
      "  - { id: RE, kind: resistor, pins: [e, gnd], value: 680 }",
      "",
    ].join("\n"),
  );
  const check = fakeIo(repo);
  const code = await run(["check"], check);
  const out = check.out.join("") + check.err.join("");
  expect(out).toContain("opgate: config opgate.config.yaml");
  expect(out).toContain("team/divider-current  Q1");
  expect(code, out).toBeLessThan(2);
});

it("names no registry package that does not exist when a team rule cannot import opgate", async () => {
  mkdirSync(join(repo, "team-rules"));
  writeFileSync(join(repo, "team-rules", "r.mjs"), 'import { defineRule } from "opgate";\nexport default defineRule({ id: "team/r", description: "d", severity: "warning", docs: "d", check() {} });\n');
  writeFileSync(join(repo, "opgate.config.yaml"), "plugins: [team-rules/r.mjs]\n");
  const io = fakeIo(repo);
  expect(await run(["rules"], io)).toBe(2);
  const err = io.err.join("");
  expect(err).toContain("export a plain rule object, which needs no import");
  expect(err).not.toContain("npm install");
});
