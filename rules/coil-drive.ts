// Rule `coil-drive`: a relay or solenoid coil (a resistor marked `role: coil`) gets at least the
// current and voltage its datasheet says it needs to operate for sure, with the coil's copper
// warmed to the scenario's ambient.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity, toCelsius } from "../src/review/quantities.js";

export default defineRule({
  id: "coil-drive",
  description: "Checks that each relay or solenoid coil gets its must-operate current and voltage",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Temperature coefficient of resistance of annealed copper, 0.393 %/K near 20 °C (IEC 60028,
      // the international standard of resistance for copper; value from memory). A coil's
      // resistance follows it, so a hot coil draws less current from the same voltage.
      copperTempco: { type: "number", minimum: 0, default: 0.00393, description: "Relative change of the coil's resistance per kelvin (copper: 0.00393)" },
      // Relay datasheets commonly state coil data at 23 °C (common practice; from memory).
      datasheetTemperatureC: { type: "number", default: 23, description: "Ambient (°C) at which the coil's resistance and must-operate values are stated" },
    },
  },
  docs: `Checks every resistor marked \`role: coil\` that states \`mustOperateCurrent\` and/or
\`mustOperateVoltage\` (the values its datasheet guarantees the relay or solenoid operates at):
the DC current through the coil must be at least mustOperateCurrent, and the voltage across it
at least mustOperateVoltage — both with the coil at the scenario's ambient. The file gives the
coil's resistance at the datasheet temperature; at ambient T the copper's resistance is
k = 1 + copperTempco·(T − datasheetTemperatureC) times that, so the current the circuit pushes
through the warm coil is I/k and the voltage it needs is k·mustOperateVoltage (the coil needs a
fixed current, its ampere-turns, to pull in).

Why it matters: a relay driver that is marginal at room temperature fails to pull in at the
hot corner or with a low supply, and the relay chatters or never closes.

How to fix: raise the drive (a lower series resistance, a transistor driven harder into
saturation, a higher supply), or choose a coil with a lower must-operate voltage.

Options: \`copperTempco\` (default 0.00393 per K, copper), \`datasheetTemperatureC\` (23 °C).`,
  check({ circuit, op, options }, report) {
    const warm = 1 + options.copperTempco * (toCelsius(circuit.temperature) - options.datasheetTemperatureC);
    const at = `at ${toCelsius(circuit.temperature).toFixed(0)} °C ambient`;
    for (const c of circuit.components) {
      if (c.kind !== "resistor" || c.role !== "coil") continue;
      const point = op.devices[c.id];
      if (!point || point.kind !== "resistor") continue;
      if (c.mustOperateCurrent !== undefined) {
        const current = Math.abs(point.current) / warm;
        const check = { measured: current, limit: c.mustOperateCurrent, unit: "A", bound: "min" as const };
        if (current >= c.mustOperateCurrent) report.pass(c.id, check);
        else
          report.fail({
            subject: c.id,
            message: `coil ${c.id} carries ${formatQuantity(current, "A")} ${at}; it needs ${formatQuantity(c.mustOperateCurrent, "A")} to operate for sure`,
            hint: "drive the coil harder (less series resistance, a driver further into saturation, a higher supply) or use a coil with a lower must-operate value",
            ...check,
          });
      }
      if (c.mustOperateVoltage !== undefined) {
        const needed = c.mustOperateVoltage * warm;
        const voltage = Math.abs(point.voltage);
        const check = { measured: voltage, limit: needed, unit: "V", bound: "min" as const };
        if (voltage >= needed) report.pass(c.id, check);
        else
          report.fail({
            subject: c.id,
            message: `coil ${c.id} has ${formatQuantity(voltage, "V")} across it ${at}; it needs ${formatQuantity(needed, "V")} there (must-operate ${formatQuantity(c.mustOperateVoltage, "V")} at ${options.datasheetTemperatureC} °C, copper warmer by ${((warm - 1) * 100).toFixed(1)}%)`,
            hint: "drive the coil harder (less series resistance, a driver further into saturation, a higher supply) or use a coil with a lower must-operate voltage",
            ...check,
          });
      }
    }
  },
});
