// Where a run keeps its circuits' outlines (src/report/outline.ts) until the whole-run reports
// are written: in memory up to SPILL_AFTER bytes, then in a temporary file, read back each time a
// report asks for a field (the outline's getters parse their part afresh on every read anyway).
// A run's memory then stays the same whatever its number of files: at 8,000 files the outlines
// were 29 MB of the main thread's memory (3.6 kB each, measured 2026-12-02), growing with every
// file. The file is removed as soon as it is open (on Windows, when it is closed), so nothing is
// left behind even when the process is killed; the outlines read it for as long as they live.
import { closeSync, openSync, readSync, rmSync, unlinkSync, writeSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { outlineFromBytes, type CircuitOutline, type OutlineText } from "../report/outline.js";

/** Outline bytes kept in memory before the rest go to a file: about 1,100 example-sized circuits. */
export const SPILL_AFTER = 4 * 1024 * 1024;

/** Closes a store's file once nothing refers to the store (its outlines hold it). */
const closer = new FinalizationRegistry<number>((fd) => {
  try {
    closeSync(fd);
  } catch {
    // already closed
  }
});

export class OutlineStore {
  private kept = 0;
  private fd = -1;
  /** Set when the file could not be made: everything stays in memory. */
  private noFile = false;
  private size = 0;

  constructor(private readonly spillAfter = SPILL_AFTER) {}

  /** The outline, its bytes kept here. */
  keep(o: OutlineText): CircuitOutline {
    const bytes = typeof o.text === "string" ? Buffer.from(o.text, "utf8") : o.text;
    if (this.kept + bytes.length <= this.spillAfter || !this.open()) {
      this.kept += bytes.length;
      return outlineFromBytes(o, bytes, o.lightEnd, o.operatingPointEnd);
    }
    const at = this.size;
    const length = bytes.length;
    for (let done = 0; done < length; ) done += writeSync(this.fd, bytes, done, length - done, at + done);
    this.size += length;
    // The store stays reachable from every spilled outline, so its file stays open while one lives.
    const read = (): Buffer => this.read(at, length);
    return outlineFromBytes(o, read, o.lightEnd, o.operatingPointEnd);
  }

  /** Bytes on disk (0 while everything fits in memory). */
  get spilled(): number {
    return this.size;
  }

  private read(at: number, length: number): Buffer {
    const buf = Buffer.allocUnsafe(length);
    let got = 0;
    while (got < length) {
      const n = readSync(this.fd, buf, got, length - got, at + got);
      if (n === 0) throw new Error(`opgate: the run's temporary outline file ended early (${at + got} of ${at + length} bytes): was the temporary folder cleaned during the run?`);
      got += n;
    }
    return buf;
  }

  /** Opens the file on first use; false when it cannot be made (the outlines stay in memory). */
  private open(): boolean {
    if (this.fd >= 0) return true;
    if (this.noFile) return false;
    const path = join(tmpdir(), `opgate-outlines-${process.pid}-${Math.random().toString(36).slice(2, 10)}.tmp`);
    try {
      this.fd = openSync(path, "wx+", 0o600);
    } catch {
      this.noFile = true;
      return false;
    }
    try {
      unlinkSync(path);
    } catch {
      // Cannot remove an open file here: remove it when the process ends.
      process.once("exit", () => {
        try {
          closeSync(this.fd);
        } catch {
          // closed already
        }
        rmSync(path, { force: true });
      });
    }
    closer.register(this, this.fd);
    return true;
  }
}
