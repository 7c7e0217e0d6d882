// Which circuit files a run checks: explicit files, folders (searched with the config's include
// globs) and globs, minus the config's excludes; shown relative to the results root.
//
// What a run may take is bounded here: a path on the command line that matches nothing is an
// error naming it (a gate that skips a misspelt file passes it), an unreadable folder is an
// error naming it, the config's include globs stay inside the repository root, every real file
// is checked once however many links lead to it, node_modules is never entered, and a file
// found by a folder or glob that does not say `format: opgate-circuit/…` is not a circuit: it
// is skipped and counted (a named file is always checked).
import fg from "fast-glob";
import { readFileSync, realpathSync, statSync } from "node:fs";
import { isAbsolute, relative, resolve, sep } from "node:path";
import { compareText } from "../report/build.js";

export interface CircuitFile {
  readonly abs: string;
  /** Relative to the results root, forward slashes: the `file` of its results entry. */
  readonly display: string;
}

export interface DiscoverOptions {
  readonly cwd: string;
  /** Folder results paths are relative to (the config file's folder, else the working directory). */
  readonly root: string;
  readonly include: readonly string[];
  readonly exclude: readonly string[];
  /**
   * Skip files found through a folder or glob whose text does not declare
   * `format: opgate-circuit/…` (they are listed in `skipped`). Off: every match is a circuit.
   */
  readonly circuitsOnly?: boolean;
  /** Absolute paths never taken as circuits (the run's own report files). */
  readonly outputs?: readonly string[];
}

export interface Discovery {
  /** Sorted by display path, one entry per real file. */
  readonly files: CircuitFile[];
  /** Display paths of matched files that are not circuit files (circuitsOnly), sorted. */
  readonly skipped: string[];
}

/** A path or glob that cannot be used; the message names it (exit 2 at the CLI). */
export class DiscoveryError extends Error {}

/** Folders no search enters, whatever the config says: installed packages are not circuits. */
const ALWAYS_EXCLUDED = ["**/node_modules/**"];

/** A file that declares itself a circuit: `format: opgate-circuit/…` as a top-level YAML key, or the JSON key. */
const YAML_FORMAT = /^(?:format|"format"|'format')[ \t]*:[ \t]*["']?opgate-circuit\//m;
const JSON_FORMAT = /"format"\s*:\s*"opgate-circuit\//;

export function declaresCircuit(text: string): boolean {
  return YAML_FORMAT.test(text) || JSON_FORMAT.test(text);
}

/** A model library (`format: opgate-library/…`): one of ours, read through the circuits that name it. */
const LIBRARY_FORMAT = /^(?:format|"format"|'format')[ \t]*:[ \t]*["']?opgate-library\/|"format"\s*:\s*"opgate-library\//m;

function under(abs: string, dir: string): string | null {
  const rel = relative(dir, abs);
  return rel === "" || rel.startsWith("..") || isAbsolute(rel) ? null : rel.split(sep).join("/");
}

/**
 * The path a results entry shows: relative to the results root (the config's folder), or to the
 * working directory when the config sits below it or the file is outside the root; `../` only
 * for a file outside both.
 */
export function displayPath(abs: string, root: string, cwd: string = root): string {
  // A config named with --config inside a subfolder must not make paths relative to that
  // subfolder: results paths are repository paths. So the root counts only when it is the
  // working directory or above it (where a config found by walking up always is).
  const base = root === cwd || under(cwd, root) !== null ? root : cwd;
  return under(abs, base) ?? under(abs, cwd) ?? relative(cwd, abs).split(sep).join("/");
}

function reason(err: unknown): string {
  const code = (err as { code?: string }).code;
  if (code === "EACCES" || code === "EPERM") return "permission denied";
  if (code === "ELOOP") return "too many levels of symbolic links";
  if (code === "ENOENT") return "does not exist";
  return err instanceof Error ? err.message : String(err);
}

/** An include glob that climbs out of the root (`../…`, `/…`) would crawl whatever is there. */
function leavesRoot(pattern: string): boolean {
  return isAbsolute(pattern) || /^[A-Za-z]:/.test(pattern) || pattern.split(/[\\/]/).includes("..");
}

/**
 * Files matching `patterns` under `cwd`. Links to folders are not followed (a link back to a
 * parent folder would have the crawl go round until the system's link limit, re-reading the tree
 * each time); a link to a file is taken, and de-duplicated by its real path by the caller.
 */
async function glob(patterns: string | readonly string[], cwd: string, ignore: readonly string[]): Promise<string[]> {
  let entries: fg.Entry[];
  try {
    entries = await fg(typeof patterns === "string" ? patterns : [...patterns], {
      cwd,
      absolute: true,
      onlyFiles: false,
      objectMode: true,
      followSymbolicLinks: false,
      dot: false,
      ignore: [...ignore],
      suppressErrors: false,
    });
  } catch (err) {
    const path = (err as { path?: string }).path;
    throw new DiscoveryError(`cannot read ${path ? relative(cwd, path) || "." : cwd}: ${reason(err)}`);
  }
  const files: string[] = [];
  for (const e of entries) {
    if (e.dirent.isFile()) files.push(e.path);
    else if (e.dirent.isSymbolicLink()) {
      try {
        if (statSync(e.path).isFile()) files.push(e.path);
      } catch {
        // a link to nothing, or in a circle: not a file
      }
    }
  }
  return files;
}

/**
 * Expands `patterns` (none: the config's include globs under its root) into a de-duplicated list
 * sorted by display path. An explicitly named file is always checked, even if excluded.
 * Throws DiscoveryError for an empty path, a path that matches nothing, an unreadable folder or
 * an include glob that leaves the root.
 */
export async function discover(patterns: readonly string[], options: DiscoverOptions): Promise<Discovery> {
  if (patterns.some((p) => p.trim() === "")) throw new DiscoveryError("an empty path was given: name a file, folder or glob (`.` for the working directory)");
  const outside = options.include.filter(leavesRoot);
  if (outside.length > 0) throw new DiscoveryError(`include ${outside.map((p) => `\`${p}\``).join(", ")} leaves the repository root: include globs are relative to the config's folder and stay inside it (name an outside path on the command line instead)`);
  const ignore = [...ALWAYS_EXCLUDED, ...options.exclude];
  const outputs = new Set((options.outputs ?? []).map((p) => resolve(p)));
  /** realpath → the path it was first found by. */
  const byReal = new Map<string, string>();
  const named = new Set<string>();
  const unmatched: string[] = [];
  // The system's own realpath: one call per file, where the portable one looks up every folder
  // on the way (0.22 s for 8,000 files, measured 2026-12-02). Every path compared here is
  // resolved the same way.
  const realOf = (abs: string): string | null => {
    try {
      return realpathSync.native(abs);
    } catch {
      return null; // a dangling or looping link: nothing to read
    }
  };
  const add = (abs: string, explicit: boolean, known?: string): boolean => {
    const real = known ?? realOf(abs);
    if (real === null) return false;
    if (!explicit && (outputs.has(abs) || outputs.has(real))) return false;
    if (!byReal.has(real)) byReal.set(real, abs);
    if (explicit) named.add(byReal.get(real)!);
    return true;
  };
  const rootReal = realOf(options.root) ?? options.root;
  if (patterns.length === 0) {
    // The include globs: inside the root, following no link out of it.
    for (const f of await glob(options.include, options.root, ignore)) {
      const abs = resolve(f);
      const real = realOf(abs);
      if (real !== null && (real === rootReal || under(real, rootReal) !== null)) add(abs, false, real);
    }
  }
  for (const pattern of patterns) {
    const abs = resolve(options.cwd, pattern);
    let kind: "file" | "dir" | "none" = "none";
    try {
      const st = statSync(abs);
      kind = st.isDirectory() ? "dir" : st.isFile() ? "file" : "none";
    } catch (err) {
      const code = (err as { code?: string }).code;
      if (code !== "ENOENT" && code !== "ENOTDIR") throw new DiscoveryError(`cannot read ${pattern}: ${reason(err)}`);
      // not a path: a glob
    }
    let matched = 0;
    if (kind === "file") matched += add(abs, true) ? 1 : 0;
    else if (kind === "dir") for (const f of await glob(options.include, abs, ignore)) matched += add(resolve(f), false) ? 1 : 0;
    else if (fg.isDynamicPattern(pattern)) for (const f of await glob(pattern, options.cwd, ignore)) matched += add(resolve(f), false) ? 1 : 0;
    if (matched === 0) unmatched.push(pattern);
  }
  if (unmatched.length > 0) {
    const list = unmatched.map((p) => JSON.stringify(p)).join(", ");
    throw new DiscoveryError(
      `${unmatched.length === 1 ? "this path matches" : "these paths match"} no file: ${list} (a named file must exist; a folder or glob must hold .json, .yaml or .yml files)`,
    );
  }
  const files: CircuitFile[] = [];
  const skipped: string[] = [];
  for (const abs of byReal.values()) {
    const entry = { abs, display: displayPath(abs, options.root, options.cwd) };
    const kind = options.circuitsOnly && !named.has(abs) ? fileKind(abs) : "circuit";
    // A model library found by a folder or glob is neither checked nor counted as a stray file.
    if (kind === "other") skipped.push(entry.display);
    else if (kind === "circuit") files.push(entry);
  }
  files.sort((a, b) => compareText(a.display, b.display));
  skipped.sort(compareText);
  return { files, skipped };
}

function fileKind(abs: string): "circuit" | "library" | "other" {
  let text: string;
  try {
    text = readFileSync(abs, "utf8");
  } catch {
    return "circuit"; // unreadable: let the check say so, naming the file
  }
  return declaresCircuit(text) ? "circuit" : LIBRARY_FORMAT.test(text) ? "library" : "other";
}

/** discover() without the non-circuit skipping, for callers that want every match. */
export async function discoverCircuitFiles(patterns: readonly string[], options: DiscoverOptions): Promise<CircuitFile[]> {
  return (await discover(patterns, options)).files;
}
