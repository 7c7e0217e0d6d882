// Golden-file comparison: byte-for-byte against test/report/golden/<name>; rewritten only when
// UPDATE_GOLDEN=1 is set, so a changed report is always a deliberate, reviewed change.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { expect } from "vitest";

const GOLDEN_DIR = join(dirname(fileURLToPath(import.meta.url)), "golden");

export function expectGolden(name: string, actual: string): void {
  const path = join(GOLDEN_DIR, name);
  if (process.env.UPDATE_GOLDEN === "1") {
    mkdirSync(dirname(path), { recursive: true });
    writeFileSync(path, actual);
    return;
  }
  if (!existsSync(path)) throw new Error(`golden file ${name} is missing: run with UPDATE_GOLDEN=1 to create it, then review it`);
  expect(actual, `${name} differs from its golden file; if the change is intended, run UPDATE_GOLDEN=1 npx vitest run test/report and review the diff`).toBe(
    readFileSync(path, "utf8"),
  );
}
