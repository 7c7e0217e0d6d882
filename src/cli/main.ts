// opgate command line: parses arguments with yargs and dispatches to one file per command.
import yargs from "yargs";
import { CliExit, EXIT_INPUT, type CliIo } from "./io.js";
import { checkCommand } from "./check.js";
import { schemaCommand } from "./schema.js";
import { initCommand } from "./init.js";
import { rulesCommand } from "./rules.js";
import { inspectCommand } from "./inspect.js";
import { mergeCommand } from "./merge.js";
import { toolVersion } from "../run/version.js";

export type CommandHandler = (args: Record<string, unknown>, io: CliIo) => Promise<number>;

export interface CommandSpec {
  readonly command: string;
  readonly describe: string;
  builder(y: ReturnType<typeof yargs>): ReturnType<typeof yargs>;
  readonly handler: CommandHandler;
}

const COMMANDS: readonly CommandSpec[] = [checkCommand, initCommand, inspectCommand, mergeCommand, rulesCommand, schemaCommand];

/**
 * A usage error: thrown from yargs' failure handler so that parsing stops there and no command
 * runs. (yargs 18 with exitProcess(false) calls the failure handler and then runs the command's
 * handler anyway when the handler returns; throwing is what stops it.) Carries the usage text of
 * the command that was being parsed.
 */
class UsageError extends Error {
  constructor(
    message: string,
    readonly usage: string,
  ) {
    super(message);
  }
}

/** Runs the CLI with `argv` (without node and script) and returns the exit code. */
export async function run(argv: readonly string[], io: CliIo): Promise<number> {
  let exitCode: number | undefined;
  // recommendCommands() reports "Did you mean check?" through the failure handler first, then the
  // unknown-command error: keep the suggestion for the message.
  let suggestion: string | undefined;
  const parser = yargs([...argv])
    .scriptName("opgate")
    .usage("$0 <command> [options]\n\nDesign-review gate for analog circuit files.")
    .strict()
    .demandCommand(1, "Name a command: opgate check, opgate inspect, opgate rules …")
    .recommendCommands()
    .help()
    .alias("h", "help")
    // The version of this package, as results documents record it (a CI log should show which
    // gate ran).
    .version(toolVersion())
    .wrap(Math.min(100, process.stdout.columns ?? 100))
    .exitProcess(false)
    .fail((msg, err, usage) => {
      if (err instanceof CliExit) throw err;
      if (err) throw err; // thrown by a command handler: not a usage error
      if (/^Did you mean /.test(msg ?? "")) {
        suggestion = msg;
        return;
      }
      throw new UsageError(msg ?? "bad arguments", (usage as unknown as { help(): string }).help());
    })
    .epilogue("Exit codes: 0 clean, 1 findings at or above failOn, 2 usage, config or input error.");
  // yargs lays out the whole help text after every command starts, in case a failure needs it
  // later (~0.1 s of a one-file check); the failures here print it themselves when they need it.
  noHelpCache(parser);
  for (const spec of COMMANDS) {
    parser.command(spec.command, spec.describe, spec.builder as never, async (args) => {
      exitCode = await spec.handler(args as Record<string, unknown>, io);
    });
  }
  let helpText = "";
  try {
    await parser.parseAsync([...argv], {}, (_err, _argv, output) => {
      helpText = output;
    });
  } catch (err) {
    if (err instanceof UsageError) {
      // Usage, then the problem (and the nearest command for a typo): nothing ran, nothing written.
      const command = argv.find((a) => !a.startsWith("-"));
      const problem = suggestion && command ? `unknown command "${command}". ${suggestion}` : err.message;
      io.stderr(`${err.usage}\n\nopgate: ${problem}\n`);
      return EXIT_INPUT;
    }
    if (err instanceof CliExit) {
      io.stderr(`opgate: ${err.message}\n`);
      return err.code;
    }
    const message = err instanceof Error ? err.message : String(err);
    io.stderr(`opgate: internal error: ${message}\nPlease report this with the command and file that caused it.\n`);
    return EXIT_INPUT;
  }
  if (exitCode === undefined) {
    // --help or --version printed something and no command ran.
    if (helpText) io.stdout(`${helpText}\n`);
    return 0;
  }
  return exitCode;
}

/** Turns off yargs's eager help layout (an internal of yargs 18: left alone if it is not there). */
function noHelpCache(parser: ReturnType<typeof yargs>): void {
  const internal = (parser as unknown as { getInternalMethods?: () => { getUsageInstance?: () => { cacheHelpMessage?: () => void } } }).getInternalMethods?.();
  const usage = internal?.getUsageInstance?.();
  if (usage && typeof usage.cacheHelpMessage === "function") usage.cacheHelpMessage = () => {};
}
