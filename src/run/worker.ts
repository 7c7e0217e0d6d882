// A lane of the pool (lane.ts), a worker thread: builds its own
// CheckContext from the plain options it was started with, learns the run it is part of (a `run`
// message: it may have been started before the run's files were found), then checks the files it
// is sent, one at a time, and sends back each result prepared for the reports
// (src/run/prepare.ts; its cache entry written here), or raw when the pool asked for raw results.
import { parentPort, workerData } from "node:worker_threads";
import { checkFile } from "../pipeline/check-file.js";
import { ResultCache } from "./cache.js";
import { makeCheckContext } from "./context.js";
import { asBytes, prepareResult, type CacheStore } from "./prepare.js";
import type { FromWorker, ToWorker, WorkerRun, WorkerStart } from "./protocol.js";

interface Transport {
  readonly start: WorkerStart;
  send(message: FromWorker, transfer?: ArrayBuffer[]): void;
  onMessage(handler: (message: ToWorker) => void): void;
}

function transport(): Transport {
  const port = parentPort;
  if (!port) throw new Error("opgate: src/run/worker is started by the pool, not run directly");
  return { start: workerData as WorkerStart, send: (m, transfer) => port.postMessage(m, transfer), onMessage: (h) => void port.on("message", h) };
}

const lane = transport();

// Files are checked strictly one after another, in the order sent: the pool sends a few ahead,
// and a crash must take only the file in progress with it.
const queue: (ToWorker & { type: "check" })[] = [];
let busy = false;
/** The run, from the pool's first message. */
let run: WorkerRun = {};
let store: CacheStore | undefined;

async function drain(ctx: Awaited<ReturnType<typeof makeCheckContext>>): Promise<void> {
  if (busy) return;
  busy = true;
  for (let message = queue.shift(); message; message = queue.shift()) {
    if (run.crashOn !== undefined && message.display === run.crashOn) process.exit(70);
    try {
      const raw = await checkFile(message.abs, ctx, message.display);
      if (run.prepare) {
        const { prepared, transfer } = asBytes(prepareResult(raw, run.prepare, store, message.key));
        lane.send({ type: "result", id: message.id, output: { prepared } }, transfer);
      } else lane.send({ type: "result", id: message.id, output: { raw } });
    } catch (err) {
      lane.send({ type: "failed", id: message.id, message: err instanceof Error ? err.message : String(err) });
    }
  }
  busy = false;
}

try {
  const ctx = await makeCheckContext(lane.start.context);
  lane.onMessage((message) => {
    if (message.type === "run") {
      run = message;
      const cache = message.prepare?.cache;
      store = cache ? { cache: new ResultCache(cache.dir, cache.runKey), root: ctx.root } : undefined;
    } else if (message.type === "check") {
      queue.push(message);
      void drain(ctx);
    }
  });
  lane.send({ type: "ready" });
} catch (err) {
  lane.send({ type: "fatal", message: err instanceof Error ? err.message : String(err) });
}
