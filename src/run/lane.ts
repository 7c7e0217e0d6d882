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

/**
 * A worker started before the pool that will use it (`check` starts its workers before it looks
 * for files, so that they load while it searches). Its events wait until `attach`; until then it
 * does not keep the process alive, so a run that ends early cannot hang on it.
 */
export interface OpenLane {
  /** Hands the lane its events (those that came before follow on a microtask, in order, before any later one). Once only. */
  attach(on: LaneEvents): Lane;
  /** Ends the lane if it was never attached (after attach, the pool stops it). */
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

/** The part of a worker thread a lane uses (tests stand in for it). */
export interface LaneThread {
  on(event: "message", listener: (message: FromWorker) => void): unknown;
  on(event: "error", listener: (err: Error) => void): unknown;
  on(event: "exit", listener: (code: number) => void): unknown;
  postMessage(message: ToWorker): void;
  terminate(): unknown;
  ref(): void;
  unref(): void;
}

function workerThread(start: WorkerStart): LaneThread {
  const entry = threadEntry();
  return new Worker(entry.entry, { workerData: start, eval: entry.eval });
}

/** Starts a worker thread (`thread`: tests only); see OpenLane. */
export function openLane(start: WorkerStart, thread: (start: WorkerStart) => LaneThread = workerThread): OpenLane {
  const worker = thread(start);
  worker.unref();
  let on: LaneEvents | undefined;
  let stopped = false;
  /** Events before attach, in the order they came. */
  const early: ((events: LaneEvents) => void)[] = [];
  const deliver = (event: (events: LaneEvents) => void): void => {
    if (on && early.length === 0) event(on);
    else early.push(event);
  };
  worker.on("message", (message: FromWorker) => deliver((e) => e.message(message)));
  worker.on("error", (err) => deliver((e) => e.error(err.message)));
  worker.on("exit", (code) => deliver((e) => e.exit(code)));
  const lane: Lane = {
    send: (message) => worker.postMessage(message),
    stop: () => void worker.terminate(),
  };
  return {
    attach: (events) => {
      if (on) throw new Error("internal: a lane was attached twice");
      on = events;
      worker.ref();
      // The events that came before are delivered once the caller holds the lane (a `ready`
      // delivered inside attach would have the pool send files to a lane it does not have yet),
      // and before any later one: a microtask runs before the next event can arrive.
      if (early.length > 0)
        queueMicrotask(() => {
          for (const event of early.splice(0)) event(events);
        });
      return lane;
    },
    stop: () => {
      if (on || stopped) return;
      stopped = true;
      void worker.terminate();
    },
  };
}
