// Locates files shipped with the package (schemas), from source under vitest or from dist/.
import { existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

function findPackageRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    if (existsSync(join(dir, "package.json")) && existsSync(join(dir, "schemas"))) return dir;
    const parent = dirname(dir);
    if (parent === dir) throw new Error("opgate: cannot find its own package folder (schemas/ is missing)");
    dir = parent;
  }
}

export const PACKAGE_ROOT = findPackageRoot();

export function schemaPath(name: string): string {
  return join(PACKAGE_ROOT, "schemas", `${name}.schema.json`);
}
