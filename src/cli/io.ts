// The streams and environment a command sees; tests pass their own to run the CLI in-process.

export interface CliIo {
  readonly cwd: string;
  readonly env: Readonly<Record<string, string | undefined>>;
  /** Standard output is a terminal. */
  readonly isTTY: boolean;
  /** Standard error is a terminal (progress and, when a report takes stdout, the console text go there). */
  readonly stderrIsTTY?: boolean;
  stdout(text: string): void;
  stderr(text: string): void;
}

/** The streams and environment of this process: what both executable entries hand to run(). */
export function processIo(): CliIo {
  return {
    cwd: process.cwd(),
    env: process.env,
    isTTY: Boolean(process.stdout.isTTY),
    stderrIsTTY: Boolean(process.stderr.isTTY),
    stdout: (text) => void process.stdout.write(text),
    stderr: (text) => void process.stderr.write(text),
  };
}

/** Thrown by a command to end with an exit code and a message, never a stack trace. */
export class CliExit extends Error {
  constructor(
    readonly code: number,
    message: string,
  ) {
    super(message);
  }
}

export const EXIT_CLEAN = 0;
export const EXIT_FINDINGS = 1;
export const EXIT_INPUT = 2;
