// Rule `device-current`: the current windows of specs.devices (collector, drain or diode
// current, in the device's normal direction).
import { defineRule } from "../src/review/rule.js";
import type { DevicePoint } from "../src/solve/types.js";
import { formatQuantity } from "../src/review/quantities.js";

/** The current a spec's window refers to: the device's main current in its normal direction. */
function mainCurrent(point: DevicePoint): { value: number; name: string } {
  switch (point.kind) {
    case "npn":
    case "pnp":
      return { value: point.collectorCurrent, name: "collector current" };
    case "nmos":
    case "pmos":
      return { value: point.drainCurrent, name: "drain current" };
    case "diode":
      return { value: point.current, name: "forward current" };
    case "capacitor":
      return { value: 0, name: "DC current" };
    default:
      return { value: Math.abs(point.current), name: "current" };
  }
}

export default defineRule({
  id: "device-current",
  description: "Checks that each device with a current window in specs.devices conducts within it",
  severity: "error",
  docs: `Checks every entry of specs.devices with minCurrent or maxCurrent: the collector current of
a BJT, the drain current of a MOSFET (both positive in normal operation for either polarity),
the forward current of a diode, or the magnitude of any other part's current must lie in the
window.

Why it matters: a transistor's gm, noise and speed follow its bias current; a window in the spec
records the current the design was analysed at.

How to fix: change the emitter (source) resistor or the bias network that sets the current.`,
  check({ circuit, op }, report) {
    for (const spec of circuit.specs.devices) {
      if (spec.minCurrent === undefined && spec.maxCurrent === undefined) continue;
      const point = op.devices[spec.device];
      if (!point) {
        report.fail({ subject: spec.device, message: `specs.devices names \`${spec.device}\`, which the solved circuit has no device for`, pos: spec.pos });
        continue;
      }
      const { value, name } = mainCurrent(point);
      if (spec.maxCurrent !== undefined) {
        const check = { measured: value, limit: spec.maxCurrent, unit: "A", bound: "max" as const };
        if (value <= spec.maxCurrent) report.pass(spec.device, check);
        else report.fail({ subject: spec.device, message: `${spec.device} ${name} is ${formatQuantity(value, "A")}, above its maximum of ${formatQuantity(spec.maxCurrent, "A")}`, hint: "raise the emitter (source) resistor or lower the bias voltage", ...check });
      }
      if (spec.minCurrent !== undefined) {
        const check = { measured: value, limit: spec.minCurrent, unit: "A", bound: "min" as const };
        if (value >= spec.minCurrent) report.pass(spec.device, check);
        else report.fail({ subject: spec.device, message: `${spec.device} ${name} is ${formatQuantity(value, "A")}, below its minimum of ${formatQuantity(spec.minCurrent, "A")}`, hint: "lower the emitter (source) resistor or raise the bias voltage", ...check });
      }
    }
  },
});
