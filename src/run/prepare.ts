// What a lane makes of a result once it is checked, in the lane that checked it: the result
// normalised as the reports show it, its outline (the part a run keeps), its text in the JSON
// report, its JUnit suite, and its cache entry. Done here rather than in the thread that writes
// the reports, because that thread is also a lane: serialising every circuit there (4.2 s of its
// 13.6 s at 8,000 files, measured 2026-12-02) left the worker waiting on it. What crosses to the
// writing thread is the report texts as bytes (asBytes) and a few plain fields.
import { normaliseCircuit } from "../report/build.js";
import type { CircuitResult, Severity } from "../report/document.js";
import { jsonCircuit } from "../report/json.js";
import { junitSuite, type JunitSuite } from "../report/junit.js";
import { outlineParts, outlineText, type OutlineText } from "../report/outline.js";
import { resultDependencies, type ResultCache } from "./cache.js";

/** Which forms of each result the run's reports use (the outline is always made: the run keeps it). */
export interface Needs {
  /** The circuit's text in the JSON report. */
  readonly json: boolean;
  /** Its JUnit suite. */
  readonly junit: boolean;
  /** The whole normalised result (HTML page, charts, a caller that keeps every result). */
  readonly whole: boolean;
}

export const NO_NEEDS: Needs = { json: false, junit: false, whole: false };

/** How lanes prepare results: plain data, so it crosses to worker threads. */
export interface PrepareSpec {
  readonly failOn: Severity;
  readonly needs: Needs;
  /** The result cache to store each checked file in (a worker opens its own on the same folder). */
  readonly cache?: { readonly dir: string; readonly runKey: string };
}

/** A JUnit suite as a lane hands it on: its XML as text, or as UTF-8 bytes from a worker. */
export type JunitPiece = Omit<JunitSuite, "xml"> & { readonly xml: string | Uint8Array };

/** A result as a lane hands it on. */
export interface Prepared {
  readonly outline: OutlineText;
  /** Text from this thread's lane; UTF-8 bytes from a worker, or while it waits (see asBytes). */
  readonly json?: string | Uint8Array;
  readonly junit?: JunitPiece;
  /** Normalised. */
  readonly result?: CircuitResult;
  /** The cache entry could not be written (the first reason). */
  readonly cacheWriteFailed?: string;
}

/** Where a lane stores the results it checks. */
export interface CacheStore {
  readonly cache: ResultCache;
  /** Paths of dependencies are recorded relative to this folder (the run's root). */
  readonly root: string;
}

/**
 * Prepares one checked result. `key` is the file's cache key (none when the file could not be
 * read, or no cache is used): the entry is written here.
 */
export function prepareResult(raw: CircuitResult, spec: PrepareSpec, store?: CacheStore, key?: string | null): Prepared {
  const result = normaliseCircuit(raw, spec.failOn);
  const parts = outlineParts(result);
  let cacheWriteFailed: string | undefined;
  if (store && key) {
    const before = store.cache.stats.writeFailed;
    store.cache.store(key, result, resultDependencies(result, store.root), parts);
    if (store.cache.stats.writeFailed !== before) cacheWriteFailed = store.cache.stats.writeFailed;
  }
  return {
    outline: outlineText(parts),
    ...(spec.needs.json ? { json: jsonCircuit(result, true) } : {}),
    ...(spec.needs.junit ? { junit: junitSuite(result, spec.failOn) } : {}),
    ...(spec.needs.whole ? { result } : {}),
    ...(cacheWriteFailed !== undefined ? { cacheWriteFailed } : {}),
  };
}

/**
 * A prepared result with its report texts as UTF-8 bytes, which live outside the heap: what a
 * worker sends (the bytes are moved to the receiving thread, `transfer`, not copied into its
 * heap), and how a result waits in the writing thread for the files before it. Report texts held
 * as strings in that thread were promoted by its collector; with bytes, what it promoted over an
 * 8,000-file run on two lanes fell from 526 to 109 MB (measured 2026-12-02).
 */
export function asBytes(p: Prepared): { readonly prepared: Prepared; readonly transfer: ArrayBuffer[] } {
  const transfer: ArrayBuffer[] = [];
  const bytes = (text: string | Uint8Array): Uint8Array => {
    const b = typeof text === "string" ? encoder.encode(text) : text;
    transfer.push(b.buffer as ArrayBuffer);
    return b;
  };
  const prepared: Prepared = {
    ...p,
    ...(p.json !== undefined ? { json: bytes(p.json) } : {}),
    ...(p.junit !== undefined ? { junit: { ...p.junit, xml: bytes(p.junit.xml) } } : {}),
  };
  return { prepared, transfer };
}

const encoder = new TextEncoder();
