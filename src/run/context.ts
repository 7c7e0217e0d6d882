// Builds a CheckContext from plain options, in the main thread and in each worker alike.
// Uses the pipeline's createCheckContext; until that lands, a config-only context (no rules) so
// the run machinery can be exercised. Config problems surface as ConfigError (exit 2).
import * as pipeline from "../pipeline/check-file.js";
import type { CheckContext, CheckContextOptions } from "../pipeline/check-file.js";
import { loadConfig } from "../review/config.js";

type ContextFactory = (options: CheckContextOptions) => Promise<CheckContext>;

export async function makeCheckContext(options: CheckContextOptions): Promise<CheckContext> {
  const factory = (pipeline as unknown as Record<string, unknown>).createCheckContext as ContextFactory | undefined;
  if (typeof factory === "function") return factory(options);
  const loaded = await loadConfig({ cwd: options.cwd, ...(options.configPath ? { configPath: options.configPath } : {}) });
  const config = options.failOn ? { ...loaded, failOn: options.failOn } : loaded;
  return { config, rules: [], configured: [], root: config.root } as unknown as CheckContext;
}
