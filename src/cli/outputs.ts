// Where a command's reports go, checked before any work: a report must not overwrite one of the
// run's inputs (a circuit file, the config, a baseline or shard document, a plugin), two reports
// must not share a path (only the last would survive), and at most one may go to standard output
// (two would be concatenated into something no consumer can read). Reports are written to a
// temporary file beside the target and renamed over it, so a crash never leaves half a report.
import { mkdirSync, realpathSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { CliExit, EXIT_INPUT } from "./io.js";

export interface Input {
  /** Absolute path. */
  readonly abs: string;
  /** What it is, as a message names it: "circuit file boards/a.yaml", "the config file". */
  readonly what: string;
}

/** The real path of a file that may not exist yet (its folder's real path + its name). */
export function realTarget(abs: string): string {
  try {
    return realpathSync.native(abs);
  } catch {
    const dir = dirname(abs);
    if (dir === abs) return abs;
    return join(realTarget(dir), basename(abs));
  }
}

/**
 * Refuses colliding targets with exit 2 (nothing has been written yet). `targets` maps a format
 * to `-` (standard output) or a path relative to `cwd`.
 */
export function checkOutputTargets(targets: Readonly<Record<string, string | undefined>>, inputs: readonly Input[], cwd: string): void {
  const problems: string[] = [];
  const toStdout = Object.entries(targets).filter(([, t]) => t === "-").map(([f]) => `--${f}`);
  if (toStdout.length > 1) problems.push(`${toStdout.join(" and ")} all write to standard output, where they would run together: send at most one report there`);
  const inputByReal = new Map(inputs.map((i) => [realTarget(i.abs), i.what]));
  const seen = new Map<string, string>();
  for (const [format, target] of Object.entries(targets)) {
    if (!target || target === "-") continue;
    const real = realTarget(resolve(cwd, target));
    const input = inputByReal.get(real);
    if (input) problems.push(`--${format} ${target} is ${input}: a report must not overwrite an input`);
    const other = seen.get(real);
    if (other) problems.push(`--${other} and --${format} both write ${target}: give each report its own path`);
    else seen.set(real, format);
  }
  if (problems.length > 0) throw new CliExit(EXIT_INPUT, problems.join("\n"));
}

/** Writes `text` to `abs` through a temporary file in the same folder and a rename. */
export function writeAtomically(abs: string, text: string): void {
  mkdirSync(dirname(abs), { recursive: true });
  const temp = join(dirname(abs), `.${basename(abs)}.${process.pid}.${Math.random().toString(36).slice(2, 10)}.tmp`);
  try {
    writeFileSync(temp, text);
    renameSync(temp, abs);
  } catch (err) {
    rmSync(temp, { force: true });
    throw err;
  }
}
