// The plugin host: a worker thread that imports the team-rule plugins and runs their rules, so
// that nothing a plugin does can end or stall the gate itself. `process.exit` here ends only this
// thread; a loop or a promise that never settles is cut off by the deadline the main side keeps
// (contain.ts), which then ends this thread; a timer a plugin leaves behind keeps only this
// thread alive, and the main side never waits for it. Rules see the circuit and its analyses as
// deep-frozen copies: a write throws inside the rule and touches nothing that is published.
import { parentPort } from "node:worker_threads";
import { importModule, importNotes } from "./plugin-import.js";
import { describeValue, ruleShapeProblems } from "./rule.js";
import type { FromHost, ToHost, WireAnalysis, WireExport, WireReport, WireRuleMeta, WireValue } from "./contain-protocol.js";

interface HostedRule {
  check(view: unknown, report: unknown): unknown;
  checkFailedSolve?(view: unknown, report: unknown): unknown;
}

const port = parentPort;
if (!port) throw new Error("opgate: src/review/plugin-host is started by contain.ts, not run directly");

// What a plugin prints would land among the reports on the gate's standard output: drop it.
process.stdout.write = () => true;
process.stderr.write = () => true;

/** plugins[i][j]: rule j of plugin i, as loaded. */
const plugins: HostedRule[][] = [];
let analyses: readonly WireAnalysis[] = [];

function send(message: FromHost): void {
  port!.postMessage(message);
}

/** Freezes a copied value through and through (for…in over plain data: ~6× faster than ownKeys). */
function deepFreeze<T>(value: T): T {
  if (typeof value !== "object" || value === null || Object.isFrozen(value)) return value;
  // A frozen Map can still be changed through its methods: take them away (before freezing).
  if (value instanceof Map) for (const m of ["set", "delete", "clear"] as const) Object.defineProperty(value, m, { value: readOnlyMethod, enumerable: false });
  Object.freeze(value);
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) deepFreeze(value[i]);
  } else if (value instanceof Map) {
    for (const v of value.values()) deepFreeze(v);
  } else {
    for (const key in value) deepFreeze((value as Record<string, unknown>)[key]);
  }
  return value;
}

function readOnlyMethod(): never {
  throw new TypeError("the circuit and its analyses are read-only for rules");
}

/** A value as it may cross to the main thread: plain data, or a description of what it was. */
function wire(value: unknown, depth = 0): WireValue {
  if (value === null || ["string", "number", "boolean", "undefined"].includes(typeof value)) return value as WireValue;
  if (depth < 1 && typeof value === "object" && Object.getPrototypeOf(value) === Object.prototype) {
    const out: Record<string, WireValue> = {};
    for (const [k, v] of Object.entries(value as object)) out[k] = wire(v, depth + 1);
    return out;
  }
  return { $notPlain: describeValue(value) };
}

function wireReport(value: unknown): WireValue {
  if (typeof value !== "object" || value === null) return wire(value);
  const out: Record<string, WireValue> = {};
  for (const [k, v] of Object.entries(value)) out[k] = wire(v);
  return out;
}

function metaOf(value: Record<string, unknown>): WireRuleMeta {
  let options: unknown;
  try {
    options = value.options === undefined ? undefined : JSON.parse(JSON.stringify(value.options));
  } catch {
    throw new Error("`options` must be a plain JSON Schema (it could not be copied as JSON)");
  }
  return {
    id: value.id as string,
    description: value.description as string,
    severity: value.severity as WireRuleMeta["severity"],
    docs: value.docs as string,
    ...(options !== undefined ? { options: options as WireRuleMeta["options"] } : {}),
    ...(value.circuitOptions !== undefined ? { circuitOptions: [...(value.circuitOptions as string[])] } : {}),
    hasFailedSolve: typeof value.checkFailedSolve === "function",
  };
}

async function load(paths: readonly string[]): Promise<WireExport[]> {
  const out: WireExport[] = [];
  for (const path of paths) {
    const rules: HostedRule[] = [];
    plugins.push(rules);
    let mod: Record<string, unknown>;
    try {
      mod = await importModule(path);
    } catch (err) {
      out.push({ error: err instanceof Error ? err.message : String(err) });
      continue;
    }
    // A CommonJS-style module (`exports.default = …`) arrives wrapped as { default: { default: … } }.
    let exported = mod.default;
    if (exported && typeof exported === "object" && !Array.isArray(exported) && "default" in exported && !("id" in exported))
      exported = (exported as { default: unknown }).default;
    if (exported === undefined) {
      out.push({ noDefault: true });
      continue;
    }
    const values = Array.isArray(exported) ? exported : [exported];
    out.push({
      array: Array.isArray(exported),
      items: values.map((value) => {
        const problems = ruleShapeProblems(value);
        if (problems.length === 0) {
          try {
            const meta = metaOf(value as Record<string, unknown>);
            rules.push(value as HostedRule);
            return { meta };
          } catch (err) {
            problems.push(err instanceof Error ? err.message : String(err));
          }
        }
        // Keep the indices of the valid rules in step with plugins[i].
        rules.push({ check: () => undefined });
        return { problems, described: describeValue(value) };
      }),
    });
  }
  return out;
}

async function runRule(plugin: number, index: number, options: unknown): Promise<{ reports: WireReport[]; errors: { scenario: string; reason: string }[] }> {
  const rule = plugins[plugin]?.[index];
  if (!rule) throw new Error(`no rule ${plugin}.${index} in the plugin host`);
  const reports: WireReport[] = [];
  const errors: { scenario: string; reason: string }[] = [];
  const frozenOptions = deepFreeze(options);
  for (const a of analyses) {
    const scenario = a.scenario.id;
    let open = true;
    const reporter = Object.freeze({
      fail(f: unknown) {
        if (open) reports.push({ scenario, kind: "fail", report: wireReport(f) });
      },
      pass(subject: unknown, p?: unknown) {
        if (open) reports.push({ scenario, kind: "pass", subject: wire(subject), report: p === undefined ? undefined : wireReport(p) });
      },
    });
    const view = { circuit: a.scenario.circuit, specs: a.scenario.circuit.specs, options: frozenOptions, scenario: a.scenario };
    try {
      if (a.solve.ok) await rule.check(Object.freeze({ ...view, op: a.solve, smallSignal: a.smallSignal }), reporter);
      else if (rule.checkFailedSolve) await rule.checkFailedSolve(Object.freeze({ ...view, failure: a.solve }), reporter);
    } catch (err) {
      errors.push({ scenario, reason: err instanceof Error ? `it threw ${err.name}: ${err.message}` : `it threw ${String(err)}` });
    } finally {
      open = false;
    }
  }
  return { reports, errors };
}

port.on("message", (message: ToHost) => {
  void (async () => {
    try {
      switch (message.t) {
        case "load":
          send({ t: "loaded", id: message.id, plugins: await load(message.paths), notes: importNotes.splice(0) });
          return;
        case "run": {
          if (message.analyses) analyses = deepFreeze(message.analyses);
          const { reports, errors } = await runRule(message.plugin, message.rule, message.options);
          send({ t: "ran", id: message.id, reports, errors });
          return;
        }
      }
    } catch (err) {
      send({ t: "failed", id: message.id, reason: err instanceof Error ? err.message : String(err) });
    }
  })();
});
