// What a rule reports is checked field by field against the results document's contract
// (schemas/results.schema.json) before it becomes a finding: a team rule that passes a number as
// a hint, text as a measured value or a position with line -5 gets an `error` finding naming the
// field, instead of crashing a reporter or producing a document our own `merge` refuses.
import { describeValue } from "./rule.js";

/** Longest text a rule may report in one field (a finding is one line plus a hint). */
const MAX_TEXT = 2000;

type Fields = Readonly<Record<string, unknown>>;

function described(v: unknown): string {
  if (typeof v === "object" && v !== null && "$notPlain" in v) return String((v as { $notPlain: unknown }).$notPlain);
  return describeValue(v);
}

function text(name: string, v: unknown, required: boolean, problems: string[]): void {
  if (v === undefined && !required) return;
  if (typeof v !== "string") problems.push(`\`${name}\` must be text, got ${described(v)}`);
  else if (required && v.trim() === "") problems.push(`\`${name}\` must not be empty`);
  else if (v.length > MAX_TEXT) problems.push(`\`${name}\` is ${v.length} characters long (at most ${MAX_TEXT})`);
}

function number(name: string, v: unknown, problems: string[]): void {
  if (v !== undefined && typeof v !== "number") problems.push(`\`${name}\` must be a number, got ${described(v)}`);
}

function measures(f: Fields, problems: string[]): void {
  number("measured", f.measured, problems);
  number("limit", f.limit, problems);
  text("unit", f.unit, false, problems);
  if (f.bound !== undefined && f.bound !== "max" && f.bound !== "min") problems.push(`\`bound\` must be "max" or "min", got ${described(f.bound)}`);
}

function position(v: unknown, problems: string[]): void {
  if (v === undefined) return;
  const p = v as Fields;
  const line = typeof v === "object" && v !== null ? p.line : undefined;
  const column = typeof v === "object" && v !== null ? p.column : undefined;
  const file = typeof v === "object" && v !== null ? p.file : undefined;
  if (typeof v !== "object" || v === null || "$notPlain" in p) problems.push(`\`pos\` must be { file, line, column }, got ${described(v)}`);
  else if (typeof file !== "string" || file === "" || !Number.isInteger(line) || (line as number) < 1 || !Number.isInteger(column) || (column as number) < 1)
    problems.push(`\`pos\` must have a file name and a line and column from 1, got ${described(v)}`);
}

function isFields(v: unknown): v is Fields {
  return typeof v === "object" && v !== null && !("$notPlain" in v);
}

/** Problems with what a rule passed to `report.fail(…)`; empty when it can become a finding. */
export function failReportProblems(f: unknown): string[] {
  if (!isFields(f)) return [`report.fail needs an object { subject, message, … }, got ${described(f)}`];
  const problems: string[] = [];
  text("subject", f.subject, true, problems);
  text("message", f.message, true, problems);
  measures(f, problems);
  text("hint", f.hint, false, problems);
  position(f.pos, problems);
  return problems;
}

/** Problems with what a rule passed to `report.pass(subject, …)`. */
export function passReportProblems(subject: unknown, p: unknown): string[] {
  const problems: string[] = [];
  text("subject", subject, true, problems);
  if (p === undefined) return problems;
  if (!isFields(p)) return [...problems, `report.pass takes an optional object { measured, limit, unit, bound }, got ${described(p)}`];
  measures(p, problems);
  return problems;
}
