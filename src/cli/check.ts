// `opgate check`: the gate. Finds circuit files, checks them (on worker threads with --jobs,
// one slice with --shard), prints a line per file and its findings, writes the requested
// reports, annotates the pull request under GitHub Actions, and exits 0 / 1 / 2.
import { spawnSync } from "node:child_process";
import { appendFileSync, existsSync, readFileSync, realpathSync, statSync } from "node:fs";
import { availableParallelism } from "node:os";
import { isAbsolute, relative, resolve, sep } from "node:path";
import type { InputError } from "../circuit/types.js";
import type { CheckContext, CheckContextOptions } from "../pipeline/check-file.js";
import { renderAnnotations } from "../report/annotations.js";
import { diffDocuments } from "../report/baseline.js";
import { exitCodeFor } from "../report/build.js";
import { colourEnabled, progressFrame, renderConsole, terminalText } from "../report/console.js";
import type { ResultsDocument, Severity } from "../report/document.js";
import type { ReportDocument } from "../report/outline.js";
import { renderJson } from "../report/json.js";
import { renderJunit } from "../report/junit.js";
import { renderMarkdown, truncateMarkdown } from "../report/markdown.js";
import { renderSarif, type SarifOptions } from "../report/sarif.js";
import { renderHtml } from "../report/html.js";
import { DocumentError, readDocument } from "../report/validate.js";
import { makeCheckContext } from "../run/context.js";
import { discover, DiscoveryError, type Discovery } from "../run/discover.js";
import { changesSince, ChangedSinceError, selectChanged, type Changes } from "../run/changed.js";
import { configModels, defaultCacheDir, ResultCache, runKey } from "../run/cache.js";
import { boundHeapGrowth, LARGE_RUN_FILES } from "../run/heap-growth.js";
import { openLane } from "../run/lane.js";
import { runCheck } from "../run/run-check.js";
import { toolVersion } from "../run/version.js";
import { parseShard, type Shard } from "../run/shard.js";
import { CliExit, EXIT_INPUT, type CliIo } from "./io.js";
import { checkOutputTargets, writeAtomically, type Input } from "./outputs.js";
import { openReportWriters, REPORT_FORMATS, type ReportOptions } from "./stream-reports.js";
import type { CommandSpec } from "./main.js";

/** Below this many files a progress bar only flickers. */
const PROGRESS_MIN_FILES = 20;

/** GitHub drops a step summary over 1 MiB entirely. */
export const STEP_SUMMARY_MAX_BYTES = 1024 * 1024;

const FORMATS = REPORT_FORMATS;
type Format = (typeof FORMATS)[number];

export type { ReportOptions } from "./stream-reports.js";

/**
 * SARIF locations are resolved from the repository root: GITHUB_WORKSPACE under Actions, else the
 * git top level of `root`, else `root` itself. Returns the path of `root` (the folder the results
 * document's paths are relative to) from there, and the repository's web address at this commit
 * when the CI environment names it (team rules' help links point at their source there).
 */
export function sarifOptionsFor(root: string, env: CliIo["env"]): SarifOptions {
  let repository = env.GITHUB_WORKSPACE;
  if (!repository) {
    const git = spawnSync("git", ["rev-parse", "--show-toplevel"], { cwd: root, encoding: "utf8" });
    repository = git.status === 0 ? git.stdout.trim() : root;
  }
  let rel = relative(realpathOr(repository), realpathOr(root)).split(sep).join("/");
  if (rel.startsWith("..") || isAbsolute(rel)) rel = ""; // the root is outside the repository: keep paths as they are
  const { GITHUB_SERVER_URL: server, GITHUB_REPOSITORY: repo, GITHUB_SHA: sha } = env;
  return { rootFromRepository: rel, ...(server && repo && sha ? { repositoryBlobUri: `${server}/${repo}/blob/${sha}` } : {}) };
}

function realpathOr(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    return path;
  }
}

export function renderFormat(format: Format, doc: ResultsDocument, options: ReportOptions): string {
  switch (format) {
    case "json":
      return renderJson(doc);
    case "junit":
      return renderJunit(doc);
    case "markdown":
      return renderMarkdown(doc, options.baseline ? { baseline: options.baseline } : {});
    case "sarif":
      return renderSarif(doc, options.sarif ?? {});
    case "html":
      return renderHtml(doc);
  }
}

/**
 * Writes the reports asked for (`-` = standard output) and, under GitHub Actions, the annotations
 * and step summary. Returns true when a report went to standard output (the console text then
 * goes to stderr so the report stays parseable).
 */
export function writeReports(doc: ResultsDocument, targets: Partial<Record<Format, string>>, io: CliIo, options: ReportOptions): boolean {
  let toStdout = false;
  for (const format of FORMATS) {
    const target = targets[format];
    if (!target) continue;
    const text = renderFormat(format, doc, options);
    if (target === "-") {
      io.stdout(text);
      toStdout = true;
      continue;
    }
    const path = resolve(io.cwd, target);
    try {
      writeAtomically(path, text);
    } catch (err) {
      throw new CliExit(EXIT_INPUT, `cannot write the ${format} report to ${target}: ${err instanceof Error ? err.message : String(err)}`);
    }
  }
  return toStdout;
}

/**
 * Under GitHub Actions: annotations (on stdout, or stderr when a report occupies stdout — the
 * runner reads commands from both) and the markdown appended to the step summary, size-capped.
 */
export function writeCiOutputs(doc: ReportDocument, io: CliIo, options: ReportOptions, reportOnStdout = false): void {
  if (io.env.GITHUB_ACTIONS !== "true") return;
  if (reportOnStdout) io.stderr(renderAnnotations(doc));
  else io.stdout(renderAnnotations(doc));
  const summaryFile = io.env.GITHUB_STEP_SUMMARY;
  if (!summaryFile) return;
  const already = existsSync(summaryFile) ? statSync(summaryFile).size : 0;
  let markdown = renderMarkdown(doc, options.baseline ? { baseline: options.baseline } : {});
  // Earlier steps (or tools in this step) may have left a paragraph without a line end: starting
  // with a blank line keeps our verdict from being glued to it (it would render with literal `**`).
  const lead = "\n\n";
  const room = STEP_SUMMARY_MAX_BYTES - already - lead.length - 1;
  if (Buffer.byteLength(markdown) > room) {
    // Characters are at most 4 bytes in UTF-8: cutting to room/4 characters always fits.
    markdown = truncateMarkdown(markdown, Math.max(0, Math.floor(room / 4)));
    if (Buffer.byteLength(markdown) > room) return;
  }
  try {
    appendFileSync(summaryFile, `${lead}${markdown}\n`);
  } catch (err) {
    io.stderr(`opgate: cannot append to the step summary: ${err instanceof Error ? err.message : String(err)}\n`);
  }
}

export function readBaseline(path: string, io: CliIo): ResultsDocument {
  const abs = resolve(io.cwd, path);
  let text: string;
  try {
    text = readFileSync(abs, "utf8");
  } catch {
    throw new CliExit(EXIT_INPUT, `--baseline ${path}: cannot read the file (it should be an earlier --json results document)`);
  }
  try {
    return readDocument(text, path);
  } catch (err) {
    if (err instanceof DocumentError) throw new CliExit(EXIT_INPUT, `--baseline ${err.message}`);
    throw err;
  }
}

/** `file:line:col: error: message — hint` for a circuit input error (also used by `opgate inspect`). */
export function formatInputError(e: InputError): string {
  const where = e.line !== undefined ? `${e.file}:${e.line}:${e.column ?? 1}` : e.file;
  return `${where}: error: ${e.message}${e.hint ? ` — ${e.hint}` : ""}`;
}

/** "config examples/opgate.config.yaml" or "no config file: built-in defaults". */
export function policyLine(configFile: string | null, cwd: string): string {
  if (configFile === null) return "no config file: built-in defaults";
  const rel = relative(cwd, configFile);
  return `config ${terminalText(rel === "" || rel.startsWith("..") || isAbsolute(rel) ? configFile : rel.split(sep).join("/"))}`;
}

/** Redraws the bar only when it visibly moves (a frame per file would flood a slow terminal). */
function progressWriter(io: CliIo): (done: number, total: number) => void {
  let last = "";
  return (done, total) => {
    const frame = progressFrame(done, total);
    const bar = frame.slice(0, frame.indexOf("]"));
    if (bar !== last || done === total) io.stderr(frame);
    last = bar;
  };
}

/** How many files `patterns` name when each is an existing file (a plain path, not a folder or glob); otherwise Infinity. */
function namedFiles(patterns: readonly string[], cwd: string): number {
  if (patterns.length === 0) return Infinity;
  for (const p of patterns) {
    try {
      if (!statSync(resolve(cwd, p)).isFile()) return Infinity;
    } catch {
      return Infinity;
    }
  }
  return patterns.length;
}

/** `--jobs N` as given, or (auto) one lane per core at most, added only where they pay (pool.ts). */
function parseJobs(value: unknown, io: CliIo): { jobs: number; auto: boolean } {
  if (value === undefined) return { jobs: availableParallelism(), auto: true };
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1) throw new CliExit(EXIT_INPUT, `--jobs ${String(value)}: expected a whole number of 1 or more`);
  // More lanes than cores only add memory (each lane is a whole engine) and switching.
  const cores = availableParallelism();
  if (n > cores) {
    io.stderr(`opgate: --jobs ${n} capped at ${cores}, the number of cores\n`);
    return { jobs: cores, auto: false };
  }
  return { jobs: n, auto: false };
}

function stringList(value: unknown): string[] {
  if (value === undefined) return [];
  return (Array.isArray(value) ? value : [value]).map(String);
}

async function buildContext(options: CheckContextOptions): Promise<CheckContext> {
  try {
    return await makeCheckContext(options);
  } catch (err) {
    if (err instanceof CliExit) throw err;
    // ConfigError messages are already `file:line:col: error: … — hint` lines.
    throw new CliExit(EXIT_INPUT, err instanceof Error ? err.message : String(err));
  }
}

function outputTargets(args: Record<string, unknown>, ctx: CheckContext): Partial<Record<Format, string>> {
  const targets: Partial<Record<Format, string>> = {};
  for (const format of FORMATS) {
    const flag = args[format];
    const fromConfig = ctx.config.outputs[format];
    if (flag === "") throw new CliExit(EXIT_INPUT, `--${format} needs a path (--${format}=- writes to standard output)`);
    if (typeof flag === "string") targets[format] = flag;
    else if (fromConfig) targets[format] = fromConfig;
  }
  return targets;
}

/** What a report must never overwrite: the circuits, the config, its plugins, the baseline. */
function runInputs(files: readonly { abs: string; display: string }[], ctx: CheckContext, baseline: string | undefined): Input[] {
  return [
    ...files.map((f) => ({ abs: f.abs, what: `the circuit file ${f.display}` })),
    ...(ctx.config.file ? [{ abs: ctx.config.file, what: "the config file" }] : []),
    ...ctx.config.plugins.map((p) => ({ abs: p, what: "a team-rule plugin" })),
    ...(baseline ? [{ abs: baseline, what: "the baseline document" }] : []),
  ];
}

/** One line for the files a folder or glob matched that are not circuit files. */
function skippedLine(skipped: readonly string[]): string {
  const shown = skipped.slice(0, 3).join(", ");
  const more = skipped.length > 3 ? ` and ${skipped.length - 3} more` : "";
  return `opgate: skipped ${skipped.length} file${skipped.length === 1 ? "" : "s"} that ${skipped.length === 1 ? "is" : "are"} not circuit files (no \`format: opgate-circuit/…\`): ${shown}${more}\n`;
}

/**
 * The baseline restricted to the files this run checked and the circuit files deleted since the
 * reference, so that files left out by --changed-since do not show as removed.
 */
function limitBaseline(base: ResultsDocument, head: ReportDocument, changes: Changes, root: string): ResultsDocument {
  const keep = new Set(head.circuits.map((c) => c.file));
  for (const path of changes.deleted) keep.add(relative(root, path).split(sep).join("/"));
  return { ...base, circuits: base.circuits.filter((c) => keep.has(c.file)) };
}

/** The result cache when --cache or --cache-dir asks for it. */
function openCache(args: Record<string, unknown>, ctx: CheckContext, io: CliIo): ResultCache | undefined {
  const dirFlag = args["cache-dir"];
  if (dirFlag === "") throw new CliExit(EXIT_INPUT, "--cache-dir needs a folder");
  if (args.cache !== true && typeof dirFlag !== "string") return undefined;
  const dir = typeof dirFlag === "string" ? resolve(io.cwd, dirFlag) : defaultCacheDir(io.env);
  return new ResultCache(dir, runKey(ctx, toolVersion(), configModels(ctx)));
}

export const checkCommand: CommandSpec = {
  command: "check [paths..]",
  describe: "Check circuit files (paths, folders or globs; default: the config's include globs)",
  builder: (y) =>
    y
      .positional("paths", { type: "string", array: true, describe: "Circuit files, folders or globs" })
      .option("json", { type: "string", describe: "Write the results document (JSON) to PATH (--json=- for stdout)" })
      .option("junit", { type: "string", describe: "Write JUnit XML to PATH" })
      .option("markdown", { type: "string", describe: "Write the markdown report to PATH" })
      .option("sarif", { type: "string", describe: "Write SARIF 2.1.0 to PATH (code-scanning upload)" })
      .option("html", { type: "string", describe: "Write one self-contained HTML report (verdict, findings, charts, hand analysis) to PATH" })
      .option("charts", { type: "string", describe: "Write each circuit's frequency-response chart as DIR/<file path>.svg" })
      .option("baseline", { type: "string", describe: "Compare with an earlier results document (e.g. from the target branch)" })
      .option("jobs", { type: "number", describe: "Files are checked by this process and N − 1 worker threads (default: up to one per core, one per 2,000 files)" })
      .option("shard", { type: "string", describe: "Check only slice k of n of the sorted files (k/n, e.g. 2/4)" })
      .option("quiet", { type: "boolean", alias: "q", default: false, describe: "Print only failures and the verdict line" })
      .option("config", { type: "string", describe: "Config file (default: opgate.config.yaml found walking up)" })
      .option("rule", { type: "string", array: true, describe: "Set a rule's severity: id=error|warning|note|off (repeatable)" })
      .option("fail-on", { choices: ["error", "warning", "note"], describe: "Lowest severity that fails the run (default: config, else error)" })
      .option("annotations", {
        type: "boolean",
        default: true,
        describe: "Under GitHub Actions, annotate findings and append the step summary (--no-annotations in shard jobs: merge does it once)",
      })
      .option("strict", { type: "boolean", default: false, describe: "A matched .json/.yaml file that is not a circuit file (no format: opgate-circuit/…) is an error instead of skipped" })
      .option("timestamp", { type: "boolean", default: false, describe: "Record the time in the results document (off: reproducible output)" })
      .option("changed-since", { type: "string", describe: "Check only circuit files changed since this git commit (and those using a changed model library)" })
      .option("cache", { type: "boolean", default: false, describe: "Reuse results of unchanged files from the result cache (OPGATE_CACHE_DIR, else the user cache folder)" })
      .option("cache-dir", { type: "string", describe: "Result cache folder (implies --cache; e.g. a CI cache directory)" })
      .example("$0 check examples", "Check every circuit file under examples/")
      .example("$0 check 'boards/**/*.yaml' --fail-on warning", "Fail on warnings too")
      .example("$0 check --json results.json --markdown report.md --sarif opgate.sarif", "Write the reports")
      .example("$0 check --shard 2/4 --json results-2.json", "Check the second of four slices (a CI matrix job)")
      .example("$0 check --baseline main-results.json", "Show what changed against an earlier run")
      .example("$0 check --rule headroom=off --jobs 4", "Turn a rule off and use four threads"),
  handler: async (args, io: CliIo) => {
    const { jobs, auto: autoJobs } = parseJobs(args.jobs, io);
    let shard: Shard | undefined;
    if (typeof args.shard === "string") {
      const parsed = parseShard(args.shard);
      if (typeof parsed === "string") throw new CliExit(EXIT_INPUT, parsed);
      shard = parsed;
    }
    const contextOptions: CheckContextOptions = {
      cwd: io.cwd,
      ...(typeof args.config === "string" ? { configPath: args.config } : {}),
      ...(args.rule !== undefined ? { ruleFlags: stringList(args.rule) } : {}),
      ...(typeof args["fail-on"] === "string" ? { failOn: args["fail-on"] as Severity } : {}),
    };
    // With an explicit --jobs N the workers start now and load while this thread reads the policy
    // and looks for files (0.4–0.5 s at 8,000 files); the pool takes them over (src/run/lane.ts).
    // Not when the files are named one by one and fewer than the lanes: the pool would stop them.
    const early = autoJobs ? 0 : Math.min(jobs, namedFiles(stringList(args.paths), io.cwd)) - 1;
    const started = Array.from({ length: Math.max(0, early) }, () => openLane({ context: contextOptions }));
    try {
      const ctx = await buildContext(contextOptions);
      // Which policy judged this run: the same files give different verdicts under different configs.
      io.stderr(`opgate: ${policyLine(ctx.config.file, io.cwd)}\n`);
      const baselineDoc = typeof args.baseline === "string" ? readBaseline(args.baseline, io) : undefined;

      const patterns = stringList(args.paths);
      const targets = outputTargets(args, ctx);
      const outputPaths = Object.values(targets).filter((t): t is string => typeof t === "string" && t !== "-").map((t) => resolve(io.cwd, t));
      let found: Discovery;
      try {
        found = await discover(patterns, {
          cwd: io.cwd,
          root: ctx.root,
          include: ctx.config.include,
          exclude: ctx.config.exclude,
          circuitsOnly: true,
          outputs: outputPaths,
        });
      } catch (err) {
        if (err instanceof DiscoveryError) throw new CliExit(EXIT_INPUT, err.message);
        throw err;
      }
      let files = found.files;
      checkOutputTargets(targets, runInputs(files, ctx, typeof args.baseline === "string" ? resolve(io.cwd, args.baseline) : undefined), io.cwd);
      if (found.skipped.length > 0) {
        if (args.strict === true || ctx.config.nonCircuitFiles === "error")
          throw new CliExit(EXIT_INPUT, `${skippedLine(found.skipped).replace(/^opgate: skipped/, "found").trimEnd()} — ${args.strict === true ? "--strict" : "the config's nonCircuitFiles: error"} makes that an error: exclude them, or add \`format: opgate-circuit/1\` if they are circuits`);
        io.stderr(skippedLine(found.skipped));
      }
      if (files.length === 0) {
        throw new CliExit(EXIT_INPUT, `no circuit files (.json, .yaml, .yml declaring format: opgate-circuit/…) match ${patterns.length ? patterns.join(" ") : ctx.config.include.join(" ")}`);
      }

      let changes: Changes | undefined;
      if (typeof args["changed-since"] === "string") {
        try {
          changes = changesSince(args["changed-since"], io.cwd);
        } catch (err) {
          if (err instanceof ChangedSinceError) throw new CliExit(EXIT_INPUT, err.message);
          throw err;
        }
        const picked = selectChanged(files, changes, ctx.config);
        io.stderr(
          picked.everything
            ? `opgate: changed since ${changes.ref}: ${relative(io.cwd, picked.everything) || picked.everything} (policy), so all ${files.length} circuit files\n`
            : `opgate: changed since ${changes.ref}: ${picked.files.length} of ${files.length} circuit files (changed, or using a changed model library)\n`,
        );
        files = picked.files;
      }
      // A long run keeps its memory bounded (src/run/heap-growth.ts).
      if (files.length >= LARGE_RUN_FILES) boundHeapGrowth(process.execArgv);
      const cache = openCache(args, ctx, io);
      // The bar is drawn on stderr: whether stderr is a terminal decides, not stdout.
      const showProgress = io.stderrIsTTY === true && io.env.CI !== "true" && !io.env.GITHUB_ACTIONS && files.length >= PROGRESS_MIN_FILES;
      // Reports are written while results arrive (src/cli/stream-reports.ts) and moved into place at the end.
      const writers = openReportWriters(targets, io, {
        ...(typeof args.charts === "string" ? { charts: { dir: resolve(io.cwd, args.charts), shown: args.charts } } : {}),
      });
      let doc: ReportDocument;
      let reportOnStdout: boolean;
      let reportOptions: ReportOptions;
      try {
        doc = await runCheck(
          files,
          {
            ctx,
            contextOptions,
            jobs,
            autoJobs,
            ...(shard ? { shard } : {}),
            ...(args.timestamp === true ? { timestamp: new Date().toISOString() } : {}),
            ...(showProgress ? { onProgress: progressWriter(io) } : {}),
            onNotice: (message) => io.stderr(`opgate: ${message}\n`),
            ...(cache ? { cache } : {}),
            ...(started.length > 0 ? { started } : {}),
          },
          writers,
        );
        if (showProgress) io.stderr("\n");
        if (cache) io.stderr(`opgate: ${cache.summary()}\n`);
        if (shard && doc.circuits.length === 0) io.stderr(`opgate: shard ${shard.index}/${shard.count} has no files (${files.length} in all)\n`);

        // With --changed-since the baseline is compared on what this run checked and what was deleted.
        const baselineFor = baselineDoc && changes ? limitBaseline(baselineDoc, doc, changes, ctx.root) : baselineDoc;
        reportOptions = {
          ...(baselineFor ? { baseline: diffDocuments(baselineFor, doc) } : {}),
          ...(targets.sarif ? { sarif: sarifOptionsFor(ctx.root, io.env) } : {}),
        };
        reportOnStdout = writers.finish(doc, reportOptions);
      } finally {
        writers.abort();
      }
      const consoleText = renderConsole(doc, {
        color: colourEnabled(io.env, reportOnStdout ? io.stderrIsTTY === true : io.isTTY),
        quiet: args.quiet === true,
        ...(reportOptions.baseline ? { baseline: reportOptions.baseline } : {}),
      });
      if (reportOnStdout) io.stderr(consoleText);
      else io.stdout(consoleText);
      if (args.annotations !== false) writeCiOutputs(doc, io, reportOptions, reportOnStdout);
      return exitCodeFor(doc);
    } finally {
      // Those the run did not take (it ended early, or had fewer files than lanes).
      for (const lane of started) lane.stop();
    }
  },
};
