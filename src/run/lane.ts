// A lane is one helper that checks files for the pool: a worker thread speaking the messages of
// protocol.ts; the pool sees only this interface, so crash recovery, prefetch and result
// placement are written once.
//
// Child processes were a second kind of lane until issue 15's second round. Side by side on the
// 2,000-file repository they never did better than threads (equal within the noise on
// 2026-12-01; 12.1 s against 9.3 s for the check phase on 2026-12-02 at a load average of 10)
// and cost a second Node executable's start, so only threads are kept.
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { FromWorker, ToWorker, WorkerStart } from "./protocol.js";

export interface LaneEvents {
  readonly message: (message: FromWorker) => void;
  /** Something went wrong inside the lane; `exit` follows. */
  readonly error: (message: string) => void;
  /** The lane ended, for whatever reason (code null: killed by a signal). */
  readonly exit: (code: number | null) => void;
}

export interface Lane {
  send(message: ToWorker): void;
  /** Ends the lane; its `exit` event still fires. */
  stop(): void;
}

const here = fileURLToPath(import.meta.url);
/** Under the test runner this file is TypeScript and so is the worker next to it. */
const fromSource = here.endsWith(".ts");

const requireHere = createRequire(import.meta.url);

/** tsx's register API, for a thread's bootstrap. */
function tsxEsmApi(): string {
  return pathToFileURL(join(dirname(requireHere.resolve("tsx/esm/api")), "index.mjs")).href;
}

/**
 * The worker module next to this one. From source, a thread starts through a small bootstrap that
 * registers tsx's loader first (`--import tsx` in a worker's execArgv does not reach the worker's
 * own entry module on Node 20).
 */
function threadEntry(): { entry: URL | string; eval: boolean } {
  if (!fromSource) return { entry: new URL("./worker.js", import.meta.url), eval: false };
  const worker = new URL("./worker.ts", import.meta.url).href;
  return { entry: `import { register } from ${JSON.stringify(tsxEsmApi())};\nregister();\nawait import(${JSON.stringify(worker)});\n`, eval: true };
}

function startThread(start: WorkerStart, on: LaneEvents): Lane {
  const entry = threadEntry();
  const worker = new Worker(entry.entry, { workerData: start, eval: entry.eval });
  worker.on("message", on.message);
  worker.on("error", (err) => on.error(err.message));
  worker.on("exit", (code) => on.exit(code));
  return {
    send: (message) => worker.postMessage(message),
    stop: () => void worker.terminate(),
  };
}

export function startLane(start: WorkerStart, on: LaneEvents): Lane {
  return startThread(start, on);
}
