// Independent current source: its dc current flows through it from `from` to `to`, i.e. it
// leaves node `from` and is delivered into node `to`.
import type { CurrentSource } from "../circuit/types.js";
import type { SourcePoint } from "../solve/types.js";
import { addB, terminal, volt, type DeviceInstance, type SetupContext } from "./device.js";

export function currentSource(c: CurrentSource, ctx: SetupContext): DeviceInstance {
  const from = terminal(ctx, "from", c.pins.from);
  const to = terminal(ctx, "to", c.pins.to);
  const i = c.current.nominal;
  return {
    id: c.id,
    kind: c.kind,
    terminals: [from, to],
    nonlinear: false,
    dcLinks: [],
    voltageLinks: [],
    sensed: { kind: "constant", current: i },
    stampSource(b: Float64Array) {
      // KCL rows are currents leaving a node: +i leaves `from`, −i leaves `to`; moved to the RHS.
      addB(b, from.index, -i);
      addB(b, to.index, i);
    },
    point(x): SourcePoint {
      const voltage = volt(x, to.index) - volt(x, from.index);
      return { current: i, voltage, power: voltage * i };
    },
  };
}
