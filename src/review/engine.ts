// The rule engine: runs every enabled rule over every scenario of one circuit, keeps per rule
// and subject the worst scenario, and isolates rules from each other (a throw, a runaway rule or
// a report the results cannot hold becomes an `error` finding; the other rules still run). Team
// rules from plugins run contained in a thread of their own (contain.ts).
import vm from "node:vm";
import type { Circuit, SourcePos } from "../circuit/types.js";
import type { ScenarioAnalysis } from "../pipeline/types.js";
import type { Finding, PassedCheck, Severity } from "../report/document.js";
import { didYouMean } from "./did-you-mean.js";
import { ConfigError, type ConfigProblem } from "./errors.js";
import { optionProblems, resolveOptions, type OptionsOrigin } from "./options.js";
import { currentRuleBudgetMs, isContained, runContained } from "./contain.js";
import { failReportProblems, passReportProblems } from "./report-check.js";
import type { Bound, FailReport, PassReport, Reporter, Rule, RuleSeverity } from "./rule.js";

/**
 * How long one rule may take on one scenario. A rule does arithmetic over a solved circuit
 * (microseconds to milliseconds); two seconds is far beyond any honest rule on a loaded CI
 * runner, yet short enough that a rule waiting forever does not stall the job.
 */
export const RULE_TIME_LIMIT_MS = 2000;

/** The rule id of findings about a circuit file's own `review:` block (input errors). */
export const OVERRIDE_RULE = "input";

/** A rule with the severity and options the repository config gave it. */
export interface ConfiguredRule {
  readonly rule: Rule;
  readonly severity: RuleSeverity;
  /** Options as configured (validated and defaulted by the engine before anything runs). */
  readonly options?: Readonly<Record<string, unknown>>;
  readonly origin?: OptionsOrigin;
  /** "builtin" or the plugin's path. */
  readonly source: string;
}

export interface RunRulesInput {
  readonly circuit: Circuit;
  /** One per scenario, nominal first. */
  readonly analyses: readonly ScenarioAnalysis[];
  readonly rules: readonly ConfiguredRule[];
  /** Per rule and scenario; defaults to RULE_TIME_LIMIT_MS. */
  readonly timeLimitMs?: number;
  /** Per rule and circuit, all scenarios together; defaults to RULE_BUDGET_MS. */
  readonly budgetMs?: number;
}

export interface RuleResults {
  readonly findings: Finding[];
  readonly passed: PassedCheck[];
}

/**
 * Rule lists already validated, by identity: a run passes the same (frozen-options) list for every
 * circuit, and validating it again per file was ~2 % of a repository run's CPU.
 */
const validatedLists = new WeakMap<readonly ConfiguredRule[], ConfiguredRule[]>();

/** Throws one ConfigError listing every bad option of every rule (nothing has run yet). */
export function validateRuleOptions(rules: readonly ConfiguredRule[]): ConfiguredRule[] {
  const known = validatedLists.get(rules);
  if (known) return known;
  const problems: ConfigProblem[] = [];
  for (const c of rules) problems.push(...optionProblems(c.rule, c.options ?? {}, { file: null, ...c.origin, ruleSource: c.source }));
  if (problems.length > 0) throw new ConfigError(problems);
  const validated = rules.map((c) => ({ ...c, options: resolveOptions(c.rule, c.options ?? {}, c.origin ?? { file: null }) }));
  // A list someone may still change is not remembered: only frozen ones are safe to reuse.
  if (Object.isFrozen(rules) && rules.every((c) => Object.isFrozen(c))) validatedLists.set(rules, validated);
  return validated;
}

/** Signed relative margin: negative when violated; relative to |limit| (absolute when the limit is 0). */
export function marginOf(measured: number | undefined, limit: number | undefined, bound: Bound | undefined): number | null {
  if (measured === undefined || limit === undefined || bound === undefined) return null;
  if (Number.isNaN(measured) || Number.isNaN(limit)) return null;
  if (!Number.isFinite(limit)) return measured === limit ? 0 : (bound === "max") === (limit > 0) ? Infinity : -Infinity;
  const scale = limit === 0 ? 1 : Math.abs(limit);
  return (bound === "max" ? limit - measured : measured - limit) / scale;
}

export function subjectPos(circuit: Circuit, subject: string): SourcePos {
  return (
    circuit.components.find((c) => c.id === subject)?.pos ??
    circuit.specs.gains.find((g) => g.name === subject)?.pos ??
    circuit.models.get(subject)?.pos ??
    circuit.pos
  );
}

interface Outcome {
  readonly kind: "fail" | "pass";
  readonly subject: string;
  readonly message: string;
  readonly measured: number | null;
  readonly limit: number | null;
  readonly unit: string | null;
  readonly margin: number | null;
  readonly scenario: string;
  readonly order: number;
  readonly hint?: string;
  readonly pos?: SourcePos;
  readonly bound?: Bound;
  /** The rule itself broke (threw, timed out): always severity error. */
  readonly broken?: boolean;
}

/** Nominal sorts first, so a tie goes to the scenario a reader checks first. */
function scenarioRank(id: string): string {
  return id === "nominal" ? "" : id;
}

/**
 * A failure beats a pass, then the lower margin wins, then nominal and the lower scenario id
 * (so the answer does not depend on the order scenarios come in), then the earlier report.
 */
function worseThan(a: Outcome, b: Outcome): boolean {
  if (a.kind !== b.kind) return a.kind === "fail";
  const ma = a.margin ?? (a.kind === "fail" ? -Infinity : Infinity);
  const mb = b.margin ?? (b.kind === "fail" ? -Infinity : Infinity);
  if (ma !== mb) return ma < mb;
  if (a.scenario !== b.scenario) return scenarioRank(a.scenario) < scenarioRank(b.scenario);
  return a.order < b.order;
}

/** worseThan(a, b) for a pass a given by its fields (see worseThan). */
function passWorseThan(margin: number | null, scenario: string, order: number, b: Outcome): boolean {
  if (b.kind !== "pass") return false;
  const ma = margin ?? Infinity;
  const mb = b.margin ?? Infinity;
  if (ma !== mb) return ma < mb;
  if (scenario !== b.scenario) return scenarioRank(scenario) < scenarioRank(b.scenario);
  return order < b.order;
}

function num(v: number | undefined): number | null {
  return v === undefined || Number.isNaN(v) ? null : v;
}

class TimeoutError extends Error {}

// A synchronous endless loop never yields to a timer, so Promise.race cannot stop it. Team
// rules therefore start inside a vm script with a timeout: its watchdog interrupts whatever
// JavaScript runs, including the rule's own function. The watchdog costs a few hundred
// microseconds per call, so built-in rules (ours, reviewed and tested) skip it.
const GUARDED_CALL = new vm.Script("globalThis.__opgateGuardedRuleCall()");
const GUARD_SLOT = "__opgateGuardedRuleCall";

function startGuarded(work: () => void | Promise<void>, ms: number): void | Promise<void> {
  const slot = globalThis as unknown as Record<string, unknown>;
  slot[GUARD_SLOT] = work;
  try {
    return GUARDED_CALL.runInThisContext({ timeout: ms }) as void | Promise<void>;
  } catch (err) {
    if ((err as { code?: string }).code === "ERR_SCRIPT_EXECUTION_TIMEOUT") throw new TimeoutError(`it ran longer than ${ms / 1000} s without returning`);
    throw err;
  } finally {
    delete slot[GUARD_SLOT];
  }
}

async function withTimeLimit(work: () => void | Promise<void>, ms: number, guardSync: boolean): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new TimeoutError(`it ran longer than ${ms / 1000} s`)), ms);
  });
  try {
    await Promise.race([Promise.resolve().then(() => (guardSync ? startGuarded(work, ms) : work())), limit]);
  } finally {
    clearTimeout(timer);
  }
}

function reasonOf(err: unknown): string {
  if (err instanceof TimeoutError) return err.message;
  if (err instanceof Error) return `it threw ${err.name}: ${err.message}`;
  return `it threw ${String(err)}`;
}

/** Applies the circuit file's `review:` overrides; bad ones become input-error findings. */
function applyOverrides(
  circuit: Circuit,
  rules: readonly ConfiguredRule[],
): { rules: ConfiguredRule[]; errors: Finding[] } {
  const errors: Finding[] = [];
  const out = [...rules];
  const at = (pos: SourcePos, subject: string, message: string, hint?: string): Finding => ({
    rule: OVERRIDE_RULE,
    severity: "error",
    subject,
    message,
    measured: null,
    limit: null,
    unit: null,
    margin: null,
    scenario: "nominal",
    file: pos.file,
    line: pos.line,
    column: pos.column,
    ...(hint ? { hint } : {}),
  });
  for (const o of circuit.overrides) {
    const index = out.findIndex((c) => c.rule.id === o.rule);
    const configured = out[index];
    if (!configured) {
      errors.push(at(o.pos, o.rule, `the review block names rule \`${o.rule}\`, which is not loaded`, didYouMean(o.rule, rules.map((c) => c.rule.id)) ?? "run `opgate rules` for the list"));
      continue;
    }
    const allowed = configured.rule.circuitOptions;
    const refused = Object.keys(o.options).filter((k) => !allowed.includes(k));
    if (refused.length > 0) {
      const list = refused.map((k) => `\`${k}\``).join(", ");
      errors.push(
        at(
          o.pos,
          o.rule,
          `rule \`${o.rule}\` does not allow a circuit file to override ${list}`,
          allowed.length ? `a circuit may override only: ${allowed.join(", ")}; change the rest in the repository config` : `\`${o.rule}\` allows no per-circuit overrides; change it in the repository config`,
        ),
      );
      continue;
    }
    const merged = { ...(configured.options ?? {}), ...o.options };
    const problems = optionProblems(configured.rule, merged, { file: o.pos.file, pos: o.pos });
    if (problems.length > 0) {
      for (const p of problems) errors.push(at(o.pos, o.rule, p.message, p.hint));
      continue;
    }
    out[index] = { ...configured, options: resolveOptions(configured.rule, merged, { file: o.pos.file, pos: o.pos }) };
  }
  return { rules: out, errors };
}

/** A numeric reading one rule gave on one scenario: the raw material of sensitivities and Monte Carlo. */
export interface Reading {
  readonly rule: string;
  readonly subject: string;
  readonly unit: string | null;
  readonly measured: number;
  readonly limit: number | null;
  readonly bound: Bound | null;
  /**
   * The tightest limits any report of this quantity gave in the scenario, per side (a rule may
   * report its minimum and its maximum separately): the largest `min` bound and the smallest
   * `max` bound; null where no report gave one.
   */
  readonly lower: number | null;
  readonly upper: number | null;
}

/** What one scenario gave: every numeric reading by quantity key, and how bad it was. */
export interface ScenarioReadings {
  /** By quantityKey(rule, subject, unit); the first report of a key in a scenario wins. */
  readonly values: Map<string, Reading>;
  /** Highest severity of a failing report in this scenario (-1 when nothing failed). */
  readonly failRank: number;
  /** Lowest margin of any bounded report in this scenario (Infinity when none). */
  readonly lowestMargin: number;
}

const RANK: Readonly<Record<Severity, number>> = { note: 0, warning: 1, error: 2 };

/** The key of a judged quantity: one rule, one subject, one unit (a rule may bound both ends). */
export function quantityKey(rule: string, subject: string, unit: string | null): string {
  return `${rule}\u0000${subject}\u0000${unit ?? ""}`;
}

interface RuleState {
  readonly configured: ConfiguredRule;
  readonly severity: Severity;
  readonly worst: Map<string, Outcome>;
  order: number;
  /** One time budget per rule and circuit, over all its scenarios (set on first use). */
  readonly budgetMs: number;
  /** Time this rule itself has taken on this circuit so far, ms (the analyses between its calls do not count). */
  spentMs: number;
  /** Scenarios this rule has been run on. */
  scenarios: number;
  /** The budget ran out: the rule is not run on further scenarios (one error finding says so). */
  exhausted: boolean;
  /**
   * A built-in rule in this thread: called directly (see runDirect). Ours, reviewed and linear in
   * the circuit's size, it has no per-circuit budget, and a synchronous call cannot be cut short
   * by a timer anyway; only an asynchronous one is held to the per-call limit.
   */
  readonly direct: boolean;
  /** Quantity keys by subject, so that a streamed circuit does not build the same strings per scenario. */
  readonly keys: Map<string, { readonly unit: string | null; readonly key: string }>;
}

/** One scenario's readings as its rules report them (returned as its ScenarioReadings). */
class Tally implements ScenarioReadings {
  readonly values = new Map<string, Reading>();
  failRank = -1;
  lowestMargin = Infinity;
}

function keyOf(state: RuleState, subject: string, unit: string | null): string {
  const known = state.keys.get(subject);
  if (known !== undefined && known.unit === unit) return known.key;
  const key = quantityKey(state.configured.rule.id, subject, unit);
  state.keys.set(subject, { unit, key });
  return key;
}

/**
 * The engine over a stream of scenarios: each analysis is judged as it comes and can be dropped
 * afterwards (only the worst outcome per rule and subject is kept), so memory does not grow with
 * the number of scenarios. `measure` runs the rules without letting the scenario count as a
 * judged one (the small steps of a sensitivity).
 */
export class RuleSession {
  readonly #circuit: Circuit;
  readonly #states: RuleState[] = [];
  readonly #errors: Finding[];
  readonly #rules: readonly ConfiguredRule[];
  readonly #timeLimitMs: number;
  readonly #budgetMs: number;

  constructor(input: { circuit: Circuit; rules: readonly ConfiguredRule[]; timeLimitMs?: number; budgetMs?: number }) {
    this.#circuit = input.circuit;
    this.#timeLimitMs = input.timeLimitMs ?? RULE_TIME_LIMIT_MS;
    this.#budgetMs = input.budgetMs ?? currentRuleBudgetMs();
    const validated = validateRuleOptions(input.rules);
    const { rules, errors } = applyOverrides(input.circuit, validated);
    this.#errors = errors;
    this.#rules = rules;
    for (const configured of rules) {
      if (configured.severity === "off") continue;
      const direct = configured.source === "builtin" && !isContained(configured.rule);
      this.#states.push({ configured, severity: configured.severity, worst: new Map(), order: 0, budgetMs: this.#budgetMs, spentMs: 0, scenarios: 0, exhausted: false, direct, keys: new Map() });
    }
  }

  /** Runs every rule on one scenario and keeps its outcomes (the worst per rule and subject wins). */
  judge(analysis: ScenarioAnalysis): Promise<ScenarioReadings> {
    return this.#run(analysis, true);
  }

  /** Runs every rule on one scenario for its readings only; its outcomes are not kept. */
  measure(analysis: ScenarioAnalysis): Promise<ScenarioReadings> {
    return this.#run(analysis, false);
  }

  // Built-in rules return synchronously; the loop awaits only a rule that returns a promise, so a
  // streamed circuit of thousands of scenarios does not pay a promise round trip per rule.
  #run(analysis: ScenarioAnalysis, keepOutcomes: boolean): Promise<ScenarioReadings> {
    const tally = new Tally();
    const states = this.#states;
    for (let i = 0; i < states.length; i++) {
      const pending = this.#one(states[i]!, analysis, keepOutcomes, tally);
      if (pending !== undefined) return this.#rest(pending, i + 1, analysis, keepOutcomes, tally);
    }
    return Promise.resolve(tally);
  }

  async #rest(pending: Promise<void>, from: number, analysis: ScenarioAnalysis, keepOutcomes: boolean, tally: Tally): Promise<ScenarioReadings> {
    await pending;
    const states = this.#states;
    for (let i = from; i < states.length; i++) {
      const next = this.#one(states[i]!, analysis, keepOutcomes, tally);
      if (next !== undefined) await next;
    }
    return tally;
  }

  #one(state: RuleState, analysis: ScenarioAnalysis, keepOutcomes: boolean, tally: Tally): Promise<void> | undefined {
    if (state.exhausted) return undefined;
    state.scenarios++;
    const sink = new Sink(state, this.#circuit, keepOutcomes, tally);
    if (state.direct) return runDirect(state, analysis, this.#timeLimitMs, sink);
    return runBudgeted(state, this.#circuit, analysis, this.#timeLimitMs, sink);
  }

  /** The findings and passed checks over every judged scenario. */
  finish(): RuleResults {
    const circuit = this.#circuit;
    const findings: Finding[] = [...this.#errors];
    const passed: PassedCheck[] = [];
    for (const { configured, severity, worst } of this.#states) {
      for (const o of worst.values()) {
        if (o.kind === "pass") {
          passed.push({ rule: configured.rule.id, subject: o.subject, measured: o.measured, limit: o.limit, unit: o.unit, margin: o.margin, scenario: o.scenario });
          continue;
        }
        const pos = o.pos ?? subjectPos(circuit, o.subject);
        findings.push({
          rule: configured.rule.id,
          severity: o.broken ? "error" : severity,
          subject: o.subject,
          message: o.message,
          measured: o.measured,
          limit: o.limit,
          unit: o.unit,
          margin: o.margin,
          scenario: o.scenario,
          file: pos.file,
          line: pos.line,
          column: pos.column,
          ...(o.hint ? { hint: o.hint } : {}),
        });
      }
    }
    const waived = applyWaivers(circuit, this.#rules, findings);
    waived.sort(compareFindings);
    passed.sort((a, b) => cmp(a.rule, b.rule) || cmp(a.subject, b.subject));
    return { findings: waived, passed };
  }
}

/**
 * Takes one rule's reports on one scenario: each is checked against the results contract, counted
 * in the scenario's readings, and (when the scenario is judged) kept if it is the worst so far for
 * its subject.
 */
class Sink {
  readonly #state: RuleState;
  readonly #circuit: Circuit;
  readonly #keepOutcomes: boolean;
  readonly #tally_: Tally;

  constructor(state: RuleState, circuit: Circuit, keepOutcomes: boolean, tally: Tally) {
    this.#state = state;
    this.#circuit = circuit;
    this.#keepOutcomes = keepOutcomes;
    this.#tally_ = tally;
  }

  /** Counts one report in the scenario's readings (positional, so that a pass need not allocate). */
  #tally(failing: boolean, broken: boolean, subject: string, measured: number | null, limit: number | null, unit: string | null, margin: number | null, bound: Bound | undefined): void {
    const state = this.#state;
    const tally = this.#tally_;
    if (failing) {
      const rank = broken ? RANK.error : RANK[state.severity];
      if (rank > tally.failRank) tally.failRank = rank;
    }
    if (margin !== null && margin < tally.lowestMargin) tally.lowestMargin = margin;
    if (measured !== null && Number.isFinite(measured)) {
      const key = keyOf(state, subject, unit);
      const bounded = limit !== null && !Number.isNaN(limit) && bound !== undefined ? limit : null;
      const known = tally.values.get(key) as { lower: number | null; upper: number | null } | undefined;
      if (known === undefined) {
        const lower = bounded !== null && bound === "min" ? bounded : null;
        const upper = bounded !== null && bound === "max" ? bounded : null;
        tally.values.set(key, { rule: state.configured.rule.id, subject, unit, measured, limit, bound: bound ?? null, lower, upper });
      } else if (bounded !== null) {
        if (bound === "min" && (known.lower === null || bounded > known.lower)) known.lower = bounded;
        if (bound === "max" && (known.upper === null || bounded < known.upper)) known.upper = bounded;
      }
    }
  }

  #keep(o: Outcome): void {
    this.#tally(o.kind === "fail", o.broken === true, o.subject, o.measured, o.limit, o.unit, o.margin, o.bound);
    // A broken rule is kept even from a measuring step: it must surface as an error finding.
    if (!this.#keepOutcomes && !o.broken) return;
    const state = this.#state;
    const prev = state.worst.get(o.subject);
    if (!prev || worseThan(o, prev)) state.worst.set(o.subject, o);
  }

  broken(scenario: string, reason: string): void {
    const { configured } = this.#state;
    const id = configured.rule.id;
    const circuit = this.#circuit;
    this.#keep({
      kind: "fail",
      subject: circuit.name,
      message: `rule \`${id}\` could not check circuit \`${circuit.name}\` in scenario ${scenario}: ${reason}`,
      measured: null,
      limit: null,
      unit: null,
      margin: null,
      scenario,
      order: this.#state.order++,
      hint: configured.source === "builtin" ? "this is a bug in opgate; please report it with the circuit file" : `fix the rule in ${configured.source}, or turn it off in the config`,
      broken: true,
    });
  }

  // Every report is checked against the results contract before it becomes a finding.
  fail(scenario: string, f: unknown): void {
    const problems = failReportProblems(f);
    if (problems.length > 0) return this.broken(scenario, `it reported a finding the results cannot hold: ${problems.join("; ")}`);
    const r = f as FailReport;
    // Built field by field: an object spread followed by more keys costs microseconds on Node 20,
    // and a streamed circuit makes this call for every failing subject of every scenario.
    this.#keep({
      kind: "fail",
      subject: r.subject,
      message: r.message,
      measured: num(r.measured),
      limit: num(r.limit),
      unit: r.unit ?? null,
      margin: marginOf(r.measured, r.limit, r.bound),
      scenario,
      order: this.#state.order++,
      bound: r.bound || undefined,
      hint: r.hint || undefined,
      pos: r.pos ? { file: r.pos.file, line: r.pos.line, column: r.pos.column } : undefined,
    });
  }

  pass(scenario: string, subject: unknown, p: unknown): void {
    const problems = passReportProblems(subject, p);
    if (problems.length > 0) return this.broken(scenario, `it reported a pass the results cannot hold: ${problems.join("; ")}`);
    const r = (p ?? {}) as PassReport;
    const state = this.#state;
    const name = subject as string;
    const measured = num(r.measured);
    const limit = num(r.limit);
    const unit = r.unit ?? null;
    const margin = marginOf(r.measured, r.limit, r.bound);
    const order = state.order++;
    this.#tally(false, false, name, measured, limit, unit, margin, r.bound);
    if (!this.#keepOutcomes) return;
    // Most passes of a streamed circuit are no worse than the one kept: compared before any object is made.
    const prev = state.worst.get(name);
    if (prev && !passWorseThan(margin, scenario, order, prev)) return;
    state.worst.set(name, { kind: "pass", subject: name, message: "", measured, limit, unit, margin, scenario, order, bound: r.bound });
  }
}

function isThenable(v: unknown): v is PromiseLike<void> {
  return typeof v === "object" && v !== null && typeof (v as { then?: unknown }).then === "function";
}

/** A rule's check (or failed-solve hook) on one scenario with a reporter that closes when it is done. */
function checkCall(rule: Rule, options: Readonly<Record<string, unknown>>, analysis: ScenarioAnalysis, sink: Sink): { work: (() => void | Promise<void>) | undefined; close: () => void } {
  const scenario = analysis.scenario;
  const id = scenario.id;
  let open = true;
  const reporter: Reporter = {
    fail(f: FailReport) {
      if (open) sink.fail(id, f);
    },
    pass(subject: string, p?: PassReport) {
      if (open) sink.pass(id, subject, p);
    },
  };
  const solve = analysis.solve;
  const circuit = scenario.circuit;
  const work = solve.ok
    ? () => rule.check({ circuit, specs: circuit.specs, options, scenario, op: solve, smallSignal: analysis.smallSignal }, reporter)
    : rule.checkFailedSolve
      ? () => rule.checkFailedSolve!({ circuit, specs: circuit.specs, options, scenario, failure: solve }, reporter)
      : undefined;
  return {
    work,
    close: () => {
      open = false;
    },
  };
}

/** A built-in rule in this thread: a direct call; only a rule that returns a promise is awaited, under the per-call limit. */
function runDirect(state: RuleState, analysis: ScenarioAnalysis, timeLimitMs: number, sink: Sink): Promise<void> | undefined {
  const { work, close } = checkCall(state.configured.rule, state.configured.options ?? {}, analysis, sink);
  if (!work) return undefined;
  const id = analysis.scenario.id;
  let result: void | Promise<void>;
  try {
    result = work();
  } catch (err) {
    close();
    sink.broken(id, reasonOf(err));
    return undefined;
  }
  if (!isThenable(result)) {
    close();
    return undefined;
  }
  const running = result;
  return withTimeLimit(() => running, timeLimitMs, false)
    .catch((err: unknown) => sink.broken(id, reasonOf(err)))
    .finally(close);
}

/** A team rule (or a built-in one run contained): timed against its per-circuit budget. */
async function runBudgeted(state: RuleState, circuit: Circuit, analysis: ScenarioAnalysis, timeLimitMs: number, sink: Sink): Promise<void> {
  const started = Date.now();
  try {
    await runTimed(state, circuit, analysis, timeLimitMs, sink);
  } finally {
    state.spentMs += Date.now() - started;
  }
}

async function runTimed(state: RuleState, circuit: Circuit, analysis: ScenarioAnalysis, timeLimitMs: number, sink: Sink): Promise<void> {
  const { configured } = state;
  const { rule } = configured;
  const options = configured.options ?? {};
  const scenario = analysis.scenario;
  const started = Date.now();
  const left = state.budgetMs - state.spentMs;
  if (left <= 0) {
    state.exhausted = true;
    sink.broken(scenario.id, `it used up its ${state.budgetMs / 1000} s budget for this circuit before this scenario`);
    return;
  }

  if (isContained(rule)) {
    // A team rule from a plugin: run in the plugin thread, within what is left of its budget.
    const outcome = await runContained(rule, [analysis], options, left);
    if (!outcome.ok) {
      state.exhausted = true;
      const outOfTime = Date.now() - started >= left;
      const n = state.scenarios;
      sink.broken(scenario.id, outOfTime ? `checking the circuit's ${n} scenario${n === 1 ? "" : "s"} took longer than ${state.budgetMs / 1000} s` : outcome.reason);
    } else {
      for (const r of outcome.reports) {
        if (r.kind === "fail") sink.fail(r.scenario, r.report);
        else sink.pass(r.scenario, r.subject, r.report);
      }
      for (const e of outcome.errors) sink.broken(e.scenario, e.reason);
    }
    return;
  }

  const { work, close } = checkCall(rule, options, analysis, sink);
  if (!work) return;
  try {
    await withTimeLimit(work, Math.min(timeLimitMs, left), configured.source !== "builtin");
  } catch (err) {
    sink.broken(scenario.id, reasonOf(err));
  } finally {
    close();
  }
}

export function compareFindings(a: Finding, b: Finding): number {
  return (
    cmp(a.file, b.file) || a.line - b.line || a.column - b.column || cmp(a.rule, b.rule) || cmp(a.subject, b.subject) || cmp(a.scenario, b.scenario) || cmp(a.message, b.message)
  );
}

function cmp(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Runs the rules over one circuit's scenarios. Throws ConfigError (before running anything) on bad options. */
export async function runRules(input: RunRulesInput): Promise<RuleResults> {
  const session = new RuleSession(input);
  for (const analysis of input.analyses) await session.judge(analysis);
  return session.finish();
}

/**
 * A component's `waive:` entries: that rule's findings on that component become notes that
 * carry the reason (so they stay visible in every report but no longer gate). A waiver naming
 * a rule that is not loaded is an input error at the component.
 */
function applyWaivers(circuit: Circuit, rules: readonly ConfiguredRule[], findings: readonly Finding[]): Finding[] {
  const loaded = new Set(rules.map((c) => c.rule.id));
  const out: Finding[] = findings.map((f) => {
    const reason = circuit.components.find((c) => c.id === f.subject)?.waive?.[f.rule];
    if (reason === undefined || f.rule === OVERRIDE_RULE) return f;
    return { ...f, severity: "note", message: `${f.message} — waived for ${f.subject}: ${reason}` };
  });
  for (const c of circuit.components) {
    for (const rule of Object.keys(c.waive ?? {})) {
      if (loaded.has(rule)) continue;
      out.push({
        rule: OVERRIDE_RULE,
        severity: "error",
        subject: c.id,
        message: `${c.id} waives rule \`${rule}\`, which is not loaded`,
        measured: null,
        limit: null,
        unit: null,
        margin: null,
        scenario: "nominal",
        file: c.pos.file,
        line: c.pos.line,
        column: c.pos.column,
        hint: didYouMean(rule, [...loaded]) ?? "run `opgate rules` for the list",
      });
    }
  }
  return out;
}
