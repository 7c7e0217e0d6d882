// How far V8 lets a heap grow past what was live at its last full collection before it collects
// again. By default it lets the heap grow up to four times that when collecting is cheap, which
// is most of a run: at 8,000 files (about 50 MB live) the main thread's heap reached 200–270 MB
// and the process peaked at 340–400 MiB (measured 2026-12-02, 2 cores, all four reports). With
// 1.5× the same runs peaked at 210–235 MiB; CPU time was equal within the noise (2,000 files,
// four interleaved runs each: 8.0 against 8.2 s on one lane, 10.3 against 10.6 s on two).
//
// Only for a large run, set once its files are known. Changing a V8 flag has two costs that a
// one-file check would feel: V8 refuses code caches made under other flags — node's own, built
// into its binary, so every thread started afterwards compiles node's internals afresh (a check
// with a TypeScript team rule, which runs in a thread of its own, took 33–50 ms longer), and the
// bundle's (src/bundle/code-cache.ts), which is read when the process starts, before the flag
// is set, and rewritten only when it was missing or refused. V8's flags are the process's, so
// this holds for worker threads started later too.
import { setFlagsFromString } from "node:v8";

/** Growth past the live size, percent (V8's own default is adaptive, up to 300). */
export const HEAP_GROWING_PERCENT = 50;

/** Files in a run from which the bound is set (memory grows with the run's length, not below this). */
export const LARGE_RUN_FILES = 1000;

const FLAG = "heap-growing-percent";

/**
 * Sets the bound unless the user gave the flag on node's command line (`node
 * --heap-growing-percent=N …`; node does not take it from NODE_OPTIONS), whose choice stands.
 * Returns whether it was set here.
 */
export function boundHeapGrowth(execArgv: readonly string[], set: (flags: string) => void = setFlagsFromString): boolean {
  if (execArgv.some((a) => a.replace(/_/g, "-").startsWith(`--${FLAG}`))) return false;
  const flag = `--${FLAG}=${HEAP_GROWING_PERCENT}`;
  set(flag);
  if (set === setFlagsFromString && !flagsSetHere.includes(flag)) flagsSetHere.push(flag);
  return true;
}

/**
 * V8 flags this process set while running: part of a code cache entry's key
 * (src/bundle/code-cache.ts), so that a file first loaded after the flag was set has an entry of
 * its own instead of replacing, and being replaced by, the one of runs without the flag.
 */
export const flagsSetHere: string[] = [];
