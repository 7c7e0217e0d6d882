// Config errors: a bad config file, rule option, --rule flag or plugin. The CLI prints them
// (file:line:column, what is wrong, what to do) and exits 2; they never show a stack trace.
import type { SourcePos } from "../circuit/types.js";

export interface ConfigProblem {
  /** The config file (or plugin) the problem is in; null when it came from the command line. */
  readonly file: string | null;
  readonly line?: number;
  readonly column?: number;
  readonly message: string;
  readonly hint?: string;
}

export class ConfigError extends Error {
  readonly problems: readonly ConfigProblem[];
  constructor(problems: ConfigProblem | readonly ConfigProblem[]) {
    const list = Array.isArray(problems) ? (problems as readonly ConfigProblem[]) : [problems as ConfigProblem];
    super(list.map(formatConfigProblem).join("\n"));
    this.name = "ConfigError";
    this.problems = list;
  }
}

export function formatConfigProblem(p: ConfigProblem): string {
  const where = p.file === null ? "command line" : p.line !== undefined ? `${p.file}:${p.line}:${p.column ?? 1}` : p.file;
  return `${where}: error: ${p.message}${p.hint ? ` — ${p.hint}` : ""}`;
}

export function problemAt(pos: SourcePos | undefined, file: string | null, message: string, hint?: string): ConfigProblem {
  return {
    file: pos?.file ?? file,
    ...(pos ? { line: pos.line, column: pos.column } : {}),
    message,
    ...(hint ? { hint } : {}),
  };
}
