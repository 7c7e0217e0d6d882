// `opgate merge`: joins the JSON results of a sharded run (one file per CI matrix job) into one
// report, as if one job had checked everything; refuses overlapping or inconsistent shards.
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { diffDocuments } from "../report/baseline.js";
import { exitCodeFor } from "../report/build.js";
import { colourEnabled, renderConsole } from "../report/console.js";
import type { ResultsDocument } from "../report/document.js";
import { MergeError, mergeDocuments } from "../report/merge.js";
import { DocumentError, readDocument } from "../report/validate.js";
import { readBaseline, sarifOptionsFor, writeCiOutputs, writeReports, type ReportOptions } from "./check.js";
import { CliExit, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";
import { checkOutputTargets } from "./outputs.js";

function readShard(path: string, io: CliIo): ResultsDocument {
  let text: string;
  try {
    text = readFileSync(resolve(io.cwd, path), "utf8");
  } catch {
    throw new CliExit(EXIT_INPUT, `${path}: cannot read the file`);
  }
  try {
    return readDocument(text, path);
  } catch (err) {
    if (err instanceof DocumentError) throw new CliExit(EXIT_INPUT, err.message);
    throw err;
  }
}

export const mergeCommand: CommandSpec = {
  command: "merge <results..>",
  describe: "Join the JSON results of sharded runs into one report",
  builder: (y) =>
    y
      .positional("results", { type: "string", array: true, describe: "Results documents written by `opgate check --shard k/n --json`" })
      .option("json", { type: "string", describe: "Write the merged results document to PATH (--json=- for stdout)" })
      .option("junit", { type: "string", describe: "Write JUnit XML to PATH" })
      .option("markdown", { type: "string", describe: "Write the markdown report to PATH" })
      .option("sarif", { type: "string", describe: "Write SARIF 2.1.0 to PATH (one run: upload it with one category)" })
      .option("baseline", { type: "string", describe: "Compare with an earlier results document" })
      .option("quiet", { type: "boolean", alias: "q", default: false, describe: "Print only failures and the verdict line" })
      .example("$0 merge results-*.json --sarif opgate.sarif --markdown report.md", "Merge four shards' results")
      .example("$0 merge results-1.json results-2.json --json all.json", "Write the merged results document"),
  handler: async (args, io: CliIo) => {
    const paths = ((args.results as string[] | undefined) ?? []).map(String);
    const docs = paths.map((p) => readShard(p, io));
    let merged: ResultsDocument;
    try {
      merged = mergeDocuments(docs, paths);
    } catch (err) {
      if (err instanceof MergeError) throw new CliExit(EXIT_INPUT, `cannot merge: ${err.message}`);
      throw err;
    }
    // The shards' paths are relative to the folder they ran in; merge runs in the same checkout
    // layout, so SARIF locations are taken from the repository root through this folder.
    const options: ReportOptions = {
      ...(typeof args.baseline === "string" ? { baseline: diffDocuments(readBaseline(args.baseline, io), merged) } : {}),
      ...(typeof args.sarif === "string" ? { sarif: sarifOptionsFor(io.cwd, io.env) } : {}),
    };
    for (const f of ["json", "junit", "markdown", "sarif"]) {
      if (args[f] === "") throw new CliExit(EXIT_INPUT, `--${f} needs a path (--${f}=- writes to standard output)`);
    }
    const targets = {
      ...(typeof args.json === "string" ? { json: args.json } : {}),
      ...(typeof args.junit === "string" ? { junit: args.junit } : {}),
      ...(typeof args.markdown === "string" ? { markdown: args.markdown } : {}),
      ...(typeof args.sarif === "string" ? { sarif: args.sarif } : {}),
    };
    checkOutputTargets(
      targets,
      [...paths.map((p) => ({ abs: resolve(io.cwd, p), what: `the shard document ${p}` })), ...(typeof args.baseline === "string" ? [{ abs: resolve(io.cwd, args.baseline), what: "the baseline document" }] : [])],
      io.cwd,
    );
    const onStdout = writeReports(merged, targets, io, options);
    const text = renderConsole(merged, { color: colourEnabled(io.env, onStdout ? io.stderrIsTTY === true : io.isTTY), quiet: args.quiet === true, ...(options.baseline ? { baseline: options.baseline } : {}) });
    if (onStdout) io.stderr(text);
    else io.stdout(text);
    writeCiOutputs(merged, io, options, onStdout);
    return exitCodeFor(merged);
  },
};
