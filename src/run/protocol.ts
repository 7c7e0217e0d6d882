// Messages between the pool and its worker threads (plain data: they are structured-cloned).
import type { CheckContextOptions } from "../pipeline/check-file.js";
import type { CircuitResult } from "../report/document.js";
import type { Prepared, PrepareSpec } from "./prepare.js";

/** What a worker is started with: enough to build its CheckContext (it may start before the run's files are known). */
export interface WorkerStart {
  readonly context: CheckContextOptions;
}

/**
 * The run a worker takes part in, sent once before its first file (a worker started early, see
 * lane.ts openLane, learns it only then).
 */
export interface WorkerRun {
  /** When given, the worker prepares each result (src/run/prepare.ts) and sends that instead of the raw result. */
  readonly prepare?: PrepareSpec;
  /** Tests only: the worker exits abruptly when sent this display path (crash recovery tests). */
  readonly crashOn?: string;
}

/** `key`: the file's cache key, when the run stores results in a cache. */
export type ToWorker =
  | ({ readonly type: "run" } & WorkerRun)
  | { readonly type: "check"; readonly id: number; readonly abs: string; readonly display: string; readonly key?: string };

/** A checked file as a lane hands it on: prepared by the lane, or raw (no PrepareSpec; a file whose worker died). */
export type LaneOutput = { readonly prepared: Prepared } | { readonly raw: CircuitResult };

export type FromWorker =
  | { readonly type: "ready" }
  | { readonly type: "fatal"; readonly message: string }
  | { readonly type: "result"; readonly id: number; readonly output: LaneOutput }
  | { readonly type: "failed"; readonly id: number; readonly message: string };
