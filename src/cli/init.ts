// `opgate init`: writes a commented starter opgate.config.yaml and an example team rule into
// the working folder. Refuses to overwrite existing files unless --force.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { PACKAGE_ROOT } from "../paths.js";
import { EXIT_CLEAN, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";

/**
 * An .mjs module exporting a plain rule object: it loads in any repository, with or without a
 * package.json, TypeScript or opgate installed there (an import of "opgate" would need the package
 * in the repository's node_modules).
 */
export const STARTER_RULE_PATH = "team-rules/divider-current.mjs";
export const STARTER_LIBRARY_PATH = "lib/parts.yaml";

/** The example model library shipped with the package (also the one the examples use). */
export function starterLibrary(): string {
  return readFileSync(join(PACKAGE_ROOT, "examples", "lib", "tidewater-parts.yaml"), "utf8");
}

/** The starter team rule (shipped in the package as schemas/ are: src/cli/starter/). */
export function starterRule(): string {
  return readFileSync(join(PACKAGE_ROOT, "src", "cli", "starter", "divider-current.mjs"), "utf8");
}

export const STARTER_CONFIG = `# opgate repository config: which circuit files to check and how strictly.
# Paths and globs are relative to this file's folder. Schema: \`opgate schema config\`.

# Circuit files to check when \`opgate check\` is given no paths.
include:
  - "**/*.{yaml,yml,json}"
# Files never to check (node_modules and this file are always excluded).
exclude: []

# The lowest severity that fails the run (exit code 1): error, warning or note.
failOn: error

# Per rule: a severity (error, warning, note, off), or { severity, options }.
# \`opgate rules\` lists every rule with its options and their defaults.
rules:
  headroom:
    options:
      bjt: 0.5 # V beyond the saturation edge (common practice: 0.5–1 V)
      mos: 0.3 # V beyond the triode edge
  resistor-power:
    options:
      fraction: 0.5 # of the rating, derated above 70 °C ambient
  capacitor-voltage:
    options:
      fraction: 0.8 # of the voltage rating
  band-edges: error
  band-flatness: warning
  team/divider-current: warning

# Model libraries every circuit uses (format opgate-library/1): write each part's model once.
# A circuit's own model with the same id overrides a library model (with a warning).
libraries:
  - ${STARTER_LIBRARY_PATH}

# Team rules: JavaScript (.js, .mjs) or TypeScript (.ts) modules whose default export is a rule.
plugins:
  - ${STARTER_RULE_PATH}

# Scenarios: nominal, corners (tolerances, spreads, supplies, temperature) or monte-carlo.
variation:
  mode: corners
  samples: 200 # Monte Carlo only
  seed: 1
  temperature: { min: "-20 °C", max: "60 °C" }
  # A circuit of thousands of parts can exceed the per-circuit work budget and is then judged at
  # nominal only, with a variation-budget finding: warning (passes on its nominal verdict) or error.
  overBudget: warning

# Report files, written by \`opgate check\` (command-line flags override them).
outputs:
  junit: reports/opgate-junit.xml
  markdown: reports/opgate.md
  sarif: reports/opgate.sarif
`;

export const initCommand: CommandSpec = {
  command: "init",
  describe: "Write a commented starter opgate.config.yaml and an example team rule",
  builder: (y) =>
    y
      .option("force", { type: "boolean", default: false, describe: "Overwrite existing files" })
      .example("$0 init", "Start a config in the current folder"),
  handler: async (args, io: CliIo) => {
    const files: [string, string][] = [
      ["opgate.config.yaml", STARTER_CONFIG],
      [STARTER_RULE_PATH, starterRule()],
      [STARTER_LIBRARY_PATH, starterLibrary()],
    ];
    const existing = files.map(([p]) => p).filter((p) => existsSync(join(io.cwd, p)));
    if (existing.length > 0 && args.force !== true) {
      const list = existing.length > 1 ? `${existing.slice(0, -1).join(", ")} and ${existing.at(-1)}` : existing[0];
      io.stderr(`opgate: ${list} already exist${existing.length === 1 ? "s" : ""}; nothing written — run \`opgate init --force\` to overwrite\n`);
      return EXIT_INPUT;
    }
    for (const [path, text] of files) {
      mkdirSync(dirname(join(io.cwd, path)), { recursive: true });
      writeFileSync(join(io.cwd, path), text);
      io.stdout(`wrote ${path}\n`);
    }
    io.stdout("Next: add your circuit files, then run `opgate rules` and `opgate check`.\n");
    return EXIT_CLEAN;
  },
};
