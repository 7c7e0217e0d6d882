// Rule `resistor-power`: each resistor dissipates no more than a derated fraction of its power
// rating (from powerRating, else the typical rating of its chip size), the rating itself derated
// above 70 °C ambient on the IEC 60115-1 curve.
import { defineRule } from "../src/review/rule.js";
import { deratingFactor, formatQuantity, toCelsius } from "../src/review/quantities.js";

export default defineRule({
  id: "resistor-power",
  description: "Checks that each resistor dissipates no more than a derated fraction of its power rating",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice: run resistors at no more than half their rating, for long life and
      // stable value (film resistors drift faster when hot).
      fraction: { type: "number", exclusiveMinimum: 0, maximum: 1, default: 0.5, description: "Allowed fraction of the (temperature-derated) rating" },
      // IEC 60115-1 derating curve shape (from memory): full rating up to 70 °C ambient, falling
      // linearly to zero at 155 °C, the upper category temperature of common thick-film chips.
      fullRatingUpToC: { type: "number", default: 70, description: "Ambient (°C) up to which the full rating applies" },
      zeroRatingAtC: { type: "number", default: 155, description: "Ambient (°C) at which the derated rating reaches zero" },
      // Typical ratings of thick-film chip resistors by size code (common practice, from memory;
      // a datasheet rating in powerRating always wins).
      packageRatings: {
        type: "object",
        additionalProperties: { type: "number", exclusiveMinimum: 0 },
        default: { "0201": 0.05, "0402": 0.0625, "0603": 0.1, "0805": 0.125, "1206": 0.25, "1210": 0.5, "2010": 0.75, "2512": 1 },
        description: "Rating in W by chip size code, used when a resistor gives a package but no powerRating",
      },
      // Common practice for a careful reviewer: assume the smallest common chip (0402, 1/16 W)
      // when the file says nothing about the part.
      defaultRating: { type: "number", exclusiveMinimum: 0, default: 0.0625, description: "Rating in W assumed for a resistor with neither powerRating nor a known package" },
    },
  },
  circuitOptions: ["fraction"],
  docs: `Checks every resistor's DC dissipation I²R against
  allowed = rating × fraction × derating(ambient),
where the rating is the resistor's powerRating, else the typical rating of its package (chip size
code: 0402 1/16 W, 0603 1/10 W, 0805 1/8 W, 1206 1/4 W, 2512 1 W …), else \`defaultRating\`; and
derating(ambient) is 1 up to 70 °C and falls linearly to 0 at 155 °C (the shape of the IEC 60115-1
derating curve). The ambient is the scenario's temperature.

Why it matters: a resistor run hot drifts, and one run past its rating fails open or burns the
board; chip resistors in small packages are easy to overload with a low-value bias resistor.

Resistors marked \`role: load\` or \`role: coil\` are not judged: they stand for a load module or
a relay coil, which their own datasheet rates (the supply rules still count their current).

How to fix: raise the resistance, split the power over several parts, or use a larger package or
a part with a higher powerRating.

Options: \`fraction\` (default 0.5; a circuit file may override it), \`fullRatingUpToC\` (70),
\`zeroRatingAtC\` (155), \`packageRatings\`, \`defaultRating\` (0.0625 W).`,
  check({ circuit, op, options }, report) {
    const ambient = toCelsius(circuit.temperature);
    const derate = deratingFactor(ambient, options.fullRatingUpToC, options.zeroRatingAtC);
    for (const c of circuit.components) {
      // A load module or a coil is not a resistor part: its own datasheet rates it (coil-drive
      // judges a coil); supply-budget still counts its current.
      if (c.kind !== "resistor" || c.role !== undefined) continue;
      const point = op.devices[c.id];
      if (!point || point.kind !== "resistor") continue;
      const fromPackage = c.package !== undefined ? options.packageRatings[c.package] : undefined;
      const rating = c.powerRating ?? fromPackage ?? options.defaultRating;
      const source = c.powerRating !== undefined ? "its powerRating" : fromPackage !== undefined ? `a typical ${c.package} chip` : c.package !== undefined ? `an assumed rating (package ${c.package} is not in packageRatings)` : "an assumed rating (no powerRating or package given)";
      const allowed = rating * options.fraction * derate;
      const check = { measured: Math.abs(point.power), limit: allowed, unit: "W", bound: "max" as const };
      if (check.measured <= allowed) {
        report.pass(c.id, check);
        continue;
      }
      const at = derate < 1 ? ` at ${ambient.toFixed(0)} °C ambient` : "";
      report.fail({
        subject: c.id,
        message: `${c.id} dissipates ${formatQuantity(check.measured, "W")}; allowed ${formatQuantity(allowed, "W")}${at} (${Math.round(options.fraction * 100)}% of ${formatQuantity(rating, "W")}, ${source})`,
        hint: "spread the power: a larger package or a part rated higher (give its real powerRating), or change the resistance (higher if the voltage across it is fixed, lower if the current through it is)",
        ...check,
      });
    }
  },
});
