// Public entry of the circuit stage (placeholder until the loader lands).
import type { LoadResult } from "./types.js";
export type * from "./types.js";

export async function loadCircuitFile(file: string, _opts: { displayPath?: string } = {}): Promise<LoadResult> {
  return { ok: false, errors: [{ file, message: "the circuit loader is not built yet" }] };
}
