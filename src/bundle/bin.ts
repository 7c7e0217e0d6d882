#!/usr/bin/env node
// Entry of the bundled CLI (dist/bundle/bin.js, the package's `opgate`): the same run() as
// src/cli/bin.ts. It is small: `--version` is answered here, and everything else is handed to
// dist/bundle/cli.js, the command line in one file with its dependencies (one module to load
// instead of hundreds). `run` is exported too, so that tests can drive the bundle in-process.
import { realpathSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { processIo, type CliIo } from "../cli/io.js";
import { toolVersion } from "../run/version.js";

/** The CLI's run(); cli.js is loaded only when there is a command to run. */
export async function run(argv: readonly string[], io: CliIo): Promise<number> {
  // `opgate --version` alone: what yargs would print, without evaluating the commands.
  if (argv.length === 1 && argv[0] === "--version") {
    io.stdout(`${toolVersion()}\n`);
    return 0;
  }
  // A computed specifier: the bundler leaves it alone, so cli.js stays a file of its own.
  const cli = (await import(new URL("./cli.js", import.meta.url).href)) as typeof import("./cli.js");
  return cli.run(argv, io);
}

/** True when this file is the process's entry (not imported by a test). */
function isMain(): boolean {
  try {
    return realpathSync(process.argv[1] ?? "") === realpathSync(fileURLToPath(import.meta.url));
  } catch {
    return false;
  }
}

if (isMain()) {
  process.exitCode = await run(process.argv.slice(2), processIo());
}
