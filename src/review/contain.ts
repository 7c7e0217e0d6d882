// Team rules run contained: their plugins are imported and their rules run in a worker thread
// (plugin-host.ts) with a deadline on everything it is asked to do. What the gate itself runs
// never depends on a plugin's manners:
//   - `process.exit(…)` in a plugin ends the host thread only: the rule gets an `error` finding;
//   - a loop, a promise that never settles, an import that never finishes: the deadline ends
//     the host thread; one budget covers a rule's whole pass over one circuit's scenarios;
//   - a plugin that leaves a timer running keeps only the host alive, and the host never keeps
//     this process alive (it is unreferenced whenever nothing is asked of it);
//   - rules see deep-frozen copies, so a write cannot reach the published results.
// A host that was ended is started again (plugins re-imported) for the next rule.
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { ScenarioAnalysis } from "../pipeline/types.js";
import type { FromHost, ToHost, WireAnalysis, WireExport, WireReport, WireRuleMeta } from "./contain-protocol.js";
import { EMPTY_OPTIONS, type Rule } from "./rule.js";

/**
 * How long importing a config's plugins may take. A plugin is a small module; compiling a
 * TypeScript one takes well under a second. Twenty seconds is far beyond an honest plugin on a
 * loaded CI runner, and ends a plugin whose import never finishes.
 */
export const PLUGIN_LOAD_BUDGET_MS = 20_000;
let loadBudgetMs = PLUGIN_LOAD_BUDGET_MS;

/**
 * How long one team rule may take over all the scenarios of one circuit (one budget, not one per
 * scenario: a rule that stalls on each of 31 scenarios must not cost 31 timeouts). A rule does
 * arithmetic over solved circuits, microseconds to milliseconds per scenario.
 */
export const RULE_BUDGET_MS = 5_000;
let ruleBudgetMs = RULE_BUDGET_MS;

/** Tests only: shorter budgets, so that a test of a plugin that never finishes is quick. */
export function setContainmentBudgets(budgets: { readonly loadMs?: number; readonly ruleMs?: number }): void {
  loadBudgetMs = budgets.loadMs ?? PLUGIN_LOAD_BUDGET_MS;
  ruleBudgetMs = budgets.ruleMs ?? RULE_BUDGET_MS;
}

/** The per rule and circuit budget now in force (the rule engine spreads it over a streamed circuit). */
export function currentRuleBudgetMs(): number {
  return ruleBudgetMs;
}

class HostEnded extends Error {}

type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

const here = fileURLToPath(import.meta.url);
const fromSource = here.endsWith(".ts");

function hostEntry(): { entry: URL | string; eval: boolean } {
  if (!fromSource) return { entry: new URL("./plugin-host.js", import.meta.url), eval: false };
  // Under the test runner: register tsx first (as src/run/lane.ts does for its threads).
  const tsx = pathToFileURL(join(dirname(createRequire(import.meta.url).resolve("tsx/esm/api")), "index.mjs")).href;
  const host = new URL("./plugin-host.ts", import.meta.url).href;
  return { entry: `import { register } from ${JSON.stringify(tsx)};\nregister();\nawait import(${JSON.stringify(host)});\n`, eval: true };
}

/** The host thread for one config's plugins; requests are answered in order, one at a time. */
export class PluginHost {
  private worker: Worker | undefined;
  private nextId = 1;
  private readonly pending = new Map<number, { resolve(m: FromHost): void; reject(e: Error): void }>();
  private loaded = false;
  private circuit: readonly ScenarioAnalysis[] | undefined;
  private queue: Promise<unknown> = Promise.resolve();

  constructor(readonly paths: readonly string[]) {}

  private start(): Worker {
    const { entry, eval: isEval } = hostEntry();
    const worker = new Worker(entry, { eval: isEval });
    worker.on("message", (m: FromHost) => {
      const p = this.pending.get(m.id);
      if (!p) return;
      this.pending.delete(m.id);
      p.resolve(m);
    });
    const fail = (reason: string): void => {
      // A thread already stopped (on a deadline) has nothing pending: its requests were settled.
      if (this.worker !== worker) return;
      this.forget();
      for (const p of this.pending.values()) p.reject(new HostEnded(reason));
      this.pending.clear();
    };
    worker.on("error", (err) => fail(`it crashed the plugin thread (${err instanceof Error ? `${err.name}: ${err.message}` : String(err)})`));
    worker.on("exit", (code) => fail(`it ended the plugin thread (exit code ${code}): a rule or plugin must not call process.exit`));
    worker.unref();
    this.worker = worker;
    return worker;
  }

  private forget(): void {
    this.worker = undefined;
    this.loaded = false;
    this.circuit = undefined;
  }

  /** Ends the thread (a plugin's timers die with it); the next request starts a new one. */
  stop(): void {
    const w = this.worker;
    this.forget();
    if (w) void w.terminate();
  }

  private request<T extends FromHost>(message: DistributiveOmit<ToHost, "id">, budgetMs: number, what: string, shownBudgetMs = budgetMs): Promise<T> {
    const worker = this.worker ?? this.start();
    const id = this.nextId++;
    worker.ref();
    return new Promise<T>((resolve, reject) => {
      const timer = setTimeout(() => {
        this.pending.delete(id);
        this.stop();
        reject(new HostEnded(`${what} took longer than ${shownBudgetMs / 1000} s`));
      }, budgetMs);
      this.pending.set(id, {
        resolve: (m) => {
          clearTimeout(timer);
          if (this.pending.size === 0) worker.unref();
          if (m.t === "failed") reject(new HostEnded(m.reason));
          else resolve(m as T);
        },
        reject: (e) => {
          clearTimeout(timer);
          reject(e);
        },
      });
      try {
        worker.postMessage({ ...message, id } as ToHost);
      } catch (err) {
        clearTimeout(timer);
        this.pending.delete(id);
        reject(new HostEnded(`its input could not be handed to the plugin thread (${err instanceof Error ? err.message : String(err)})`));
      }
    });
  }

  private serial<T>(job: () => Promise<T>): Promise<T> {
    const run = this.queue.then(job, job);
    this.queue = run.catch(() => undefined);
    return run;
  }

  /** Imports the plugins (once per thread); what they export, for the caller to check. */
  load(): Promise<readonly WireExport[]> {
    return this.serial(() => this.ensureLoaded());
  }

  private async ensureLoaded(): Promise<readonly WireExport[]> {
    const m = await this.request<Extract<FromHost, { t: "loaded" }>>({ t: "load", paths: this.paths }, loadBudgetMs, "importing the plugins");
    this.loaded = true;
    // A compiled team rule kept in the cache that could not be trusted (it was compiled again):
    // one line, as the result cache does.
    for (const note of m.notes ?? []) process.stderr.write(`opgate: ${note}\n`);
    return m.plugins;
  }

  /** Runs rule `rule` of plugin `plugin` over every scenario within one budget. */
  run(plugin: number, rule: number, analyses: readonly ScenarioAnalysis[], options: unknown, budgetMs: number): Promise<Extract<FromHost, { t: "ran" }>> {
    return this.serial(async () => {
      if (!this.loaded) {
        // A thread ended by an earlier rule: loading the plugins again is not this rule's time.
        const again = await this.ensureLoaded();
        const it = again[plugin];
        if (!it || !("items" in it)) throw new HostEnded(`its plugin no longer loads (${it && "error" in it ? it.error : "no default export"})`);
      }
      const deadline = Date.now() + budgetMs;
      const left = (): number => Math.max(1, deadline - Date.now());
      const what = `checking the circuit's ${analyses.length} scenario${analyses.length === 1 ? "" : "s"}`;
      // New analyses travel with the run (one round trip per rule and scenario, not two).
      const fresh = this.circuit !== analyses;
      const ran = await this.request<Extract<FromHost, { t: "ran" }>>(
        { t: "run", plugin, rule, options, ...(fresh ? { analyses: analyses as unknown as readonly WireAnalysis[] } : {}) },
        left(),
        what,
        budgetMs,
      );
      if (fresh) this.circuit = analyses;
      return ran;
    });
  }
}

interface ContainedRef {
  readonly host: PluginHost;
  readonly plugin: number;
  readonly rule: number;
}

const contained = new WeakMap<Rule, ContainedRef>();

function runsInHost(): never {
  throw new Error("this team rule runs in the plugin thread: call it through the rule engine");
}

/** A Rule standing for rule `rule` of plugin `plugin` in `host`: metadata here, code there. */
export function containedRule(meta: WireRuleMeta, host: PluginHost, plugin: number, rule: number): Rule {
  const r = Object.freeze({
    id: meta.id,
    description: meta.description,
    severity: meta.severity,
    docs: meta.docs,
    options: meta.options ?? EMPTY_OPTIONS,
    circuitOptions: Object.freeze([...(meta.circuitOptions ?? [])]),
    check: runsInHost,
    ...(meta.hasFailedSolve ? { checkFailedSolve: runsInHost } : {}),
  }) as Rule;
  contained.set(r, { host, plugin, rule });
  return r;
}

export function isContained(rule: Rule): boolean {
  return contained.has(rule);
}

export type ContainedOutcome =
  | { readonly ok: true; readonly reports: readonly WireReport[]; readonly errors: readonly { readonly scenario: string; readonly reason: string }[] }
  | { readonly ok: false; readonly reason: string };

/** Runs a contained rule over one circuit's scenarios; never throws for anything the rule does. */
export async function runContained(rule: Rule, analyses: readonly ScenarioAnalysis[], options: unknown, budgetMs?: number): Promise<ContainedOutcome> {
  const ref = contained.get(rule);
  if (!ref) throw new Error(`rule ${rule.id} is not a contained rule`);
  try {
    const m = await ref.host.run(ref.plugin, ref.rule, analyses, options, budgetMs ?? ruleBudgetMs);
    return { ok: true, reports: m.reports, errors: m.errors };
  } catch (err) {
    if (err instanceof HostEnded) return { ok: false, reason: err.message };
    throw err;
  }
}
