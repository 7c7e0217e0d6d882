// `opgate inspect FILE --sensitivity`: the sensitivity table of one circuit — for every quantity
// the repository's rules judge, how it moves with every parameter (normalised %/% or per °C, and
// the change across the parameter's own band), by the same central differences the check uses.
import type { Circuit } from "../circuit/types.js";
import { runVariation } from "../pipeline/variation.js";
import { formatQuantity } from "../review/quantities.js";
import { RuleSession } from "../review/engine.js";
import type { CheckContext } from "../pipeline/check-file.js";
import { sensitivityEntries } from "../variation/sensitivity.js";

function signed(v: number, unit: string): string {
  return `${v < 0 ? "\u2212" : "+"}${formatQuantity(Math.abs(v), unit)}`;
}

export async function renderSensitivityTable(circuit: Circuit, ctx: CheckContext): Promise<string> {
  const session = new RuleSession({ circuit, rules: ctx.configured });
  const v = await runVariation(circuit, { ...ctx.config.variation, mode: "corners" }, session, 2);
  session.finish();
  const table = v.table;
  if (!table) return "Sensitivities: not computed (the nominal point did not solve, or the budget was exceeded)\n";
  const lines = [
    `Sensitivities (central differences on full analyses, h = 1e-4 of each value, 0.01 K; ${table.evaluations} analyses)`,
    "  quantity | nominal | parameter | %/% (or per °C) | change at band low … high",
  ];
  const keys = [...table.derivatives.keys()].sort();
  for (const key of keys) {
    const [rule, subject, unit] = key.split("\u0000") as [string, string, string];
    const m = table.base.get(key)!;
    const entries = sensitivityEntries(table, key);
    if (entries.length === 0) continue;
    const head = `  ${rule} ${subject} | ${formatQuantity(m, unit)}`;
    entries.forEach((e, i) => {
      const norm = e.normalised !== null ? `${e.normalised.toPrecision(3)} %/%` : e.perDegree !== null ? `${signed(e.perDegree, unit)}/°C` : "—";
      const band = e.low === 0 && e.high === 0 ? "(no band)" : `${signed(e.low, unit)} … ${signed(e.high, unit)}`;
      lines.push(`${i === 0 ? head : " ".repeat(head.length)} | ${e.name} | ${norm} | ${band}`);
    });
  }
  return lines.join("\n") + "\n";
}
