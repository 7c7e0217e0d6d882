// Capacitor: open at DC; it only reports the voltage across it.
import type { Capacitor } from "../circuit/types.js";
import type { CapacitorPoint } from "../solve/types.js";
import { terminal, volt, type DeviceInstance, type SetupContext } from "./device.js";

export function capacitor(c: Capacitor, ctx: SetupContext): DeviceInstance {
  const a = terminal(ctx, "a", c.pins.a);
  const b = terminal(ctx, "b", c.pins.b);
  return {
    id: c.id,
    kind: c.kind,
    terminals: [a, b],
    nonlinear: false,
    dcLinks: [],
    voltageLinks: [],
    sensed: { kind: "none" }, // open at DC: no current
    point(x): CapacitorPoint {
      return { kind: "capacitor", voltage: volt(x, a.index) - volt(x, b.index) };
    },
  };
}
