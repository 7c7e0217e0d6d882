// JUnit XML for CI test-report viewers: a suite per circuit file, a case per rule × subject.
// Severity mapping (faithful to the gate): a finding at or above failOn is a <failure> (type =
// its severity); below failOn it is a passing case whose system-out carries the warning or note;
// input and internal findings, and the solve finding of a circuit with no operating point (the
// circuit could not be checked), are <error>s. Checks that
// passed are passing cases. A report never has zero cases.
import { createRequire } from "node:module";
import type { Builder } from "junit-report-builder";
import { ERROR_RULES, reaches } from "./build.js";
import type { CircuitResult, Finding, PassedCheck, ResultsDocument, Severity } from "./document.js";
import { findingLocation, measuredVsLimit } from "./format.js";
import { inertLines, inertText } from "./untrusted.js";

// Loaded on first use: the library and its XML writer cost ~70 ms to load, which every
// `opgate check` without --junit (and every worker) would otherwise pay. The package is
// CommonJS: what require returns is the builder itself.
let builder: Builder | undefined;
function junitBuilder(): Builder {
  builder ??= createRequire(import.meta.url)("junit-report-builder") as Builder;
  return builder;
}

/**
 * CDATA cannot contain its own terminator; XML 1.0 allows no control character but TAB, LF and CR
 * (and a viewer would pass ESC to a terminal): those are shown as escapes.
 */
function cdataSafe(text: string): string {
  return inertLines(text).replace(/]]>/g, "]] >");
}

function findingText(c: CircuitResult, f: Finding): string {
  const numbers = measuredVsLimit(f);
  const scenario = c.scenarios.find((s) => s.id === f.scenario);
  const where = scenario && scenario.label && scenario.label !== f.scenario ? `${f.scenario} (${scenario.label})` : f.scenario;
  return inertText(`${findingLocation(f)}: ${f.severity}: ${f.message}${numbers ? ` — ${numbers}` : ""}; worst scenario ${where}${f.corner && !where.includes(f.corner.label) ? `: ${f.corner.label}` : ""}`);
}

function passedText(p: PassedCheck): string {
  const numbers = measuredVsLimit(p);
  return inertText(`${numbers || "passed"}; worst scenario ${p.scenario}`);
}

/** Case names must be unique within a suite (some viewers drop duplicates). */
function uniqueNamer(): (name: string) => string {
  const used = new Map<string, number>();
  return (name) => {
    const n = (used.get(name) ?? 0) + 1;
    used.set(name, n);
    return n === 1 ? name : `${name} (${n})`;
  };
}

/** One suite's XML (indented for its place under the root) and its counts, for the root's totals. */
export interface JunitSuite {
  readonly xml: string;
  readonly tests: number;
  readonly failures: number;
  readonly errors: number;
  readonly skipped: number;
}

/** What the builder writes around a lone suite; its root line carries that suite's counts. */
const ALONE = /^<\?xml version="1\.0" encoding="UTF-8"\?>\n<testsuites name="opgate" tests="(\d+)" failures="(\d+)" errors="(\d+)" skipped="(\d+)">\n([^]*)\n<\/testsuites>$/;

/** The library writes the suite (its escaping, its layout); we take it out of the root it wrote around it. */
function suiteOf(report: Builder): JunitSuite {
  const text = report.build();
  const m = ALONE.exec(text);
  if (!m) throw new Error("junit-report-builder wrote a layout this reporter does not know: check its version");
  return { tests: Number(m[1]), failures: Number(m[2]), errors: Number(m[3]), skipped: Number(m[4]), xml: m[5]! };
}

/**
 * The suite of one (normalised) circuit result. A run writes suites as results arrive and the
 * root with the totals at the end (junitDocument), so no report holds every circuit at once.
 */
export function junitSuite(c: CircuitResult, failOn: Severity): JunitSuite {
  const report = junitBuilder().newBuilder().name("opgate");
  const suite = report.testSuite().name(inertText(c.file));
  const classname = inertText(c.name ?? c.file);
  const file = inertText(c.file);
  const unique = uniqueNamer();
  let cases = 0;
  for (const f of c.findings) {
    const tc = suite.testCase().className(classname).name(unique(inertText(`${f.rule}: ${f.subject}`))).file(file);
    const text = findingText(c, f);
    // "Could not run": the file did not load, the check crashed, or there is no operating point.
    const couldNotRun = ERROR_RULES.has(f.rule) || (f.rule === "solve" && c.status === "error");
    if (couldNotRun) tc.error(text, inertText(f.rule), cdataSafe(f.hint ?? text));
    else if (reaches(f.severity, failOn)) {
      tc.failure(text, f.severity);
      if (f.hint) tc.stacktrace(cdataSafe(`How to fix: ${f.hint}`));
    } else tc.standardOutput(cdataSafe(`${text}${f.hint ? `\nHow to fix: ${f.hint}` : ""}`));
    cases++;
  }
  for (const p of c.passed) {
    suite.testCase().className(classname).name(unique(inertText(`${p.rule}: ${p.subject}`))).file(file).standardOutput(cdataSafe(passedText(p)));
    cases++;
  }
  if (cases === 0) {
    // A circuit in error without findings, or one with no applicable checks: still one case.
    const tc = suite.testCase().className(classname).name(unique("opgate: circuit")).file(file);
    if (c.status === "error") tc.error(`${file}: the circuit could not be checked`, "internal");
    else tc.standardOutput("no rule applied to this circuit");
  }
  return suiteOf(report);
}

/** The suite of a run with no circuit files (a report with no cases breaks some viewers). */
export function junitEmptySuite(): JunitSuite {
  const report = junitBuilder().newBuilder().name("opgate");
  report.testSuite().name("opgate").testCase().className("opgate").name("opgate: no circuit files").standardOutput("no circuit files were checked");
  return suiteOf(report);
}

/** Totals of the suites written so far. */
export interface JunitTotals {
  tests: number;
  failures: number;
  errors: number;
  skipped: number;
}

export function addSuite(totals: JunitTotals, suite: Omit<JunitSuite, "xml">): void {
  totals.tests += suite.tests;
  totals.failures += suite.failures;
  totals.errors += suite.errors;
  totals.skipped += suite.skipped;
}

/** The text before the suites: the XML declaration and the root element with the run's totals. */
export function junitStart(totals: JunitTotals): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n<testsuites name="opgate" tests="${totals.tests}" failures="${totals.failures}" errors="${totals.errors}" skipped="${totals.skipped}">\n`;
}

/** Between two suites. */
export const JUNIT_SEPARATOR = "\n";
/** After the last suite. */
export const JUNIT_END = "\n</testsuites>\n";

export function renderJunit(doc: ResultsDocument): string {
  const suites = doc.circuits.length > 0 ? doc.circuits.map((c) => junitSuite(c, doc.summary.failOn)) : [junitEmptySuite()];
  const totals: JunitTotals = { tests: 0, failures: 0, errors: 0, skipped: 0 };
  for (const s of suites) addSuite(totals, s);
  return `${junitStart(totals)}${suites.map((s) => s.xml).join(JUNIT_SEPARATOR)}${JUNIT_END}`;
}
