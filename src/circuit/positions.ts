// Source positions: maps a path in the parsed tree (keys and indices) to file:line:column.
// Generic over any YAML/JSON document, so the config loader reuses it.
import { isMap, isPair, isScalar, isSeq, type Document, type LineCounter, type Node } from "yaml";
import type { SourcePos } from "./types.js";

export type PathSegment = string | number;

/** A parsed document with what is needed to point back into its text. */
export interface PositionedDocument {
  readonly file: string;
  readonly doc: Document.Parsed;
  readonly lineCounter: LineCounter;
}

/** Position of a character offset in the text. */
export function positionAtOffset(lineCounter: LineCounter, file: string, offset: number): SourcePos {
  const { line, col } = lineCounter.linePos(offset);
  return { file, line, column: col };
}

function rangePos(lineCounter: LineCounter, file: string, node: Node): SourcePos | undefined {
  const range = node.range;
  if (!range) return undefined;
  const start = lineCounter.linePos(range[0]);
  const end = lineCounter.linePos(range[1]);
  return { file, line: start.line, column: start.col, endLine: end.line, endColumn: end.col };
}

interface Found {
  readonly key?: Node;
  readonly value?: Node;
}

/** Walks the document tree along `path`; returns the deepest pair key and value reached and how far it got. */
function walk(doc: Document.Parsed, path: readonly PathSegment[]): { found: Found; depth: number } {
  let current: unknown = doc.contents;
  let found: Found = { value: (doc.contents as Node | null) ?? undefined };
  let depth = 0;
  for (const seg of path) {
    if (isMap(current)) {
      const pair = current.items.find((p) => isPair(p) && isScalar(p.key) && String(p.key.value) === String(seg));
      if (!pair) break;
      found = { key: pair.key as Node, value: (pair.value as Node | null) ?? (pair.key as Node) };
      current = pair.value;
    } else if (isSeq(current) && typeof seg === "number") {
      const item = current.items[seg] as Node | undefined;
      if (!item) break;
      found = { value: item };
      current = item;
    } else break;
    depth++;
  }
  return { found, depth };
}

/**
 * Position of the value at `path` (or of its key, with `{ key: true }`). When the path does not
 * exist in full (a missing key), the deepest existing ancestor is used, which is where the fix goes.
 */
export function positionOf(
  positioned: PositionedDocument,
  path: readonly PathSegment[],
  options: { key?: boolean } = {},
): SourcePos {
  const { doc, lineCounter, file } = positioned;
  const { found } = walk(doc, path);
  const node = (options.key ? found.key : undefined) ?? found.value ?? found.key;
  const pos = node ? rangePos(lineCounter, file, node) : undefined;
  return pos ?? { file, line: 1, column: 1 };
}

/** Decodes a JSON Pointer (ajv's instancePath) into path segments; `~1` is `/`, `~0` is `~`. */
export function pointerToPath(pointer: string): string[] {
  if (pointer === "" || pointer === "/") return pointer === "" ? [] : [""];
  return pointer
    .slice(1)
    .split("/")
    .map((s) => s.replace(/~1/g, "/").replace(/~0/g, "~"));
}

/** Turns numeric-looking segments into indices where the value at that point is an array. */
export function typedPath(value: unknown, segments: readonly string[]): PathSegment[] {
  const out: PathSegment[] = [];
  let cur: unknown = value;
  for (const s of segments) {
    if (Array.isArray(cur) && /^\d+$/.test(s)) {
      out.push(Number(s));
      cur = cur[Number(s)];
    } else {
      out.push(s);
      cur = cur !== null && typeof cur === "object" ? (cur as Record<string, unknown>)[s] : undefined;
    }
  }
  return out;
}
