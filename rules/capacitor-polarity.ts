// Rule `capacitor-polarity`: a polarised capacitor (electrolytic, tantalum: `positive:` names the
// node of its + terminal) is never reverse-biased at DC beyond a small allowance.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";

export default defineRule({
  id: "capacitor-polarity",
  description: "Checks that no polarised capacitor is reverse-biased at DC beyond a small allowance",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice (from memory): aluminium electrolytic makers tolerate about 1 V of reverse
      // bias, tantalum makers about 10 % of the rated voltage up to 1 V at 25 °C, less when hot;
      // half a volt stays under both.
      allowance: { type: "number", minimum: 0, default: 0.5, description: "Reverse DC voltage (V) tolerated across a polarised capacitor" },
    },
  },
  docs: `Checks every capacitor that names its + terminal (\`positive: <node>\`, a polarised part:
aluminium electrolytic or tantalum): the DC voltage from its − terminal to its + terminal (the
reverse bias) must not exceed \`allowance\` (default 0.5 V). A capacitor with no DC across it, or
with its + terminal the more positive, passes.

Why it matters: a reverse-biased electrolytic capacitor grows gas and leaks, swells and can
vent; a reversed tantalum capacitor can fail short and burn. A coupling capacitor between two
bias levels is easy to fit the wrong way round, and a supply corner can flip a small difference.

How to fix: turn the capacitor round (\`positive:\` on the higher DC node), use a non-polarised
part, or set the bias so that the + side is always the higher.

Option: \`allowance\` (0.5 V, common practice).`,
  check({ circuit, op, options }, report) {
    for (const c of circuit.components) {
      if (c.kind !== "capacitor" || c.positive === undefined) continue;
      const point = op.devices[c.id];
      if (!point || point.kind !== "capacitor") continue;
      // point.voltage is V(a) − V(b); the reverse bias is V(−) − V(+).
      const reverse = c.positive === c.pins.a ? -point.voltage : point.voltage;
      const check = { measured: reverse, limit: options.allowance, unit: "V", bound: "max" as const };
      if (reverse <= options.allowance) report.pass(c.id, check);
      else
        report.fail({
          subject: c.id,
          message: `polarised capacitor ${c.id} is reverse-biased by ${formatQuantity(reverse, "V")} (its + terminal on ${c.positive} is the lower side); allowed ${formatQuantity(options.allowance, "V")}`,
          hint: `turn it round (positive: ${c.positive === c.pins.a ? c.pins.b : c.pins.a}) or use a non-polarised capacitor`,
          ...check,
        });
    }
  },
});
