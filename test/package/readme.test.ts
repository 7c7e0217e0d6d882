// The README's commands and editor instructions must be true for this repository: every path a
// command names exists, and the editor set-up it shows (the YAML language server's schema
// modeline, the JSON `$schema` key) is accepted by opgate and points at the shipped schema.
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { loadCircuitText } from "../../src/circuit/index.js";
import { PACKAGE_ROOT } from "../../src/paths.js";

const readme = readFileSync(join(PACKAGE_ROOT, "README.md"), "utf8");
const blocks = (lang: string) => [...readme.matchAll(new RegExp("```" + lang + "\\n([\\s\\S]*?)```", "g"))].map((m) => m[1]!);

describe("README", () => {
  it("names only paths that exist in its opgate commands", () => {
    const commands = blocks("sh").flatMap((b) => b.split("\n")).filter((l) => /^npx opgate (check|inspect)/.test(l));
    expect(commands.length).toBeGreaterThan(2);
    for (const line of commands) {
      const command = line.replace(/#.*$/, "");
      for (const [path] of command.matchAll(/\bexamples\/[^\s'*]*/g)) expect(existsSync(join(PACKAGE_ROOT, path)), line).toBe(true);
      expect(command, line).not.toMatch(/\bboards\//);
    }
  });

  it("shows an editor modeline and a $schema key that opgate accepts and that name the shipped schema", () => {
    const yamlExample = blocks("yaml").find((b) => b.includes("yaml-language-server"))!;
    const modeline = /# yaml-language-server: \$schema=(\S+)/.exec(yamlExample)![1]!;
    // From a circuit folder one level below the repository root, as the README's path assumes.
    expect(modeline).toBe("../node_modules/opgate/schemas/circuit.schema.json");
    expect(JSON.parse(readFileSync(join(PACKAGE_ROOT, "package.json"), "utf8")).files).toContain("schemas/");
    const jsonExample = blocks("json").find((b) => b.includes('"$schema"'))!;
    expect(JSON.parse(jsonExample).$schema).toBe(modeline);
    // A real circuit with the modeline, and with the $schema key, loads like the same circuit without.
    const circuit = readFileSync(join(PACKAGE_ROOT, "examples", "tide-gauge-preamp.yaml"), "utf8");
    const withModeline = loadCircuitText(`# yaml-language-server: $schema=${modeline}\n${circuit}`, "preamp.yaml");
    expect(withModeline.ok).toBe(true);
    const asJson = loadCircuitText(JSON.stringify({ $schema: modeline, ...(parse(circuit) as object) }), "preamp.json");
    expect(asJson.ok, JSON.stringify(asJson).slice(0, 300)).toBe(true);
  });
});
