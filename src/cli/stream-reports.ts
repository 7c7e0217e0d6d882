// The reports of `opgate check`, written while results arrive (a RunSink for runCheck): the JSON
// results document and the JUnit XML are written circuit by circuit into temporary files, so no
// report holds every circuit's whole result; charts are written per circuit. At the end the
// whole-run reports (markdown, SARIF) are drawn from the outlines the run kept, the JUnit root
// gets its totals, and every report is renamed into place, or copied to standard output. A run
// that fails leaves no report behind, whole or partial (the temporary files are removed).
//
// What stays in memory is bounded by the outlines (findings, operating points without device
// detail) except for --html, a single page holding every circuit's charts and hand analysis:
// it keeps each whole result until the end.
import { closeSync, mkdirSync, mkdtempSync, openSync, readSync, renameSync, rmSync, writeSync, writevSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, dirname, join, resolve } from "node:path";
import { StringDecoder } from "node:string_decoder";
import type { BaselineDiff } from "../report/baseline.js";
import type { CircuitResult } from "../report/document.js";
import { renderHtml } from "../report/html.js";
import { jsonEnd, jsonStart } from "../report/json.js";
import { addSuite, JUNIT_END, JUNIT_SEPARATOR, junitEmptySuite, junitStart, type JunitTotals } from "../report/junit.js";
import { renderMarkdown } from "../report/markdown.js";
import type { DocumentHead, ReportDocument } from "../report/outline.js";
import { sarifWriter, type SarifOptions } from "../report/sarif.js";
import { chartFileName, renderCircuitSvg } from "../report/svg-chart.js";
import type { RunItem, RunSink } from "../run/run-check.js";
import { CliExit, EXIT_INPUT, type CliIo } from "./io.js";
import { writeAtomically } from "./outputs.js";

export const REPORT_FORMATS = ["json", "junit", "markdown", "sarif", "html"] as const;
export type ReportFormat = (typeof REPORT_FORMATS)[number];

/** Bytes per read when a finished temporary file is copied (JUnit's suites under their root, stdout). */
const COPY_CHUNK = 1 << 20;
/**
 * Bytes gathered before one write: a worker's pieces (src/run/prepare.ts, asBytes) arrive as
 * UTF-8 bytes of a few kilobytes each. Text is written at once: text held back for a batch was
 * kept alive past the collector's young-generation passes and promoted, 447 MB of it against
 * 264 MB written at once (8,000 files, --json, two lanes, measured 2026-12-02).
 */
const WRITE_BATCH = 1 << 16;

/** What the whole-run reports need beyond the results: the baseline comparison, SARIF's paths. */
export interface ReportOptions {
  readonly baseline?: BaselineDiff;
  readonly sarif?: SarifOptions;
}

/** Pieces per gathered write (systems take at most 1,024). */
const WRITEV_MAX = 512;

/** Writes every byte of `chunks`, in order (a gathered write may take only part). */
function writeAll(fd: number, chunks: Uint8Array[]): void {
  const rest = [...chunks];
  while (rest.length > 0) {
    let n = writevSync(fd, rest.slice(0, WRITEV_MAX));
    while (rest.length > 0 && n >= rest[0]!.length) n -= rest.shift()!.length;
    if (n > 0) rest[0] = rest[0]!.subarray(n);
  }
}

/** A file written in pieces and moved into place at the end. */
class Spool {
  private fd: number;
  /** Bytes not yet written, in order, and their length. */
  private pending: Uint8Array[] = [];
  private pendingLength = 0;
  constructor(
    readonly path: string,
    private readonly what: string,
  ) {
    this.fd = this.guard(() => {
      mkdirSync(dirname(path), { recursive: true });
      return openSync(path, "w");
    });
  }
  write(data: string | Uint8Array): void {
    if (typeof data === "string") {
      this.flush();
      this.guard(() => writeSync(this.fd, data));
      return;
    }
    this.pending.push(data);
    this.pendingLength += data.length;
    if (this.pendingLength >= WRITE_BATCH) this.flush();
  }
  /** Writes the gathered bytes with one gathered write. */
  private flush(): void {
    if (this.pending.length === 0) return;
    const pieces = this.pending;
    this.pending = [];
    this.pendingLength = 0;
    this.guard(() => writeAll(this.fd, pieces));
  }
  /** Appends another spool's whole content. */
  append(other: Spool): void {
    other.close();
    const buf = Buffer.allocUnsafe(COPY_CHUNK);
    const fd = openSync(other.path, "r");
    try {
      for (let n = readSync(fd, buf); n > 0; n = readSync(fd, buf)) this.write(buf.subarray(0, n));
    } finally {
      closeSync(fd);
    }
  }
  close(): void {
    if (this.fd < 0) return;
    this.flush();
    const fd = this.fd;
    this.fd = -1;
    this.guard(() => closeSync(fd));
  }
  /** Its content to a text sink, in chunks (standard output). */
  pipeTo(out: (text: string) => void): void {
    this.close();
    const buf = Buffer.allocUnsafe(COPY_CHUNK);
    const decoder = new StringDecoder("utf8");
    const fd = openSync(this.path, "r");
    try {
      for (let n = readSync(fd, buf); n > 0; n = readSync(fd, buf)) out(decoder.write(buf.subarray(0, n)));
      const rest = decoder.end();
      if (rest) out(rest);
    } finally {
      closeSync(fd);
    }
  }
  finishAt(target: string): void {
    this.close();
    this.guard(() => renameSync(this.path, target));
  }
  remove(): void {
    this.pending = [];
    this.pendingLength = 0;
    if (this.fd >= 0) {
      try {
        closeSync(this.fd);
      } catch {
        // already failing: the removal below is what matters
      }
      this.fd = -1;
    }
    rmSync(this.path, { force: true });
  }
  private guard<T>(op: () => T): T {
    try {
      return op();
    } catch (err) {
      throw new CliExit(EXIT_INPUT, `cannot write the ${this.what}: ${err instanceof Error ? err.message : String(err)}`);
    }
  }
}

export interface ReportWriters extends RunSink {
  /**
   * Writes what is left from the run's outlines and moves every report into place. Returns true
   * when a report went to standard output.
   */
  finish(doc: ReportDocument, options: ReportOptions): boolean;
  /** Removes whatever was not finished (call in `finally`). */
  abort(): void;
}

export interface WriterOptions {
  /** --charts DIR: one SVG per circuit, written as the circuit arrives. */
  readonly charts?: { readonly dir: string; readonly shown: string };
}

/** Temporary file beside a target (same folder: the rename is atomic) or, for stdout, in the system's temporary folder. */
function spoolFor(format: ReportFormat, target: string, io: CliIo, part = ""): Spool {
  const what = `${format} report to ${target === "-" ? "standard output" : target}`;
  if (target === "-") {
    const dir = mkdtempSync(join(tmpdir(), "opgate-report-"));
    return new Spool(join(dir, `${format}${part}.tmp`), what);
  }
  const abs = resolve(io.cwd, target);
  return new Spool(join(dirname(abs), `.${basename(abs)}${part}.${process.pid}.${Math.random().toString(36).slice(2, 10)}.tmp`), what);
}

export function openReportWriters(targets: Partial<Record<ReportFormat, string>>, io: CliIo, options: WriterOptions = {}): ReportWriters {
  const spools: Spool[] = [];
  const open = (format: ReportFormat, part = ""): Spool | undefined => {
    const target = targets[format];
    if (!target) return undefined;
    const s = spoolFor(format, target, io, part);
    spools.push(s);
    return s;
  };
  let head: DocumentHead | undefined;
  let count = 0;
  let json: Spool | undefined;
  let junitBody: Spool | undefined;
  const totals: JunitTotals = { tests: 0, failures: 0, errors: 0, skipped: 0 };
  const whole: CircuitResult[] | undefined = targets.html ? [] : undefined;

  const finishOne = (format: ReportFormat, spool: Spool): boolean => {
    const target = targets[format]!;
    if (target === "-") {
      spool.pipeTo(io.stdout);
      spool.remove();
      rmSync(dirname(spool.path), { recursive: true, force: true });
      return true;
    }
    spool.finishAt(resolve(io.cwd, target));
    return false;
  };
  return {
    needs: { json: Boolean(targets.json), junit: Boolean(targets.junit), whole: Boolean(targets.html) || options.charts !== undefined },
    start(h: DocumentHead): void {
      head = h;
      json = open("json");
      json?.write(jsonStart(h));
      junitBody = open("junit", ".suites");
    },
    circuit(item: RunItem): void {
      if (!head) throw new Error("report writers: circuit before start");
      if (json) {
        if (count > 0) json.write(",");
        json.write(item.json());
      }
      if (junitBody) {
        const suite = item.junit();
        if (count > 0) junitBody.write(JUNIT_SEPARATOR);
        junitBody.write(suite.xml);
        addSuite(totals, suite);
      }
      if (options.charts) {
        const c = item.result();
        const svg = renderCircuitSvg(c);
        if (svg) {
          try {
            writeAtomically(resolve(options.charts.dir, chartFileName(c.file)), svg);
          } catch (err) {
            throw new CliExit(EXIT_INPUT, `cannot write the chart of ${c.file} to ${options.charts.shown}: ${err instanceof Error ? err.message : String(err)}`);
          }
        }
      }
      whole?.push(item.result());
      count++;
    },
    finish(doc: ReportDocument, reportOptions: ReportOptions): boolean {
      // Every report is completed in its temporary file first, then all are moved into place:
      // one that cannot be written leaves none behind.
      const done: [ReportFormat, Spool][] = [];
      if (json) {
        json.write(jsonEnd(doc, doc.summary, count));
        done.push(["json", json]);
      }
      if (junitBody) {
        if (count === 0) {
          const empty = junitEmptySuite();
          junitBody.write(empty.xml);
          addSuite(totals, empty);
        }
        const junit = open("junit")!;
        junit.write(junitStart(totals));
        junit.append(junitBody);
        junitBody.remove();
        junit.write(JUNIT_END);
        done.push(["junit", junit]);
      }
      const text = (format: ReportFormat, render: () => string): void => {
        if (!targets[format]) return;
        const spool = open(format)!;
        spool.write(render());
        done.push([format, spool]);
      };
      text("markdown", () => renderMarkdown(doc, reportOptions.baseline ? { baseline: reportOptions.baseline } : {}));
      if (targets.sarif) {
        // A result at a time from the outlines: the log of a large run is never one string.
        const sarif = open("sarif")!;
        const w = sarifWriter(doc, reportOptions.sarif ?? {});
        sarif.write(w.start);
        let written = false;
        for (const c of doc.circuits) {
          const part = w.results(c, !written);
          if (part) {
            written = true;
            sarif.write(part);
          }
        }
        sarif.write(`${written ? "\n      " : ""}${w.end}\n`);
        done.push(["sarif", sarif]);
      }
      if (whole) text("html", () => renderHtml({ ...doc, circuits: whole }));
      let toStdout = false;
      for (const [format, spool] of done) toStdout = finishOne(format, spool) || toStdout;
      return toStdout;
    },
    abort(): void {
      for (const s of spools) {
        s.remove();
        if (s.path.startsWith(tmpdir()) && basename(dirname(s.path)).startsWith("opgate-report-")) rmSync(dirname(s.path), { recursive: true, force: true });
      }
    },
  };
}
