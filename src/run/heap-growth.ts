// How far V8 lets a heap grow past what was live at its last full collection before it collects
// again. By default it lets the heap grow up to four times that when collecting is cheap, which
// is most of a run: at 8,000 files (about 50 MB live) the main thread's heap reached 200–270 MB
// and the process peaked at 340–400 MiB (measured 2026-12-02, 2 cores, all four reports). With
// 1.5× the same runs peaked at 265–290 MiB; CPU time was equal within the noise (2,000 files,
// four interleaved runs each: 8.0 against 8.2 s on one lane, 10.3 against 10.6 s on two).
// V8's flags are the process's, so this holds for worker threads started later too. It is set
// by the executable entries before anything else is loaded: V8 refuses a code cache made under
// other flags (src/bundle/code-cache.ts), so a flag set later would void the cache on every start.
import { setFlagsFromString } from "node:v8";

/** Growth past the live size, percent (V8's own default is adaptive, up to 300). */
export const HEAP_GROWING_PERCENT = 50;

const FLAG = "heap-growing-percent";

/**
 * Sets the bound unless the user gave the flag on node's command line (`node
 * --heap-growing-percent=N …`; node does not take it from NODE_OPTIONS), whose choice stands.
 * Returns whether it was set here.
 */
export function boundHeapGrowth(execArgv: readonly string[], set: (flags: string) => void = setFlagsFromString): boolean {
  if (execArgv.some((a) => a.replace(/_/g, "-").startsWith(`--${FLAG}`))) return false;
  set(`--${FLAG}=${HEAP_GROWING_PERCENT}`);
  return true;
}
