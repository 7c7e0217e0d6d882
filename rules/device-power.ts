// Rule `device-power`: each transistor and diode whose model gives a powerRating dissipates no
// more than a derated fraction of it.
import { defineRule } from "../src/review/rule.js";
import { deratingFactor, formatQuantity, toCelsius } from "../src/review/quantities.js";

export default defineRule({
  id: "device-power",
  description: "Checks that each transistor and diode dissipates no more than a derated fraction of its rating",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice: at most half the rated dissipation keeps the junction well below its
      // maximum without a thermal calculation.
      fraction: { type: "number", exclusiveMinimum: 0, maximum: 1, default: 0.5, description: "Allowed fraction of the (temperature-derated) rating" },
      // Common practice (from memory): small-signal transistor ratings are given at 25 °C
      // ambient and derate linearly to zero at the 150 °C maximum junction temperature.
      fullRatingUpToC: { type: "number", default: 25, description: "Ambient (°C) up to which the model's powerRating applies in full" },
      zeroRatingAtC: { type: "number", default: 150, description: "Ambient (°C) at which the derated rating reaches zero" },
    },
  },
  circuitOptions: ["fraction"],
  docs: `Checks every BJT, MOSFET and diode whose model gives a powerRating: its DC dissipation must not
exceed rating × fraction × derating(ambient), where derating is 1 up to 25 °C and falls linearly
to 0 at 150 °C (the usual datasheet derating of small-signal parts). Devices whose model gives no
rating are not judged.

Why it matters: a transistor running near its rating runs hot, drifts (VBE, beta, threshold) and
fails early; at the hot corner the margin shrinks further.

How to fix: lower the device's current or the voltage across it (more emitter/collector
resistance, a lower supply), or choose a device with a higher rating.`,
  check({ circuit, op, options }, report) {
    const ambient = toCelsius(circuit.temperature);
    const derate = deratingFactor(ambient, options.fullRatingUpToC, options.zeroRatingAtC);
    for (const c of circuit.components) {
      if (c.kind !== "npn" && c.kind !== "pnp" && c.kind !== "nmos" && c.kind !== "pmos" && c.kind !== "diode") continue;
      const rating = circuit.models.get(c.model)?.powerRating;
      const point = op.devices[c.id];
      if (rating === undefined || !point || !("power" in point)) continue;
      const allowed = rating * options.fraction * derate;
      const check = { measured: point.power, limit: allowed, unit: "W", bound: "max" as const };
      if (point.power <= allowed) report.pass(c.id, check);
      else
        report.fail({
          subject: c.id,
          message: `${c.id} dissipates ${formatQuantity(point.power, "W")}; allowed ${formatQuantity(allowed, "W")} (${Math.round(options.fraction * 100)}% of ${formatQuantity(rating, "W")}${derate < 1 ? ` derated to ${ambient.toFixed(0)} °C` : ""})`,
          hint: "lower the device's current or the voltage across it, or use a device with a higher rating",
          ...check,
        });
    }
  },
});
