// Checks that a value read from disk (a baseline, a shard's results) is a results document this
// version understands, against schemas/results.schema.json.
import { readFileSync } from "node:fs";
import { Ajv2020, type ValidateFunction } from "ajv/dist/2020.js";
import addFormats from "ajv-formats";
import { schemaPath } from "../paths.js";
import type { ResultsDocument } from "./document.js";

let compiled: ValidateFunction | undefined;

function validator(): ValidateFunction {
  if (!compiled) {
    const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
    (addFormats as unknown as (a: Ajv2020) => void)(ajv);
    compiled = ajv.compile(JSON.parse(readFileSync(schemaPath("results"), "utf8")) as object);
  }
  return compiled;
}

/** Problems as `path: message` lines (at most a handful); empty when the value is a valid document. */
export function documentProblems(value: unknown): string[] {
  const validate = validator();
  if (validate(value)) return [];
  return (validate.errors ?? []).slice(0, 5).map((e) => `${e.instancePath || "/"}: ${e.message ?? "invalid"}`);
}

export class DocumentError extends Error {}

/** Parses and validates a results document's text; throws DocumentError naming the file. */
export function readDocument(text: string, file: string): ResultsDocument {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    throw new DocumentError(`${file}: not JSON (${err instanceof Error ? err.message : String(err)})`);
  }
  const problems = documentProblems(value);
  if (problems.length > 0) {
    throw new DocumentError(`${file}: not an opgate results document (opgate-results/1): ${problems.join("; ")}`);
  }
  return value as ResultsDocument;
}
