// Rule `region`: every transistor sits in the region its spec names, or in the amplifying
// region (BJT active, MOSFET saturation) when the spec names none.
import { defineRule } from "../src/review/rule.js";
import type { BjtPoint, MosPoint } from "../src/solve/types.js";
import type { Bjt, Mosfet } from "../src/circuit/types.js";
import { intendedRegion, isTransistorKind, regionMargin, REGIONS } from "../src/review/quantities.js";

export default defineRule({
  id: "region",
  description: "Checks that each transistor is in the region its spec names, or in its amplifying region",
  severity: "error",
  docs: `Checks the operating region of every BJT and MOSFET at the solved bias point against the
region given in specs.devices (active, saturation, cutoff or reverse for a BJT; saturation,
triode or cutoff for a MOSFET). With no region given, a BJT must be active and a MOSFET in
saturation: the regions in which a stage amplifies. Regions are judged on polarity-normalised
voltages, so PNP and PMOS are judged exactly like NPN and NMOS.

Why it matters: a transistor in the wrong region turns the small-signal results into fiction —
a saturated BJT has no useful gain, a MOSFET in triode is a resistor.

How to fix: re-bias the stage (divider, emitter/source resistor, load), or, if the device is
meant to switch, name its region in specs.devices.`,
  check({ circuit, op }, report) {
    for (const c of circuit.components) {
      if (!isTransistorKind(c.kind)) continue;
      const point = op.devices[c.id];
      if (!point || !("region" in point)) continue;
      const wanted = intendedRegion(circuit, c.id, c.kind);
      const spec = circuit.specs.devices.find((d) => d.device === c.id);
      if (!REGIONS[c.kind].includes(wanted)) {
        report.fail({
          subject: c.id,
          message: `specs.devices names region \`${wanted}\` for ${c.id}, which is not a region of a ${c.kind}`,
          hint: `use one of: ${REGIONS[c.kind].join(", ")}`,
          ...(spec ? { pos: spec.pos } : {}),
        });
      } else {
        const model = circuit.models.get((c as Bjt | Mosfet).model);
        const edge = model && (model.kind === "npn" || model.kind === "pnp") ? model.saturationEdge : 0;
        const margin = regionMargin(point as BjtPoint | MosPoint, wanted, edge);
        // Signed distance into the wanted region (V), bounded below by 0: the worst scenario of a
        // region finding is the one deepest outside, not the first one found.
        const check = margin === null ? {} : { measured: margin, limit: 0, unit: "V", bound: "min" as const };
        if (point.region === wanted) {
          report.pass(c.id, check);
          continue;
        }
        report.fail({
          subject: c.id,
          message: `${c.id} (${c.kind}) is in ${point.region}, expected ${wanted}${spec?.region ? " (specs.devices)" : " (its amplifying region)"}`,
          hint: wanted === REGIONS[c.kind][0] ? "re-bias the stage so that it amplifies, or name the intended region in specs.devices" : "re-bias the device into the region its spec names",
          ...check,
        });
      }
    }
  },
});
