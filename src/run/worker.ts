// A lane of the pool (lane.ts), a worker thread: builds its own
// CheckContext from the plain options it was started with, then checks the files it is sent, one
// at a time, and sends back plain CircuitResults.
import { parentPort, workerData } from "node:worker_threads";
import { checkFile } from "../pipeline/check-file.js";
import { makeCheckContext } from "./context.js";
import type { FromWorker, ToWorker, WorkerStart } from "./protocol.js";

interface Transport {
  readonly start: WorkerStart;
  send(message: FromWorker): void;
  onMessage(handler: (message: ToWorker) => void): void;
}

function transport(): Transport {
  const port = parentPort;
  if (!port) throw new Error("opgate: src/run/worker is started by the pool, not run directly");
  return { start: workerData as WorkerStart, send: (m) => port.postMessage(m), onMessage: (h) => void port.on("message", h) };
}

const lane = transport();

// Files are checked strictly one after another, in the order sent: the pool sends a few ahead,
// and a crash must take only the file in progress with it.
const queue: ToWorker[] = [];
let busy = false;

async function drain(ctx: Awaited<ReturnType<typeof makeCheckContext>>): Promise<void> {
  if (busy) return;
  busy = true;
  for (let message = queue.shift(); message; message = queue.shift()) {
    if (lane.start.crashOn !== undefined && message.display === lane.start.crashOn) process.exit(70);
    try {
      lane.send({ type: "result", id: message.id, result: await checkFile(message.abs, ctx, message.display) });
    } catch (err) {
      lane.send({ type: "failed", id: message.id, message: err instanceof Error ? err.message : String(err) });
    }
  }
  busy = false;
}

try {
  const ctx = await makeCheckContext(lane.start.context);
  lane.onMessage((message) => {
    if (message.type !== "check") return;
    queue.push(message);
    void drain(ctx);
  });
  lane.send({ type: "ready" });
} catch (err) {
  lane.send({ type: "fatal", message: err instanceof Error ? err.message : String(err) });
}
