// Imports one plugin module: JavaScript as it is; TypeScript compiled once and kept in the plugin
// cache (plugin-compile.ts), then imported like JavaScript.
import { extname } from "node:path";
import { pathToFileURL } from "node:url";
import { compiledRule, pluginCacheDir } from "./plugin-compile.js";

const TYPESCRIPT = [".ts", ".mts"];

/** One-line remarks of this thread's imports (an untrusted cache entry), handed to the main side. */
export const importNotes: string[] = [];

export async function importModule(path: string): Promise<Record<string, unknown>> {
  if (TYPESCRIPT.includes(extname(path).toLowerCase())) {
    const compiled = await compiledRule(path, pluginCacheDir(process.env));
    if (compiled.note) importNotes.push(compiled.note);
    return (await import(compiled.url)) as Record<string, unknown>;
  }
  return (await import(pathToFileURL(path).href)) as Record<string, unknown>;
}
