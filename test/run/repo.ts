// Temporary repositories for the run tests: the example circuits copied under boards/, plus
// whatever extra files a test wants; and an in-process CLI runner that collects the output.
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { run } from "../../src/cli/main.js";

export const EXAMPLES = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "examples");

export function exampleFiles(): string[] {
  return readdirSync(EXAMPLES)
    .filter((f) => f.endsWith(".yaml") && !f.startsWith("opgate.config."))
    .sort();
}

export function makeRepo(extra: Record<string, string> = {}): { dir: string; cleanup(): void } {
  const dir = mkdtempSync(join(tmpdir(), "opgate-run-"));
  mkdirSync(join(dir, "boards"), { recursive: true });
  for (const f of exampleFiles()) copyFileSync(join(EXAMPLES, f), join(dir, "boards", f));
  // The model library an example names (`libraries: [lib/…]`), beside the circuits as in examples/.
  mkdirSync(join(dir, "boards", "lib"), { recursive: true });
  for (const f of readdirSync(join(EXAMPLES, "lib"))) copyFileSync(join(EXAMPLES, "lib", f), join(dir, "boards", "lib", f));
  for (const [rel, text] of Object.entries(extra)) {
    mkdirSync(dirname(join(dir, rel)), { recursive: true });
    writeFileSync(join(dir, rel), text);
  }
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

export interface CliOutcome {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** `isTTY`: standard output is a terminal; `stderrIsTTY` (default: the same) for standard error. */
export async function cli(argv: string[], cwd: string, env: Record<string, string | undefined> = {}, isTTY = false, stderrIsTTY = isTTY): Promise<CliOutcome> {
  let stdout = "";
  let stderr = "";
  const code = await run(argv, {
    cwd,
    env,
    isTTY,
    stderrIsTTY,
    stdout: (t) => void (stdout += t),
    stderr: (t) => void (stderr += t),
  });
  return { code, stdout, stderr };
}
