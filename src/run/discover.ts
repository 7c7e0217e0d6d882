// Which circuit files a run checks: explicit files, folders (searched with the config's include
// globs) and globs, minus the config's excludes; shown relative to the results root.
import fg from "fast-glob";
import { statSync } from "node:fs";
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
}

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

/**
 * Expands `patterns` (none: the config's include globs under its root) into a de-duplicated list
 * sorted by display path. An explicitly named file is always checked, even if excluded.
 */
export async function discoverCircuitFiles(patterns: readonly string[], options: DiscoverOptions): Promise<CircuitFile[]> {
  const found = new Set<string>();
  const globOptions = { absolute: true, onlyFiles: true, dot: false, ignore: [...options.exclude] };
  if (patterns.length === 0) {
    for (const f of await fg([...options.include], { ...globOptions, cwd: options.root })) found.add(resolve(f));
  }
  for (const pattern of patterns) {
    const abs = resolve(options.cwd, pattern);
    let kind: "file" | "dir" | "none" = "none";
    try {
      const st = statSync(abs);
      kind = st.isDirectory() ? "dir" : st.isFile() ? "file" : "none";
    } catch {
      // not a path: a glob
    }
    if (kind === "file") found.add(abs);
    else if (kind === "dir") for (const f of await fg([...options.include], { ...globOptions, cwd: abs })) found.add(resolve(f));
    else for (const f of await fg(pattern, { ...globOptions, cwd: options.cwd })) found.add(resolve(f));
  }
  return [...found]
    .map((abs) => ({ abs, display: displayPath(abs, options.root, options.cwd) }))
    .sort((a, b) => compareText(a.display, b.display));
}
