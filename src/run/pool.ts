// Checks files on workers (`--jobs N`: worker threads, see lane.ts), or in this
// process alone for one job. With a PrepareSpec, each lane also prepares what it checked for the
// reports (src/run/prepare.ts), so the thread that writes them does not serialise every circuit.
// Results are placed by file position, so their order never depends on scheduling. A worker that
// dies takes only the file it was checking with it: that file gets an `internal` error result,
// the worker is replaced, and the run goes on. If workers cannot start at all, this process
// checks the rest.
import { checkFile, type CheckContext, type CheckContextOptions } from "../pipeline/check-file.js";
import type { CircuitResult } from "../report/document.js";
import type { CircuitFile } from "./discover.js";
import { openLane, type Lane, type OpenLane } from "./lane.js";
import { prepareResult, type CacheStore, type PrepareSpec } from "./prepare.js";
import type { FromWorker, LaneOutput, ToWorker, WorkerStart } from "./protocol.js";

/** A file for the pool: with its cache key when the run stores results (the lane that checks it writes the entry). */
export type PoolFile = CircuitFile & { readonly key?: string };

/**
 * When the user did not choose `--jobs`, one lane per this many files at most. A worker's fixed
 * cost is large against a file's: it loads the pipeline (and mathjs when a file has an
 * expression), then runs its first few hundred files slowly while V8 optimises — and on 2 cores
 * it takes that time from the main lane, whose compiler and collector were using the second
 * core. Measured with bench/repo.ts on 2 cores (2026-12-01): 2,000 files ran 0.89–1.21× as fast
 * on two lanes as on one, 8,000 files 1.41–1.62×; again on 2026-12-02: at a load average of
 * 2–3, 2,000 files 1.18–1.21× and 8,000 files 1.30×; at a load average of 4–11 (other jobs on
 * the same two cores), 2,000 files 0.64–1.31× and 8,000 files 1.09–1.47×. A CI runner's cores are
 * its own, so the automatic choice adds a lane per 2,000 files, where two lanes start to pay on
 * an otherwise idle machine; an explicit `--jobs N` is always honoured.
 */
export const MIN_FILES_PER_WORKER = 2000;

/**
 * Files sent ahead to each worker, so that it never waits for this thread between two files. This
 * thread answers a worker only between two of its own files, and a file takes 1–3 ms warm but up
 * to 15 ms with a collection in it, and 200–400 ms for the first file that loads the expression
 * engine or a model library (measured on the 2,000-file bench repository, 2026-12-02). With 4
 * files ahead the worker sat idle 0.46 s of a 25 s run (CPU profile, 8,000 files, two lanes).
 */
export const PREFETCH = 16;

/**
 * Files in flight per worker near the end of a run: fewer, so that the lanes finish together
 * (a worker holding 16 files at the end would leave this thread waiting for them).
 */
export const PREFETCH_TAIL = 2;

/** How many files a worker should hold with `left` files not yet handed out, over `lanes` lanes. */
export function prefetchFor(left: number, lanes: number): number {
  return Math.max(PREFETCH_TAIL, Math.min(PREFETCH, Math.floor(left / (4 * lanes))));
}

/** Replacements allowed per job slot before giving up on threads (a crash loop would never end). */
export const RESPAWNS_PER_JOB = 3;

export interface PoolOptions {
  /** Lanes: this process plus `jobs − 1` workers (never more lanes than files). */
  readonly jobs: number;
  /** `jobs` is only the most the machine offers (no --jobs given): add lanes only where they pay. */
  readonly autoJobs?: boolean;
  /** How each worker builds its context. */
  readonly context: CheckContextOptions;
  /**
   * Workers already started with this `context` (lane.ts openLane): used first, and the ones the
   * run has no use for are stopped. The caller still stops them if the pool is never reached.
   */
  readonly started?: readonly OpenLane[];
  /** This thread's context: used for one job, and for the rest when workers cannot start. */
  readonly ctx: CheckContext;
  readonly onProgress?: (done: number, total: number) => void;
  /** Something the user should know (a worker died); one sentence. */
  readonly onNotice?: (message: string) => void;
  /** Tests only: workers exit abruptly on this display path. */
  readonly crashOn?: string;
  /** With autoJobs: default MIN_FILES_PER_WORKER; tests use 1 to run workers on a handful of files. */
  readonly minFilesPerWorker?: number;
  /** Default true. Tests set false so that every file goes through a worker. */
  readonly mainThreadLane?: boolean;
  /** Lanes prepare each result for the reports (needs onResult). Without it they hand on raw results. */
  readonly prepare?: PrepareSpec;
  /** This thread's cache, for the files it checks itself (with prepare.cache). */
  readonly store?: CacheStore;
  /**
   * Each result as it arrives (any order; `index` is the file's position). When given, the pool
   * keeps no result: the array it returns is empty, and memory stays with the caller's choice.
   * A file whose worker died comes raw even with a PrepareSpec (its internal-error result).
   */
  readonly onResult?: (index: number, output: LaneOutput) => void;
}

export function internalErrorResult(file: CircuitFile, message: string): CircuitResult {
  return {
    file: file.display,
    name: null,
    status: "error",
    operatingPoint: null,
    gains: [],
    scenarios: [],
    findings: [
      {
        rule: "internal",
        severity: "error",
        subject: "file",
        message,
        measured: null,
        limit: null,
        unit: null,
        margin: null,
        scenario: "nominal",
        file: file.display,
        line: 1,
        column: 1,
        hint: "re-run the check; if it fails again, report it with this file",
      },
    ],
    passed: [],
  };
}

export async function checkFiles(files: readonly PoolFile[], options: PoolOptions): Promise<CircuitResult[]> {
  if (options.prepare && !options.onResult) throw new Error("checkFiles: prepared results need onResult");
  const results: (CircuitResult | undefined)[] = options.onResult ? [] : new Array(files.length);
  const prepare = options.prepare;
  const total = files.length;
  let next = 0;
  /** Files handed back by a dead worker that it had not started yet. */
  const requeued: number[] = [];
  let done = 0;
  const take = (): number | undefined => (requeued.length > 0 ? requeued.shift() : next < total ? next++ : undefined);
  const finish = (i: number, output: LaneOutput): void => {
    if (options.onResult) options.onResult(i, output);
    else if ("raw" in output) results[i] = output.raw;
    done++;
    options.onProgress?.(done, total);
  };

  const inProcess = async (): Promise<void> => {
    for (let i = take(); i !== undefined; i = take()) {
      const file = files[i]!;
      let output: LaneOutput;
      try {
        const raw = await checkFile(file.abs, options.ctx, file.display);
        output = prepare ? { prepared: prepareResult(raw, prepare, options.store, file.key) } : { raw };
      } catch (err) {
        output = { raw: internalErrorResult(file, `the check stopped: ${err instanceof Error ? err.message : String(err)}`) };
      }
      finish(i, output);
      // A check never waits on I/O (files are read synchronously), so its awaits only run
      // microtasks: without this turn of the event loop, workers' results and requests for more
      // files would wait until this lane had checked every file itself.
      await new Promise<void>((resume) => setImmediate(resume));
    }
  };

  const perWorker = options.minFilesPerWorker ?? MIN_FILES_PER_WORKER;
  const worthwhile = options.autoJobs ? 1 + Math.floor(total / perWorker) : total;
  const jobs = Math.max(1, Math.min(options.jobs, worthwhile));
  const mainLane = options.mainThreadLane ?? true;
  const started = [...(options.started ?? [])];
  // Workers started ahead that this run has no file for.
  for (const lane of started.splice(jobs <= 1 || total === 0 ? 0 : mainLane ? jobs - 1 : jobs)) lane.stop();
  if (jobs <= 1 || total === 0) {
    await inProcess();
    return results as CircuitResult[];
  }

  // This thread is one of the lanes: it is warm already, while a worker first has to load the
  // whole pipeline. So `--jobs N` runs N − 1 workers beside it.
  await new Promise<void>((resolveAll, rejectAll) => {
    const start: WorkerStart = { context: options.context };
    const run: ToWorker = {
      type: "run" as const,
      ...(prepare ? { prepare } : {}),
      ...(options.crashOn !== undefined ? { crashOn: options.crashOn } : {}),
    };
    const live = new Set<Lane>();
    let respawns = 0;
    let noticed = false;
    let resolved = false;
    const checkDone = (): void => {
      if (done === total && !resolved) {
        resolved = true;
        for (const lane of live) lane.stop();
        live.clear();
        resolveAll();
      }
    };
    /** Something here failed (a bug, or the caller's onResult threw): no worker may outlive the run, or the process would not end. */
    const fail = (err: unknown): void => {
      // This thread's lane stops after its current file.
      next = total;
      requeued.length = 0;
      for (const lane of live) lane.stop();
      live.clear();
      for (const lane of started.splice(0)) lane.stop();
      if (resolved) return;
      resolved = true;
      rejectAll(err);
    };
    const guarded =
      <A extends unknown[]>(handler: (...args: A) => void) =>
      (...args: A): void => {
        try {
          handler(...args);
        } catch (err) {
          fail(err);
        }
      };
    const runHere = (): void => void inProcess().then(checkDone, fail);
    const giveUp = (why: string): void => {
      if (noticed) return;
      noticed = true;
      options.onNotice?.(`workers are unavailable (${why}); this process checks the remaining files`);
      if (!mainLane) runHere();
    };
    const spawn = (): void => {
      /** Sent and not yet answered, in the order the worker checks them (the first is in progress). */
      const inFlight: number[] = [];
      let ready = false;
      let lastError = "";
      // Assigned once, right after the callbacks below that refer to it are defined.
      let lane: Lane;
      const fill = (): void => {
        while (inFlight.length < prefetchFor(total - next + requeued.length, jobs)) {
          const i = take();
          if (i === undefined) break;
          inFlight.push(i);
          const f = files[i]!;
          const message: ToWorker = { type: "check", id: i, abs: f.abs, display: f.display, ...(f.key !== undefined ? { key: f.key } : {}) };
          lane.send(message);
        }
        if (inFlight.length === 0) {
          live.delete(lane);
          lane.stop();
          checkDone();
        }
      };
      const onMessage = (m: FromWorker): void => {
        if (m.type === "ready") {
          ready = true;
          fill();
        } else if (m.type === "fatal") {
          lastError = m.message;
          lane.stop();
        } else {
          const at = inFlight.indexOf(m.id);
          if (at < 0) return;
          inFlight.splice(at, 1);
          finish(m.id, m.type === "result" ? m.output : { raw: internalErrorResult(files[m.id]!, `the check stopped: ${m.message}`) });
          fill();
        }
      };
      const onExit = (code: number | null): void => {
        if (!live.has(lane)) return;
        live.delete(lane);
        const [dying, ...untouched] = inFlight;
        if (dying !== undefined) {
          const f = files[dying]!;
          finish(dying, { raw: internalErrorResult(f, `the check of this file stopped unexpectedly (its worker exited with ${code === null ? "a signal" : `code ${code}`}${lastError ? `: ${lastError}` : ""})`) });
          options.onNotice?.(`a worker died while checking ${f.display}; it was replaced`);
        }
        // The files queued behind the one that crashed were never started: someone else takes them.
        requeued.push(...untouched);
        inFlight.length = 0;
        const workLeft = requeued.length > 0 || next < total;
        if (!ready) giveUp(lastError || (code === null ? "killed by a signal" : `exit code ${code}`));
        else if (workLeft) {
          if (respawns++ < RESPAWNS_PER_JOB * jobs) spawn();
          else giveUp("too many worker crashes");
        }
        if (workLeft && mainLane && requeued.length > 0 && live.size === 0) runHere();
        checkDone();
      };
      lane = (started.shift() ?? openLane(start)).attach({ message: guarded(onMessage), error: (message) => void (lastError = message), exit: guarded(onExit) });
      live.add(lane);
      lane.send(run);
    };
    try {
      for (let k = 0; k < (mainLane ? jobs - 1 : jobs); k++) spawn();
    } catch (err) {
      fail(err);
      return;
    }
    if (mainLane) runHere();
  });
  return results as CircuitResult[];
}
