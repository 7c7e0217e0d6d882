#!/usr/bin/env node
// Entry of the bundled CLI (dist/bundle/bin.js, the package's `opgate`): the same run() as
// src/cli/bin.ts. It is small: `--version` is answered here, and everything else is handed to
// dist/bundle/cli.js, the command line in one file with its dependencies (one module to load
// instead of hundreds), loaded through V8's code cache (code-cache.ts). `run` is exported too, so
// that tests can drive the bundle in-process.
import { realpathSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { processIo, type CliIo } from "../cli/io.js";
import { toolVersion } from "../run/version.js";
import { codeCacheDir, loadBundled } from "./code-cache.js";

let cli: typeof import("./cli.js") | undefined;

/** The CLI's run(); cli.js is loaded only when there is a command to run. */
export async function run(argv: readonly string[], io: CliIo): Promise<number> {
  // `opgate --version` alone: what yargs would print, without evaluating the commands.
  if (argv.length === 1 && argv[0] === "--version") {
    io.stdout(`${toolVersion()}\n`);
    return 0;
  }
  // A computed path: the bundler leaves it alone, so cli.js stays a file of its own.
  cli ??= loadBundled(fileURLToPath(new URL("./cli.js", import.meta.url)), codeCacheDir(process.env)) as unknown as typeof import("./cli.js");
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
  void run(process.argv.slice(2), processIo()).then((code) => {
    process.exitCode = code;
  });
}
