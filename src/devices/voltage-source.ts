// Independent voltage source. Branch unknown j is the current through the source from plus to
// minus inside it (leaving node plus into the source), so the current delivered out of plus is −j.
import type { VoltageSource } from "../circuit/types.js";
import type { SourcePoint } from "../solve/types.js";
import { addA, addB, terminal, volt, type DeviceInstance, type SetupContext, type StampTarget } from "./device.js";

export function voltageSource(c: VoltageSource, ctx: SetupContext): DeviceInstance {
  const plus = terminal(ctx, "plus", c.pins.plus);
  const minus = terminal(ctx, "minus", c.pins.minus);
  const br = ctx.branch(c.id);
  const e = c.voltage.nominal;
  return {
    id: c.id,
    kind: c.kind,
    // Sensed current plus → minus through the source: the branch unknown itself.
    sensed: { kind: "branch", index: br },
    terminals: [plus, minus],
    nonlinear: false,
    dcLinks: [[plus, minus]],
    voltageLinks: [[plus, minus]],
    stampStatic(m: StampTarget) {
      addA(m, plus.index, br, 1);
      addA(m, minus.index, br, -1);
      addA(m, br, plus.index, 1);
      addA(m, br, minus.index, -1);
    },
    stampSource(b: Float64Array) {
      addB(b, br, e);
    },
    point(x): SourcePoint {
      const current = -x[br]!;
      const voltage = volt(x, plus.index) - volt(x, minus.index);
      return { current, voltage, power: voltage * current };
    },
  };
}
