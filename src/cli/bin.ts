#!/usr/bin/env node
// Executable entry: binds the CLI to this process.
import { processIo } from "./io.js";
import { run } from "./main.js";

process.exitCode = await run(process.argv.slice(2), processIo());
