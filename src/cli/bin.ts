#!/usr/bin/env node
// Executable entry: binds the CLI to this process.
import { run } from "./main.js";

const code = await run(process.argv.slice(2), {
  cwd: process.cwd(),
  env: process.env,
  isTTY: Boolean(process.stdout.isTTY),
  stderrIsTTY: Boolean(process.stderr.isTTY),
  stdout: (text) => void process.stdout.write(text),
  stderr: (text) => void process.stderr.write(text),
});
process.exitCode = code;
