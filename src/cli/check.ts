// `opgate check`: the gate. Finds circuit files, checks each one, prints a line per file.
// (Foundation version: load, validate and resolve. Later stages plug in through src/pipeline.)
import fg from "fast-glob";
import { statSync } from "node:fs";
import { relative, resolve } from "node:path";
import { loadCircuitFile } from "../circuit/index.js";
import type { InputError } from "../circuit/types.js";
import { EXIT_CLEAN, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";

const CIRCUIT_GLOB = "**/*.{json,yaml,yml}";

/** Expands paths, folders and globs into a sorted, de-duplicated list of absolute file paths. */
export async function findCircuitFiles(patterns: readonly string[], cwd: string): Promise<string[]> {
  const found = new Set<string>();
  for (const pattern of patterns) {
    const abs = resolve(cwd, pattern);
    let isDir = false;
    let isFile = false;
    try {
      const st = statSync(abs);
      isDir = st.isDirectory();
      isFile = st.isFile();
    } catch {
      // not a path: treat as a glob below
    }
    if (isFile) found.add(abs);
    else if (isDir) {
      for (const f of await fg(CIRCUIT_GLOB, { cwd: abs, absolute: true, ignore: ["**/node_modules/**"] })) found.add(f);
    } else {
      for (const f of await fg(pattern, { cwd, absolute: true, ignore: ["**/node_modules/**"] })) found.add(f);
    }
  }
  return [...found].sort();
}

export function formatInputError(e: InputError): string {
  const where = e.line !== undefined ? `${e.file}:${e.line}:${e.column ?? 1}` : e.file;
  return `${where}: error: ${e.message}${e.hint ? ` — ${e.hint}` : ""}`;
}

export const checkCommand: CommandSpec = {
  command: "check [paths..]",
  describe: "Check circuit files (paths, folders or globs; default: the current folder)",
  builder: (y) =>
    y
      .positional("paths", { type: "string", array: true, describe: "Circuit files, folders or globs" })
      .example("$0 check examples", "Check every circuit file under examples/")
      .example("$0 check 'boards/**/*.yaml'", "Check the files a glob matches"),
  handler: async (args, io: CliIo) => {
    const patterns = (args.paths as string[] | undefined)?.length ? (args.paths as string[]) : ["."];
    const files = await findCircuitFiles(patterns, io.cwd);
    if (files.length === 0) {
      io.stderr(`opgate: no circuit files (.json, .yaml, .yml) match ${patterns.join(" ")}\n`);
      return EXIT_INPUT;
    }
    let worst = EXIT_CLEAN;
    for (const file of files) {
      const shown = relative(io.cwd, file) || file;
      const result = await loadCircuitFile(file, { displayPath: shown });
      if (result.ok) io.stdout(`ok    ${shown}\n`);
      else {
        worst = EXIT_INPUT;
        io.stdout(`error ${shown}\n`);
        for (const e of result.errors) io.stdout(`  ${formatInputError(e)}\n`);
      }
    }
    return worst;
  },
};
