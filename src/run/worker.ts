// Worker thread: builds its own CheckContext from the plain options it was started with, then
// checks the files it is sent, one at a time, and posts back plain CircuitResults.
import { parentPort, workerData } from "node:worker_threads";
import { checkFile } from "../pipeline/check-file.js";
import { makeCheckContext } from "./context.js";
import type { FromWorker, ToWorker, WorkerStart } from "./protocol.js";

const port = parentPort;
if (!port) throw new Error("opgate: src/run/worker is meant to run as a worker thread");
const start = workerData as WorkerStart;

function send(message: FromWorker): void {
  port!.postMessage(message);
}

// Files are checked strictly one after another, in the order sent: the pool sends a few ahead,
// and a crash must take only the file in progress with it.
const queue: ToWorker[] = [];
let busy = false;

async function drain(ctx: Awaited<ReturnType<typeof makeCheckContext>>): Promise<void> {
  if (busy) return;
  busy = true;
  for (let message = queue.shift(); message; message = queue.shift()) {
    if (start.crashOn !== undefined && message.display === start.crashOn) process.exit(70);
    try {
      send({ type: "result", id: message.id, result: await checkFile(message.abs, ctx, message.display) });
    } catch (err) {
      send({ type: "failed", id: message.id, message: err instanceof Error ? err.message : String(err) });
    }
  }
  busy = false;
}

try {
  const ctx = await makeCheckContext(start.context);
  port.on("message", (message: ToWorker) => {
    if (message.type !== "check") return;
    queue.push(message);
    void drain(ctx);
  });
  send({ type: "ready" });
} catch (err) {
  send({ type: "fatal", message: err instanceof Error ? err.message : String(err) });
}
