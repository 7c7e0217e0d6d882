// Messages between the pool and its worker threads (plain data: they are structured-cloned).
import type { CheckContextOptions } from "../pipeline/check-file.js";
import type { CircuitResult } from "../report/document.js";

export interface WorkerStart {
  readonly context: CheckContextOptions;
  /** Tests only: the worker exits abruptly when sent this display path (crash recovery tests). */
  readonly crashOn?: string;
}

export type ToWorker = { readonly type: "check"; readonly id: number; readonly abs: string; readonly display: string };

export type FromWorker =
  | { readonly type: "ready" }
  | { readonly type: "fatal"; readonly message: string }
  | { readonly type: "result"; readonly id: number; readonly result: CircuitResult }
  | { readonly type: "failed"; readonly id: number; readonly message: string };
