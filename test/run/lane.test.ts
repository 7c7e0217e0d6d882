// A lane started before the pool takes it over (src/run/lane.ts openLane), with a stand-in for the
// worker thread: what it said before `attach` reaches the pool after attach has returned (the
// pool answers `ready` by sending files through the lane attach gave it), in order, and before
// anything it says later; until attached it does not keep the process alive.
import { EventEmitter } from "node:events";
import { describe, expect, it } from "vitest";
import { openLane, type Lane, type LaneThread } from "../../src/run/lane.js";
import type { FromWorker, ToWorker } from "../../src/run/protocol.js";

class StandIn extends EventEmitter {
  readonly sent: ToWorker[] = [];
  referenced = true;
  terminated = 0;
  postMessage(message: ToWorker): void {
    this.sent.push(message);
  }
  terminate(): void {
    this.terminated++;
  }
  ref(): void {
    this.referenced = true;
  }
  unref(): void {
    this.referenced = false;
  }
}

function standIn(): { thread: StandIn; make: () => LaneThread } {
  const thread = new StandIn();
  return { thread, make: () => thread as unknown as LaneThread };
}

describe("openLane", () => {
  it("delivers what came before attach after attach returns, in order, then the rest", async () => {
    const { thread, make } = standIn();
    const open = openLane({ context: { cwd: "." } }, make);
    expect(thread.referenced).toBe(false);
    thread.emit("message", { type: "ready" } satisfies FromWorker);
    thread.emit("message", { type: "failed", id: 7, message: "early" } satisfies FromWorker);
    const seen: string[] = [];
    let lane: Lane | undefined;
    lane = open.attach({
      message: (m) => {
        // What the pool does on `ready`: send through the lane it was given.
        if (m.type === "ready") lane!.send({ type: "check", id: 0, abs: "/a.yaml", display: "a.yaml" });
        seen.push(m.type === "failed" ? `failed ${m.message}` : m.type);
      },
      error: (message) => seen.push(`error ${message}`),
      exit: (code) => seen.push(`exit ${code}`),
    });
    expect(thread.referenced).toBe(true);
    expect(seen).toEqual([]);
    lane.send({ type: "run" });
    await Promise.resolve();
    thread.emit("exit", 0);
    expect(seen).toEqual(["ready", "failed early", "exit 0"]);
    // The run went out before the first file.
    expect(thread.sent.map((m) => m.type)).toEqual(["run", "check"]);
    expect(() => open.attach({ message: () => undefined, error: () => undefined, exit: () => undefined })).toThrow(/twice/);
  });

  it("is stopped by stop() until attached, and only by the pool after", () => {
    const a = standIn();
    openLane({ context: { cwd: "." } }, a.make).stop();
    expect(a.thread.terminated).toBe(1);
    const b = standIn();
    const open = openLane({ context: { cwd: "." } }, b.make);
    const lane = open.attach({ message: () => undefined, error: () => undefined, exit: () => undefined });
    open.stop();
    expect(b.thread.terminated).toBe(0);
    lane.stop();
    expect(b.thread.terminated).toBe(1);
  });
});
