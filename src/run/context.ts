// Builds a CheckContext from plain options, in the main thread and in each worker alike
// (the pipeline's createCheckContext; kept behind this name so the run layer has one entry).
// Config problems surface as ConfigError (exit 2).
import type { CheckContext, CheckContextOptions } from "../pipeline/check-file.js";
import { createCheckContext } from "../pipeline/context.js";

export function makeCheckContext(options: CheckContextOptions): Promise<CheckContext> {
  return createCheckContext(options);
}
