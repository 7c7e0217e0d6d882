// One whole run: the files (already discovered), an optional shard slice, looked up in the result
// cache, the rest checked on the pool; each result handed to the caller's sink in document order
// (sorted by file) as soon as it and every file before it are done, then dropped. What the run
// keeps is each circuit's outline (src/report/outline.ts): the whole-run reports and the exit
// code are drawn from those, and the JSON and JUnit reports are written while results arrive.
// The lane that checks a file also prepares it in the forms the sink declared it needs
// (src/run/prepare.ts) and writes its cache entry; this thread only places and writes them.
import { checkFile, type CheckContext, type CheckContextOptions } from "../pipeline/check-file.js";
import { compareText, documentHead, summarise } from "../report/build.js";
import type { CircuitResult } from "../report/document.js";
import { jsonCircuit } from "../report/json.js";
import { junitSuite } from "../report/junit.js";
import type { CircuitOutline, DocumentHead, ReportDocument } from "../report/outline.js";
import { shardProvenance } from "../report/merge.js";
import type { CacheEntryPlace, ResultCache } from "./cache.js";
import type { CircuitFile } from "./discover.js";
import type { OpenLane } from "./lane.js";
import { OutlineStore } from "./outline-store.js";
import { checkFiles, internalErrorResult, type PoolFile } from "./pool.js";
import { asBytes, NO_NEEDS, prepareResult, type CacheStore, type JunitPiece, type Needs, type Prepared, type PrepareSpec } from "./prepare.js";
import type { LaneOutput } from "./protocol.js";
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
  /** Workers started ahead with `contextOptions` (see PoolOptions.started). */
  readonly started?: readonly OpenLane[];
  /** Result cache (check --cache): unchanged files are taken from it, the rest checked and stored. */
  readonly cache?: ResultCache;
  /** Tests only: outline bytes kept in memory before the rest go to a file (default SPILL_AFTER). */
  readonly spillOutlinesAfter?: number;
}

/** One circuit's result as the sink gets it, in document order. */
export interface RunItem {
  /** Position in the document (0 for the first circuit). */
  readonly index: number;
  readonly outline: CircuitOutline;
  /**
   * The whole normalised result (for a cached file, read from its entry on first call). Only for
   * a sink whose `needs.whole` is set: lanes do not send it otherwise.
   */
  result(): CircuitResult;
  /** The circuit's text in the JSON report: jsonCircuit(result, true), as text or UTF-8 bytes (a worker's, a cached file's). */
  json(): string | Uint8Array;
  /** Its JUnit suite: junitSuite(result, failOn), its XML as text or UTF-8 bytes. */
  junit(): JunitPiece;
}

/** Where results go as they arrive: the streamed reports. A throw ends the run (after the pool stops). */
export interface RunSink {
  /** The forms of each result the sink reads (default none: outlines only); lanes make them. */
  readonly needs?: Needs;
  /** Called once, before any circuit, with the document's head. */
  start?(head: DocumentHead): void;
  circuit(item: RunItem): void;
}

/** The run without a sink: every whole result kept, as one results document (tests, `inspect`-like callers). */
export async function runCheckDocument(allFiles: readonly CircuitFile[], options: RunOptions): Promise<ReportDocument & { circuits: CircuitResult[] }> {
  const circuits: CircuitResult[] = [];
  const doc = await runCheck(allFiles, options, { needs: { ...NO_NEEDS, whole: true }, circuit: (item) => void circuits.push(item.result()) });
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
  const store = new OutlineStore(options.spillOutlinesAfter);
  const keys: (string | null)[] = [];
  const hits: (CacheEntryPlace | undefined)[] = [];
  /** The outline of each hit, kept from the moment it is read. */
  const hitOutlines: (CircuitOutline | undefined)[] = [];
  const toCheck: number[] = [];
  files.forEach((f, i) => {
    const found = cache ? cache.probe(f) : null;
    keys.push(found?.key ?? null);
    const hit = found?.hit;
    if (hit) {
      const { outline, ...place } = hit;
      hitOutlines[i] = store.keep(outline);
      hits.push(place);
    } else {
      hits.push(undefined);
      toCheck.push(i);
    }
  });

  const outlines: CircuitOutline[] = [];
  /** Checked results waiting for a file before them. */
  const waiting = new Map<number, Prepared>();
  let next = 0;
  let failure: unknown;

  const spec: PrepareSpec = { failOn, needs: sink?.needs ?? NO_NEEDS, ...(cache ? { cache: { dir: cache.dir, runKey: cache.runKeyHex } } : {}) };
  const cacheStore: CacheStore | undefined = cache ? { cache, root: options.ctx.root } : undefined;
  /** A result as the sink reads it, prepared here when its lane did not (a file whose worker died, a vanished cache entry). */
  const prepared = (i: number, output: LaneOutput): Prepared => {
    if ("raw" in output) return prepareResult(output.raw, spec, cacheStore, keys[i]);
    if (cache && output.prepared.cacheWriteFailed !== undefined) cache.stats.writeFailed ??= output.prepared.cacheWriteFailed;
    return output.prepared;
  };
  const emitChecked = (i: number, p: Prepared): void => {
    const outline = store.keep(p.outline);
    outlines.push(outline);
    const result = (): CircuitResult => {
      if (!p.result) throw new Error(`internal: the whole result of ${p.outline.file} was not kept (the run's sink did not declare needs.whole)`);
      return p.result;
    };
    sink?.circuit({
      index: i,
      outline,
      result,
      json: () => p.json ?? jsonCircuit(result(), true),
      junit: () => p.junit ?? junitSuite(result(), failOn),
    });
  };
  /** Writes out every file that is ready, in order; a cached file whose entry went away is checked here. */
  const flush = async (): Promise<void> => {
    while (next < files.length && failure === undefined) {
      const i = next;
      const hit = hits[i];
      if (hit) {
        const parts = cache!.parts(hit, files[i]!.display);
        const outline = hitOutlines[i]!;
        hitOutlines[i] = undefined;
        if (parts) {
          outlines.push(outline);
          sink?.circuit({ index: i, outline, result: parts.result, json: () => parts.json, junit: () => junitSuite(parts.result(), failOn) });
        } else {
          // Removed or replaced since it was looked up: check the file after all, here.
          hits[i] = undefined;
          waiting.set(i, prepared(i, { raw: await checkOne(files[i]!, options) }));
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
    toCheck.map((i): PoolFile => {
      const key = keys[i];
      return key ? { ...files[i]!, key } : files[i]!;
    }),
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
      ...(options.started ? { started: options.started } : {}),
      prepare: spec,
      ...(cacheStore ? { store: cacheStore } : {}),
      onResult: (k, output) => {
        const i = toCheck[k]!;
        const p = prepared(i, output);
        // A result that must wait for files before it (on the other lanes) waits as bytes (asBytes).
        waiting.set(i, i === next ? p : asBytes(p).prepared);
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
