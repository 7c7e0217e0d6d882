// Resistor: a constant conductance between its two pins.
import type { Resistor } from "../circuit/types.js";
import type { ResistorPoint } from "../solve/types.js";
import { DeviceSetupError, stampConductance, terminal, volt, type DeviceInstance, type SetupContext, type StampTarget } from "./device.js";

export function resistor(c: Resistor, ctx: SetupContext): DeviceInstance {
  const a = terminal(ctx, "a", c.pins.a);
  const b = terminal(ctx, "b", c.pins.b);
  const r = c.value.nominal;
  if (!(r > 0) || !Number.isFinite(r)) {
    throw new DeviceSetupError(`resistor ${c.id} has value ${r} Ω; the DC solve needs a positive, finite resistance`, [c.id]);
  }
  const g = 1 / r;
  return {
    id: c.id,
    kind: c.kind,
    terminals: [a, b],
    nonlinear: false,
    dcLinks: [[a, b]],
    voltageLinks: [],
    stampStatic(m: StampTarget) {
      stampConductance(m, a.index, b.index, g);
    },
    point(x): ResistorPoint {
      const voltage = volt(x, a.index) - volt(x, b.index);
      const current = voltage * g;
      return { kind: "resistor", current, voltage, power: voltage * current };
    },
  };
}
