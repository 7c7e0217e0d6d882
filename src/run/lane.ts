// A lane is one helper that checks files for the pool: a worker thread (the default) or a child
// process. Both speak the messages of protocol.ts; the pool sees only this interface, so crash
// recovery, prefetch and result placement are written once.
//
// Both kinds are kept because the choice is a measurement, not a belief: an earlier run on this
// 2-core machine suggested processes scale better than threads; measured again side by side on
// the 2,000-file repository (bench/repo.ts reports both), they are equal within the noise, so
// the default is what starts lighter and needs no second Node executable.
import { fork, type ChildProcess } from "node:child_process";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { FromWorker, ToWorker, WorkerStart } from "./protocol.js";

export type LaneKind = "process" | "thread";

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

/** Environment variable that carries the WorkerStart (JSON) to a child process. */
export const START_ENV = "OPGATE_WORKER_START";

const here = fileURLToPath(import.meta.url);
/** Under the test runner this file is TypeScript and so is the worker next to it. */
const fromSource = here.endsWith(".ts");

const requireHere = createRequire(import.meta.url);

/** tsx's register API, for a thread's bootstrap. */
function tsxEsmApi(): string {
  return pathToFileURL(join(dirname(requireHere.resolve("tsx/esm/api")), "index.mjs")).href;
}

/** tsx's loader entry (what `--import tsx` loads), by absolute URL: the lane's cwd may not see tsx. */
function tsxLoader(): string {
  return pathToFileURL(requireHere.resolve("tsx")).href;
}

/**
 * The worker module next to this one. From source, a thread starts through a small bootstrap that
 * registers tsx's loader first (`--import tsx` in a worker's execArgv does not reach the worker's
 * own entry module on Node 20); a process simply gets `--import tsx`.
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

function startProcess(start: WorkerStart, on: LaneEvents): Lane {
  const entry = fileURLToPath(new URL(fromSource ? "./worker.ts" : "./worker.js", import.meta.url));
  let child: ChildProcess;
  try {
    child = fork(entry, [], {
      // Structured clone, as between threads: results arrive as the same plain values.
      serialization: "advanced",
      env: { ...process.env, [START_ENV]: JSON.stringify(start) },
      execArgv: fromSource ? ["--import", tsxLoader()] : [],
      // The lane prints nothing of its own; anything on stderr is a crash worth seeing.
      stdio: ["ignore", "ignore", "inherit", "ipc"],
    });
  } catch (err) {
    // fork can throw synchronously (e.g. no process slots left): report it as a lane that died.
    const message = err instanceof Error ? err.message : String(err);
    queueMicrotask(() => {
      on.error(message);
      on.exit(null);
    });
    return { send: () => undefined, stop: () => undefined };
  }
  let ended = false;
  child.on("message", (message) => on.message(message as FromWorker));
  child.on("error", (err) => on.error(err.message));
  child.on("exit", (code) => {
    ended = true;
    on.exit(code);
  });
  return {
    send: (message) => {
      if (!ended && child.connected) child.send(message);
    },
    stop: () => {
      if (!ended) child.kill();
    },
  };
}

export function startLane(kind: LaneKind, start: WorkerStart, on: LaneEvents): Lane {
  return kind === "thread" ? startThread(start, on) : startProcess(start, on);
}
