// JSON that gives back exactly the numbers it was given: NaN, ±Infinity and −0 do not survive
// plain JSON (results can hold them: an unbounded margin, ro without Early effect), so they are
// written as tagged strings and restored on reading. Used for the outlines a run keeps and for
// the result cache's entries, whose reports must be byte-identical to a run without them.

const TAG = "\u0000opgate-number:";
/** The tag as it appears in JSON text (JSON.stringify escapes U+0000). */
const TAG_IN_TEXT = "\\u0000opgate-number:";

function encode(_key: string, value: unknown): unknown {
  if (typeof value === "number" && (!Number.isFinite(value) || Object.is(value, -0))) return `${TAG}${Object.is(value, -0) ? "-0" : String(value)}`;
  return value;
}

export function stringifyTagged(value: unknown): string {
  return JSON.stringify(value, encode);
}

/** Parses text written by stringifyTagged; the tagged numbers are put back by a walk only when the text has any (a reviver on every value costs several times the parse). */
export function parseTagged(text: string): unknown {
  const value: unknown = JSON.parse(text);
  return text.includes(TAG_IN_TEXT) ? restore(value) : value;
}

function restore(value: unknown): unknown {
  if (typeof value === "string") return value.startsWith(TAG) ? Number(value.slice(TAG.length)) : value;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) value[i] = restore(value[i]);
  } else if (value !== null && typeof value === "object") {
    const obj = value as Record<string, unknown>;
    for (const k of Object.keys(obj)) obj[k] = restore(obj[k]);
  }
  return value;
}
