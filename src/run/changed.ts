// `check --changed-since REF`: the circuit files a change touched, from git. A circuit file is
// taken when git reports it changed since REF (committed, staged, unstaged or new and untracked;
// a rename counts as its new path), or when it depends on a shared file that changed: a model
// library it names itself. A change to the policy — the config file, a team-rule plugin, a
// library the config lists — can change every result, so then every file is taken.
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { parse } from "yaml";
import type { ResolvedConfig } from "../review/config-types.js";
import type { CircuitFile } from "./discover.js";

export class ChangedSinceError extends Error {}

export interface Changes {
  readonly ref: string;
  /** Absolute paths that exist now and differ from REF (new paths of renames included). */
  readonly changed: ReadonlySet<string>;
  /** Absolute paths present at REF and gone now (old paths of renames included). */
  readonly deleted: ReadonlySet<string>;
}

function git(cwd: string, args: readonly string[]): string {
  const r = spawnSync("git", [...args], { cwd, encoding: "utf8", maxBuffer: 256 * 1024 * 1024 });
  if (r.error) throw new ChangedSinceError(`--changed-since needs git, which could not be run (${r.error.message})`);
  if (r.status !== 0) throw new ChangedSinceError(r.stderr.trim().split("\n")[0] || `git ${args[0]} failed`);
  return r.stdout;
}

/** What changed between REF and the working tree of the repository around `cwd`. */
export function changesSince(ref: string, cwd: string): Changes {
  if (ref === "" || ref.startsWith("-")) throw new ChangedSinceError(`--changed-since ${JSON.stringify(ref)}: name a commit, branch or tag (e.g. origin/main)`);
  let top: string;
  try {
    top = git(cwd, ["rev-parse", "--show-toplevel"]).trim();
  } catch (err) {
    throw new ChangedSinceError(`--changed-since: ${cwd} is not inside a git repository (${err instanceof Error ? err.message : String(err)})`);
  }
  try {
    git(top, ["rev-parse", "--verify", "--quiet", `${ref}^{commit}`]);
  } catch {
    throw new ChangedSinceError(`--changed-since ${ref}: not a commit in this repository (fetch it first, e.g. git fetch origin main)`);
  }
  const changed = new Set<string>();
  const deleted = new Set<string>();
  // -z: NUL-separated, paths as they are (no quoting); status, then one path or (renames, copies) two.
  const fields = git(top, ["diff", "--name-status", "-z", "-M", ref, "--"]).split("\0");
  for (let i = 0; i < fields.length - 1; ) {
    const status = fields[i++]!;
    if (status.startsWith("R") || status.startsWith("C")) {
      const from = fields[i++]!;
      const to = fields[i++]!;
      if (status.startsWith("R")) deleted.add(resolve(top, from));
      changed.add(resolve(top, to));
    } else if (status.startsWith("D")) deleted.add(resolve(top, fields[i++]!));
    else changed.add(resolve(top, fields[i++]!));
  }
  for (const path of git(top, ["ls-files", "--others", "--exclude-standard", "-z"]).split("\0")) if (path) changed.add(resolve(top, path));
  return { ref, changed, deleted };
}

/** The model libraries a circuit file names itself (absolute), read from its `libraries:` list; none when it cannot be read. */
function namedLibraries(file: CircuitFile): string[] {
  let text: string;
  try {
    text = readFileSync(file.abs, "utf8");
  } catch {
    return [];
  }
  if (!text.includes("libraries")) return [];
  try {
    const doc = parse(text) as { libraries?: unknown } | null;
    const list = doc && typeof doc === "object" ? doc.libraries : undefined;
    return Array.isArray(list) ? list.filter((l): l is string => typeof l === "string").map((l) => resolve(dirname(file.abs), l)) : [];
  } catch {
    return [];
  }
}

export interface ChangedSelection {
  readonly files: CircuitFile[];
  /** Why every file was taken (the policy changed), or undefined. */
  readonly everything?: string;
}

/** The files of `files` the changes touch (see the head of this file), in the same order. */
export function selectChanged(files: readonly CircuitFile[], changes: Changes, config: ResolvedConfig): ChangedSelection {
  const touched = (p: string) => changes.changed.has(p) || changes.deleted.has(p);
  const policy = [...(config.file ? [config.file] : []), ...config.plugins, ...(config.libraries ?? [])].find(touched);
  if (policy !== undefined) return { files: [...files], everything: policy };
  return { files: files.filter((f) => changes.changed.has(f.abs) || namedLibraries(f).some(touched)) };
}
