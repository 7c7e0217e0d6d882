// Benchmark of team-rule containment: what running a plugin rule in the plugin thread
// (src/review/contain.ts: the circuit's analyses copied to the thread and deep-frozen there, one
// message round trip per rule) costs per circuit, against the same rule object called in this
// thread. Circuit: the generated 30-node cascade (bench/smallsignal.ts) with 31 Monte Carlo
// scenarios, the size a variation run gives. Run alone with `npx tsx bench/rules.ts`.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { loadPlugins } from "../src/review/plugins.js";
import { runRules, type ConfiguredRule } from "../src/review/engine.js";
import { analyseCircuit } from "../src/review/tester.js";
import { toRule } from "../src/review/rule.js";
import type { ResolvedConfig } from "../src/review/config-types.js";
import { cascadeCircuit } from "./smallsignal.js";

/** A rule of the usual kind: reads every device of every scenario, reports a pass per device. */
const RULE_SOURCE = `export default {
  id: "bench/devices",
  description: "Checks every device for the benchmark",
  severity: "warning",
  docs: "Benchmark.",
  check({ op }, report) {
    for (const [id, d] of Object.entries(op.devices)) report.pass(id, { measured: typeof d.power === "number" ? d.power : 0, limit: 1, unit: "W", bound: "max" });
  },
};
`;
const SAMPLES = 30;
const CIRCUITS = 40;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

export async function benchRules(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), "opgate-bench-rules-"));
  try {
    const path = join(dir, "rule.mjs");
    writeFileSync(path, RULE_SOURCE);
    const circuit = cascadeCircuit();
    const analyses = analyseCircuit(circuit, { mode: "monte-carlo", samples: SAMPLES, seed: 1 } as never);
    const [plugin] = await loadPlugins({ plugins: [path], root: dir } as unknown as ResolvedConfig);
    const contained: ConfiguredRule[] = [{ rule: plugin!.rules[0]!, severity: "warning", source: "rule.mjs" }];
    const direct: ConfiguredRule[] = [{ rule: toRule((await import(pathToFileURL(path).href)).default), severity: "warning", source: "builtin" }];
    // Each circuit is a fresh copy, as in a run (the thread receives every circuit once).
    const copies = Array.from({ length: CIRCUITS }, () => structuredClone(analyses));
    const time = async (rules: ConfiguredRule[]): Promise<number[]> => {
      const ms: number[] = [];
      for (const a of copies) {
        const t0 = performance.now();
        await runRules({ circuit, analyses: a, rules });
        ms.push(performance.now() - t0);
      }
      return ms;
    };
    await time(contained);
    await time(direct);
    const rounds: { contained: number; direct: number }[] = [];
    for (let round = 0; round < 3; round++) rounds.push({ contained: median(await time(contained)), direct: median(await time(direct)) });
    console.log(`| round | contained (ms per circuit) | in this thread (ms per circuit) | ratio |`);
    console.log(`|---|---|---|---|`);
    rounds.forEach((r, i) => console.log(`| ${i + 1} | ${r.contained.toFixed(2)} | ${r.direct.toFixed(2)} | ${(r.contained / r.direct).toFixed(1)}× |`));
    console.log(`\n${analyses.length} scenarios of a ${Object.keys(analyses[0]!.solve.ok ? analyses[0]!.solve.nodes : {}).length}-node circuit, one rule; medians over ${CIRCUITS} circuits.`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) await benchRules();
