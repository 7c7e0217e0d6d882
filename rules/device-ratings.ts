// Rule `device-ratings`: each transistor's and diode's voltages and currents stay within a
// derated fraction of the absolute maximum ratings its model gives (breakdowns, gate–source
// maximum, reverse voltage, maximum currents).
import type { Circuit, Component, Model } from "../src/circuit/types.js";
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";
import type { DevicePoint } from "../src/solve/types.js";

/** One rating of one device at one operating point. */
interface RatingCheck {
  /** What is measured, for the message: "VCE", "reverse VEB", "IC". */
  readonly quantity: string;
  /** The datasheet's name of the rating: "VCEO". */
  readonly rating: string;
  readonly measured: number;
  readonly max: number;
  readonly unit: "V" | "A";
}

/**
 * The checks of one device: magnitudes, polarity-normalised, so that an NPN and a PNP (an NMOS
 * and a PMOS) are judged alike; a junction's breakdown counts only its reverse bias.
 */
function checksOf(c: Component, model: Model, p: DevicePoint): RatingCheck[] {
  const out: RatingCheck[] = [];
  const add = (quantity: string, rating: string, measured: number, max: number | undefined, unit: "V" | "A") => {
    if (max !== undefined) out.push({ quantity, rating, measured, max, unit });
  };
  if ((p.kind === "npn" || p.kind === "pnp") && (model.kind === "npn" || model.kind === "pnp") && model.ratings) {
    const s = p.kind === "npn" ? 1 : -1;
    const r = model.ratings;
    add("VCE", "VCEO", Math.abs(p.collectorEmitterVoltage), r.collectorEmitter, "V");
    add("reverse VCB", "VCBO", Math.max(0, s * (p.collectorEmitterVoltage - p.baseEmitterVoltage)), r.collectorBase, "V");
    add("reverse VEB", "VEBO", Math.max(0, -s * p.baseEmitterVoltage), r.emitterBase, "V");
    add("IC", "IC max", Math.abs(p.collectorCurrent), r.collectorCurrent, "A");
  } else if ((p.kind === "nmos" || p.kind === "pmos") && (model.kind === "nmos" || model.kind === "pmos") && model.ratings) {
    const r = model.ratings;
    add("VDS", "VDS max", Math.abs(p.drainSourceVoltage), r.drainSource, "V");
    add("VGS", "VGS max", Math.abs(p.gateSourceVoltage), r.gateSource, "V");
    add("ID", "ID max", Math.abs(p.drainCurrent), r.drainCurrent, "A");
  } else if (p.kind === "diode" && model.kind === "diode" && model.ratings && c.kind === "diode") {
    const r = model.ratings;
    add("reverse voltage", "VR max", Math.max(0, -p.voltage), r.reverseVoltage, "V");
    add("forward current", "IF max", Math.max(0, p.current), r.forwardCurrent, "A");
  }
  return out;
}

function modelOf(circuit: Circuit, c: Component): Model | undefined {
  return "model" in c ? circuit.models.get(c.model) : undefined;
}

export default defineRule({
  id: "device-ratings",
  description: "Checks transistor and diode voltages and currents against a derated fraction of their maximum ratings",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice (from memory): industrial derating guides keep a semiconductor's voltages
      // at 70–80 % of its absolute maximum ratings; aerospace derating standards ask for less.
      voltageFraction: { type: "number", exclusiveMinimum: 0, maximum: 1, default: 0.8, description: "Allowed fraction of a voltage rating (breakdowns, VGS max, VR max)" },
      // Common practice (from memory): continuous currents at no more than 80 % of the rating.
      currentFraction: { type: "number", exclusiveMinimum: 0, maximum: 1, default: 0.8, description: "Allowed fraction of a current rating (IC, ID, IF max)" },
    },
  },
  circuitOptions: ["voltageFraction", "currentFraction"],
  docs: `Checks every BJT, MOSFET and diode whose model gives \`ratings\` (the datasheet's absolute maximum
ratings) at each scenario's operating point:
- BJT: |VCE| against collectorEmitter (VCEO), the reverse collector–base voltage against
  collectorBase (VCBO), the reverse emitter–base voltage against emitterBase (VEBO), |IC| against
  collectorCurrent;
- MOSFET: |VDS| against drainSource, |VGS| against gateSource, |ID| against drainCurrent;
- diode: the reverse voltage against reverseVoltage, the forward current against forwardCurrent
  (an LED's rated current). A Zener works in breakdown on purpose: give it no reverseVoltage.
Each must stay within fraction × rating (voltageFraction, currentFraction; default 80 %). PNP and
PMOS are judged on magnitudes like NPN and NMOS. One finding per device names the rating with
the least margin and lists any other rating exceeded in the same scenario; the worst scenario
(a supply at its high end, a hot corner) is the one reported.

Why it matters: a voltage past a breakdown rating destroys the part (a gate oxide punctured by
VGS over its maximum, a collector over VCEO at the high-supply corner, a reverse-biased
emitter–base junction that degrades beta), and a current past its rating overheats a bond wire
or an LED.

How to fix: lower the voltage across the part (a lower supply, a divider, a clamp), choose a
part with higher ratings, or limit the current with more series resistance.

Options: \`voltageFraction\` (default 0.8) and \`currentFraction\` (0.8), common practice; a
circuit file may override both.`,
  check({ circuit, op, options }, report) {
    for (const c of circuit.components) {
      const model = modelOf(circuit, c);
      const point = op.devices[c.id];
      if (!model || !point) continue;
      const checks = checksOf(c, model, point);
      if (checks.length === 0) continue;
      const judged = checks.map((k) => {
        const allowed = k.max * (k.unit === "V" ? options.voltageFraction : options.currentFraction);
        return { ...k, allowed, margin: (allowed - k.measured) / allowed };
      });
      const worst = judged.reduce((a, b) => (b.margin < a.margin ? b : a));
      const check = { measured: worst.measured, limit: worst.allowed, unit: worst.unit, bound: "max" as const };
      if (worst.margin >= 0) {
        report.pass(c.id, check);
        continue;
      }
      const others = judged.filter((k) => k !== worst && k.margin < 0).map((k) => `${k.quantity} ${formatQuantity(k.measured, k.unit)} over ${formatQuantity(k.allowed, k.unit)}`);
      const fraction = worst.unit === "V" ? options.voltageFraction : options.currentFraction;
      report.fail({
        subject: c.id,
        message:
          `${c.id} ${worst.quantity} is ${formatQuantity(worst.measured, worst.unit)}; allowed ${formatQuantity(worst.allowed, worst.unit)} (${Math.round(fraction * 100)}% of its ${worst.rating} rating of ${formatQuantity(worst.max, worst.unit)})` +
          (others.length ? `; also ${others.join(", ")}` : ""),
        hint: worst.unit === "V" ? "lower the voltage across the part (supply, divider, clamp) or choose a part with a higher rating" : "limit the current (more series or emitter/source resistance) or choose a part rated for more",
        ...check,
      });
    }
  },
});
