// The tool version written into every results document (from package.json).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { PACKAGE_ROOT } from "../paths.js";

let cached: string | undefined;

export function toolVersion(): string {
  cached ??= String((JSON.parse(readFileSync(join(PACKAGE_ROOT, "package.json"), "utf8")) as { version?: string }).version ?? "0.0.0");
  return cached;
}
