// Imports one plugin module: JavaScript as it is, TypeScript through tsx (no build step).
import { extname } from "node:path";
import { pathToFileURL } from "node:url";

const TYPESCRIPT = [".ts", ".mts"];

export async function importModule(path: string): Promise<Record<string, unknown>> {
  const url = pathToFileURL(path).href;
  if (TYPESCRIPT.includes(extname(path).toLowerCase())) {
    // tsx costs ~50 ms to load: only a run with a TypeScript plugin pays for it.
    const { tsImport } = await import("tsx/esm/api");
    return (await tsImport(url, import.meta.url)) as Record<string, unknown>;
  }
  return (await import(url)) as Record<string, unknown>;
}
