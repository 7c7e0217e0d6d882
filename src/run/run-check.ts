// One whole run: the files (already discovered), an optional shard slice, checked on the pool,
// assembled into the results document.
import type { CheckContext, CheckContextOptions } from "../pipeline/check-file.js";
import { buildDocument } from "../report/build.js";
import type { ResultsDocument } from "../report/document.js";
import { shardProvenance } from "../report/merge.js";
import { resultDependencies, type ResultCache } from "./cache.js";
import type { CircuitFile } from "./discover.js";
import type { LaneKind } from "./lane.js";
import { checkFiles } from "./pool.js";
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
  /** What a worker is; default the pool's DEFAULT_LANE. */
  readonly lanes?: LaneKind;
  /** Result cache (check --cache): unchanged files are taken from it, the rest checked and stored. */
  readonly cache?: ResultCache;
}

export async function runCheck(allFiles: readonly CircuitFile[], options: RunOptions): Promise<ResultsDocument> {
  const files = options.shard ? selectShard(allFiles, options.shard) : [...allFiles];
  // From the cache: the results of unchanged files; only the others go to the lanes.
  const cache = options.cache;
  const lookups = cache ? files.map((f) => cache.lookup(f)) : [];
  const toCheck = cache ? files.filter((_, i) => lookups[i]?.result === undefined) : files;
  const checked = await checkFiles(toCheck, {
    jobs: options.jobs,
    ...(options.autoJobs ? { autoJobs: true } : {}),
    context: options.contextOptions,
    ctx: options.ctx,
    ...(options.onProgress ? { onProgress: options.onProgress } : {}),
    ...(options.onNotice ? { onNotice: options.onNotice } : {}),
    ...(options.crashOn !== undefined ? { crashOn: options.crashOn } : {}),
    ...(options.minFilesPerWorker !== undefined ? { minFilesPerWorker: options.minFilesPerWorker } : {}),
    ...(options.mainThreadLane !== undefined ? { mainThreadLane: options.mainThreadLane } : {}),
    ...(options.lanes !== undefined ? { lanes: options.lanes } : {}),
  });
  let circuits = checked;
  if (cache) {
    let next = 0;
    circuits = files.map((_, i) => {
      const hit = lookups[i];
      if (hit?.result !== undefined) return hit.result;
      const result = checked[next++]!;
      // A file that could not be read has no key: nothing to store.
      if (hit) cache.store(hit.key, result, resultDependencies(result, options.ctx.root));
      return result;
    });
  }
  const { config, rules } = options.ctx;
  return buildDocument(circuits, {
    rules,
    failOn: config.failOn,
    variation: { mode: config.variation.mode, samples: config.variation.samples, seed: config.variation.seed },
    version: toolVersion(),
    ...(options.shard ? { shard: shardProvenance(allFiles.map((f) => f.display), options.shard, files.map((f) => f.display)) } : {}),
    ...(options.timestamp ? { timestamp: options.timestamp } : {}),
  });
}
