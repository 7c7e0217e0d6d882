// Messages between the rule engine's side (contain.ts) and the plugin host thread
// (plugin-host.ts). Everything is plain data: what a plugin reports is copied field by field, and
// a value that is not plain data arrives as a description of what it was, for the report check.
import type { OptionsSchema, RuleSeverity } from "./rule.js";

export type WireValue = string | number | boolean | null | undefined | { readonly $notPlain: string } | { readonly [key: string]: WireValue };

export interface WireRuleMeta {
  readonly id: string;
  readonly description: string;
  readonly severity: RuleSeverity;
  readonly docs: string;
  readonly options?: OptionsSchema;
  readonly circuitOptions?: readonly string[];
  readonly hasFailedSolve: boolean;
}

/** What one plugin module exported: a load error, no default export, or its items. */
export type WireExport =
  | { readonly error: string }
  | { readonly noDefault: true }
  | { readonly array: boolean; readonly items: readonly ({ readonly meta: WireRuleMeta } | { readonly problems: readonly string[]; readonly described: string })[] };

/** One scenario as a rule sees it (ScenarioAnalysis, copied). */
export interface WireAnalysis {
  readonly scenario: { readonly id: string; readonly circuit: { readonly specs: unknown } & Record<string, unknown> } & Record<string, unknown>;
  readonly solve: { readonly ok: boolean } & Record<string, unknown>;
  readonly smallSignal: unknown;
}

export interface WireReport {
  readonly scenario: string;
  readonly kind: "fail" | "pass";
  /** pass only: the subject argument. */
  readonly subject?: WireValue;
  readonly report: WireValue;
}

export type ToHost =
  | { readonly t: "load"; readonly id: number; readonly paths: readonly string[] }
  /** `analyses` when they are not the ones of the previous run (sent once, with the first rule's run). */
  | { readonly t: "run"; readonly id: number; readonly plugin: number; readonly rule: number; readonly options: unknown; readonly analyses?: readonly WireAnalysis[] };

export type FromHost =
  | { readonly t: "loaded"; readonly id: number; readonly plugins: readonly WireExport[]; readonly notes?: readonly string[] }
  | { readonly t: "ran"; readonly id: number; readonly reports: readonly WireReport[]; readonly errors: readonly { readonly scenario: string; readonly reason: string }[] }
  | { readonly t: "failed"; readonly id: number; readonly reason: string };
