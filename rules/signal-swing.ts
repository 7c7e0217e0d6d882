// Rule `signal-swing`: the signal amplitude a gain's input states fits — no transistor is driven
// into saturation/triode or cutoff and a DC-coupled output does not reach a rail (clipping).
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";
import { swingLimits, type SwingLimit } from "../src/review/swing.js";

function describe(l: SwingLimit, amplitude: number): string {
  const needed = formatQuantity(l.perUnit * amplitude, l.unit);
  const available = formatQuantity(l.available, l.unit);
  switch (l.side) {
    case "saturation":
      return `${l.subject} saturates first: its VCE must swing ${needed} peak but has ${available} to the saturation edge`;
    case "triode":
      return `${l.subject} enters triode first: its VDS − VGS must swing ${needed} peak but it has ${available} to the triode edge`;
    case "cutoff":
      return `${l.subject} cuts off first: its current must swing ${needed} peak but its bias is ${available}`;
    default:
      return `node \`${l.subject}\` reaches the ${l.side} first: it must swing ${needed} peak but the rail is ${available} away`;
  }
}

export default defineRule({
  id: "signal-swing",
  description: "Checks that each gain's stated input signal fits without clipping, naming the device and side that clip first",
  severity: "error",
  docs: `Checks every entry of specs.gains whose input source states a \`signal\` (peak amplitude).
From the small-signal transfer at midband and at the band edges (the largest of them), the peak
excursion of every amplifying transistor's VCE (MOSFET: VDS − VGS, the distance to the triode
edge, which the gate swing moves too) and collector (drain) current is compared with what the
bias leaves: the headroom to the saturation or triode edge, and the bias current itself (the
side toward cutoff). A DC-coupled output node is also compared with the distance to the highest
and lowest supply rail. The finding names the device (or node) and side that clip first, the
peak needed against the peak available, and the largest input amplitude that fits (measured:
the stated amplitude; limit: that largest amplitude). Diode-connected transistors are judged for
cutoff only; transistors meant to switch (specs.devices names another region) are not judged.
This is a small-signal estimate: it is exact for the onset of clipping in the linearised model,
and a real stage distorts somewhat before it.

Why it matters: a stage can meet its gain spec and still clip on the signal it is built for —
a gain of 55 fed 200 mV on a 12 V rail would need 11 V peak at its output.

How to fix: reduce the input amplitude or the gain, or re-bias the device named so that its
quiescent point sits in the middle of the swing it must make (for a common-emitter stage,
VCE − saturation edge ≈ IC·(RC ‖ RL)).`,
  check({ circuit, op }, report) {
    for (const spec of circuit.specs.gains) {
      const source = circuit.components.find((c) => c.id === spec.input);
      if (!source || (source.kind !== "voltage-source" && source.kind !== "current-source")) continue;
      const amplitude = source.signal;
      if (amplitude === undefined || !(amplitude > 0)) continue;
      const fit = swingLimits(circuit, op, spec);
      if (typeof fit === "string") {
        report.fail({ subject: spec.name, message: `the signal swing of gain \`${spec.name}\` could not be computed: ${fit}`, hint: "check the gain's small-signal network" });
        continue;
      }
      const first = fit.limits[0];
      if (!first || !Number.isFinite(first.maxInput)) {
        report.pass(spec.name);
        continue;
      }
      const check = { measured: amplitude, limit: first.maxInput, unit: fit.inputUnit, bound: "max" as const };
      if (amplitude <= first.maxInput) {
        report.pass(spec.name, check);
        continue;
      }
      report.fail({
        subject: spec.name,
        message: `gain \`${spec.name}\` clips at its stated ${formatQuantity(amplitude, fit.inputUnit)} peak input: ${describe(first, amplitude)}; the largest input that fits is ${formatQuantity(first.maxInput, fit.inputUnit)} peak`,
        hint: first.side === "cutoff" ? `raise ${first.subject}'s bias current or lower the gain or the input amplitude` : first.side.endsWith("rail") ? "lower the gain or the input amplitude, or centre the output's DC level between the rails" : `move ${first.subject}'s quiescent point away from the ${first.side} edge (more headroom), or lower the gain or the input amplitude`,
        pos: spec.pos,
        ...check,
      });
    }
  },
});
