#!/usr/bin/env node
// Executable entry: binds the CLI to this process.
import { boundHeapGrowth } from "../run/heap-growth.js";
import { processIo } from "./io.js";
import { run } from "./main.js";

// A run over many files keeps its memory bounded (src/run/heap-growth.ts).
boundHeapGrowth(process.execArgv);
process.exitCode = await run(process.argv.slice(2), processIo());
