// Inductor: a short at DC through its winding resistance. It gets a branch-current unknown
// j (from pin a to pin b) with the branch equation V(a) − V(b) − Rs·j = 0, so a zero-resistance
// winding is an exact short rather than a huge conductance.
import type { Inductor } from "../circuit/types.js";
import type { InductorPoint } from "../solve/types.js";
import { addA, terminal, volt, type DeviceInstance, type SetupContext, type StampTarget } from "./device.js";

export function inductor(c: Inductor, ctx: SetupContext): DeviceInstance {
  const a = terminal(ctx, "a", c.pins.a);
  const b = terminal(ctx, "b", c.pins.b);
  const br = ctx.branch(c.id);
  const rs = c.seriesResistance;
  return {
    id: c.id,
    kind: c.kind,
    terminals: [a, b],
    nonlinear: false,
    dcLinks: [[a, b]],
    voltageLinks: rs === 0 ? [[a, b]] : [],
    sensed: { kind: "branch", index: br },
    stampStatic(m: StampTarget) {
      addA(m, a.index, br, 1);
      addA(m, b.index, br, -1);
      addA(m, br, a.index, 1);
      addA(m, br, b.index, -1);
      addA(m, br, br, -rs);
    },
    point(x): InductorPoint {
      const current = x[br]!;
      const voltage = volt(x, a.index) - volt(x, b.index);
      return { kind: "inductor", current, voltage, power: voltage * current };
    },
  };
}
