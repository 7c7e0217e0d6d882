// One whole run: the files (already discovered), an optional shard slice, looked up in the result
// cache, the rest checked on the pool; each result handed to the caller's sink in document order
// (sorted by file) as soon as it and every file before it are done, then dropped. What the run
// keeps is each circuit's outline (src/report/outline.ts): the whole-run reports and the exit
// code are drawn from those, and the JSON and JUnit reports are written while results arrive.
import { checkFile, type CheckContext, type CheckContextOptions } from "../pipeline/check-file.js";
import { compareText, documentHead, normaliseCircuit, summarise } from "../report/build.js";
import type { CircuitResult } from "../report/document.js";
import { jsonCircuit } from "../report/json.js";
import { outlineFrom, outlineParts, type CircuitOutline, type DocumentHead, type ReportDocument } from "../report/outline.js";
import { shardProvenance } from "../report/merge.js";
import { resultDependencies, type CacheHit, type ResultCache } from "./cache.js";
import type { CircuitFile } from "./discover.js";
import { checkFiles, internalErrorResult } from "./pool.js";
import { selectShard, type Shard } from "./shard.js";
import { toolVersion } from "./version.js";

export interface RunOptions {
  readonly ctx: CheckContext;
  readonly contextOptions: CheckContextOptions;
  readonly jobs: number;
  /** See PoolOptions.autoJobs. */
  readonly autoJobs?: boolean;
  readonly shard?: Shard;
  /** ISO time to record in the document (only when the user asked for it). */
  readonly timestamp?: string;
  readonly onProgress?: (done: number, total: number) => void;
  readonly onNotice?: (message: string) => void;
  /** Tests only, see PoolOptions.crashOn and minFilesPerWorker. */
  readonly crashOn?: string;
  readonly minFilesPerWorker?: number;
  readonly mainThreadLane?: boolean;
  /** Result cache (check --cache): unchanged files are taken from it, the rest checked and stored. */
  readonly cache?: ResultCache;
}

/** One circuit's result as the sink gets it, in document order. */
export interface RunItem {
  /** Position in the document (0 for the first circuit). */
  readonly index: number;
  readonly outline: CircuitOutline;
  /** The whole normalised result (for a cached file, read from its entry on first call). */
  result(): CircuitResult;
  /** The circuit's text in the JSON report: jsonCircuit(result, true) (for a cached file, its stored bytes). */
  json(): string | Buffer;
}

/** Where results go as they arrive: the streamed reports. A throw ends the run (after the pool stops). */
export interface RunSink {
  /** Called once, before any circuit, with the document's head. */
  start?(head: DocumentHead): void;
  circuit(item: RunItem): void;
}

/** The run without a sink: every whole result kept, as one results document (tests, `inspect`-like callers). */
export async function runCheckDocument(allFiles: readonly CircuitFile[], options: RunOptions): Promise<ReportDocument & { circuits: CircuitResult[] }> {
  const circuits: CircuitResult[] = [];
  const doc = await runCheck(allFiles, options, { circuit: (item) => void circuits.push(item.result()) });
  return { ...doc, circuits };
}

export async function runCheck(allFiles: readonly CircuitFile[], options: RunOptions, sink?: RunSink): Promise<ReportDocument> {
  const sorted = [...allFiles].sort((a, b) => compareText(a.display, b.display));
  const files = options.shard ? selectShard(sorted, options.shard) : sorted;
  const { config, rules } = options.ctx;
  const failOn = config.failOn;
  const head = documentHead({
    rules,
    failOn,
    variation: { mode: config.variation.mode, samples: config.variation.samples, seed: config.variation.seed },
    version: toolVersion(),
    ...(options.shard ? { shard: shardProvenance(sorted.map((f) => f.display), options.shard, files.map((f) => f.display)) } : {}),
    ...(options.timestamp ? { timestamp: options.timestamp } : {}),
  });
  sink?.start?.(head);

  // From the cache: which files are unchanged (their outlines are read now, the rest of their
  // entries when they are written out); only the others go to the lanes.
  const cache = options.cache;
  const keys: (string | null)[] = [];
  const hits: (CacheHit | undefined)[] = [];
  const toCheck: number[] = [];
  files.forEach((f, i) => {
    const found = cache ? cache.probe(f) : null;
    keys.push(found?.key ?? null);
    hits.push(found?.hit);
    if (!found?.hit) toCheck.push(i);
  });

  const outlines: CircuitOutline[] = [];
  /** Checked results waiting for a file before them. */
  const waiting = new Map<number, CircuitResult>();
  let next = 0;
  let failure: unknown;

  const emitChecked = (i: number, raw: CircuitResult): void => {
    const result = normaliseCircuit(raw, failOn);
    const key = keys[i];
    // A file that could not be read has no key: nothing to store.
    const parts = outlineParts(result);
    if (cache && key) cache.store(key, result, resultDependencies(result, options.ctx.root), parts);
    const outline = outlineFrom(parts);
    outlines.push(outline);
    let json: string | undefined;
    sink?.circuit({ index: i, outline, result: () => result, json: () => (json ??= jsonCircuit(result, true)) });
  };
  /** Writes out every file that is ready, in order; a cached file whose entry went away is checked here. */
  const flush = async (): Promise<void> => {
    while (next < files.length && failure === undefined) {
      const i = next;
      const hit = hits[i];
      if (hit) {
        const parts = cache!.parts(hit, files[i]!.display);
        if (parts) {
          outlines.push(parts.outline);
          sink?.circuit({ index: i, outline: parts.outline, result: parts.result, json: () => parts.json });
        } else {
          // Removed or replaced since it was looked up: check the file after all, here.
          hits[i] = undefined;
          waiting.set(i, await checkOne(files[i]!, options));
          continue;
        }
      } else {
        const result = waiting.get(i);
        if (!result) return;
        waiting.delete(i);
        emitChecked(i, result);
      }
      next++;
    }
  };
  /** Keeps the first failure of the sink (a report that cannot be written) for the end of the run. */
  let flushing: Promise<void> = Promise.resolve();
  const schedule = (): void => {
    flushing = flushing.then(flush).catch((err: unknown) => {
      failure ??= err;
    });
  };

  schedule();
  await checkFiles(
    toCheck.map((i) => files[i]!),
    {
      jobs: options.jobs,
      ...(options.autoJobs ? { autoJobs: true } : {}),
      context: options.contextOptions,
      ctx: options.ctx,
      ...(options.onProgress ? { onProgress: options.onProgress } : {}),
      ...(options.onNotice ? { onNotice: options.onNotice } : {}),
      ...(options.crashOn !== undefined ? { crashOn: options.crashOn } : {}),
      ...(options.minFilesPerWorker !== undefined ? { minFilesPerWorker: options.minFilesPerWorker } : {}),
      ...(options.mainThreadLane !== undefined ? { mainThreadLane: options.mainThreadLane } : {}),
      onResult: (k, result) => {
        waiting.set(toCheck[k]!, result);
        schedule();
      },
    },
  );
  schedule();
  await flushing;
  if (failure !== undefined) throw failure;
  return { ...head, circuits: outlines, summary: summarise(outlines, failOn) };
}

/** One file checked in this thread (a cached entry that vanished mid-run). */
async function checkOne(file: CircuitFile, options: RunOptions): Promise<CircuitResult> {
  try {
    return await checkFile(file.abs, options.ctx, file.display);
  } catch (err) {
    return internalErrorResult(file, `the check stopped: ${err instanceof Error ? err.message : String(err)}`);
  }
}
