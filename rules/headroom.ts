// Rule `headroom`: transistors meant to amplify keep a margin from the edge of saturation
// (BJT) or of the triode region (MOSFET). Reads the polarity-normalised headroom, so PNP and
// PMOS are judged exactly like NPN and NMOS.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity, intendedRegion, isDiodeConnected } from "../src/review/quantities.js";

export default defineRule({
  id: "headroom",
  description: "Checks that amplifying transistors keep a voltage margin from the saturation or triode edge",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice: keep a BJT's VCE at least 0.5–1 V beyond the saturation edge so that
      // signal swing, tolerances and temperature do not push it into saturation; 0.5 V is the
      // least a careful reviewer accepts for a small-signal stage.
      bjt: { type: "number", minimum: 0, default: 0.5, description: "Minimum |VCE| − saturationEdge of a BJT, V" },
      // Common practice: a few hundred millivolts of |VDS| beyond |Vov| for a MOSFET in saturation.
      mos: { type: "number", minimum: 0, default: 0.3, description: "Minimum |VDS| − |Vov| of a MOSFET, V" },
    },
  },
  circuitOptions: ["bjt", "mos"],
  docs: `Checks every BJT meant to be in the active region and every MOSFET meant to be in
saturation (the region named in specs.devices, or the amplifying region by default) for
headroom: the polarity-normalised distance to the edge where it stops amplifying
(BJT: |VCE| − saturationEdge of its model; MOSFET: |VDS| − |Vov|). Diode-connected
transistors (collector tied to base, drain tied to gate: the reference side of a current
mirror, a bias chain) are not judged: they sit at VCB = 0 or VDS = VGS by construction.

Why it matters: a stage biased close to the edge clips on the first large signal and slides
into saturation at a supply, tolerance or temperature corner; its gain and output swing are
then not what the hand analysis promised.

How to fix: move the quiescent collector (drain) voltage away from the rail it approaches —
change the load or emitter (source) resistor, or the bias divider — or, if the stage is
really a switch, name its region in specs.devices.

Options: \`bjt\` (V, default 0.5) and \`mos\` (V, default 0.3); a circuit file may override both.`,
  check({ circuit, op, options }, report) {
    for (const c of circuit.components) {
      if (c.kind !== "npn" && c.kind !== "pnp" && c.kind !== "nmos" && c.kind !== "pmos") continue;
      const point = op.devices[c.id];
      if (!point || (point.kind !== "npn" && point.kind !== "pnp" && point.kind !== "nmos" && point.kind !== "pmos")) continue;
      const isBjt = point.kind === "npn" || point.kind === "pnp";
      // A diode-connected transistor (collector tied to base, drain to gate) sits at VCB = 0 or
      // VDS = VGS by construction: it cannot saturate in the amplifier's sense, so it is not judged.
      if (isDiodeConnected(c)) continue;
      const wanted = intendedRegion(circuit, c.id, c.kind);
      if (wanted !== (isBjt ? "active" : "saturation")) continue;
      const limit = isBjt ? options.bjt : options.mos;
      const check = { measured: point.headroom, limit, unit: "V", bound: "min" as const };
      if (point.headroom >= limit) {
        report.pass(c.id, check);
        continue;
      }
      const edge = isBjt ? "saturation edge" : "triode edge (|VDS| = |Vov|)";
      report.fail({
        subject: c.id,
        message: `${c.id} (${c.kind}) has ${formatQuantity(point.headroom, "V")} of headroom to the ${edge}; at least ${formatQuantity(limit, "V")} is required`,
        hint: isBjt
          ? "raise |VCE|: reduce the collector resistor, reduce the bias current (less base drive or a larger emitter resistor), or raise the supply"
          : "raise |VDS| or lower |Vov|: reduce the drain resistor, reduce the bias current (less gate drive |VGS| or a larger source resistor), or raise the supply",
        ...check,
      });
    }
  },
});
