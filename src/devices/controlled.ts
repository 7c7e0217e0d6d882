// Controlled sources (conventions of src/circuit/types.ts). Voltage-output kinds get a branch
// unknown j (current plus → minus inside the source, like an independent voltage source);
// current-output kinds deliver their current into node `plus` and take it back from `minus`.
// A current-controlled kind reads the branch unknown of the voltage source it names: the
// controlling current, delivered out of that source's plus pin, is −j(control).
import type { CurrentControlled, VoltageControlled } from "../circuit/types.js";
import type { ControlledPoint } from "../solve/types.js";
import { addA, terminal, volt, type BindContext, type DeviceInstance, type SetupContext, type StampTarget } from "./device.js";

export function voltageControlled(c: VoltageControlled, ctx: SetupContext): DeviceInstance {
  const plus = terminal(ctx, "plus", c.pins.plus);
  const minus = terminal(ctx, "minus", c.pins.minus);
  const cp = terminal(ctx, "controlPlus", c.pins.controlPlus);
  const cm = terminal(ctx, "controlMinus", c.pins.controlMinus);
  const gain = c.gain;
  if (c.kind === "vcvs") {
    const br = ctx.branch(c.id);
    return {
      id: c.id,
      kind: c.kind,
      terminals: [plus, minus, cp, cm],
      nonlinear: false,
      dcLinks: [[plus, minus]],
      voltageLinks: [[plus, minus]],
      stampStatic(m: StampTarget) {
        addA(m, plus.index, br, 1);
        addA(m, minus.index, br, -1);
        // V(plus) − V(minus) − gain·(V(cp) − V(cm)) = 0
        addA(m, br, plus.index, 1);
        addA(m, br, minus.index, -1);
        addA(m, br, cp.index, -gain);
        addA(m, br, cm.index, gain);
      },
      point(x): ControlledPoint {
        const current = -x[br]!;
        const voltage = volt(x, plus.index) - volt(x, minus.index);
        return { kind: c.kind, current, voltage, power: voltage * current };
      },
    };
  }
  return {
    id: c.id,
    kind: c.kind,
    terminals: [plus, minus, cp, cm],
    nonlinear: false,
    dcLinks: [],
    voltageLinks: [],
    stampStatic(m: StampTarget) {
      // gain·Vc enters node plus (leaves it as −gain·Vc) and leaves node minus.
      addA(m, plus.index, cp.index, -gain);
      addA(m, plus.index, cm.index, gain);
      addA(m, minus.index, cp.index, gain);
      addA(m, minus.index, cm.index, -gain);
    },
    point(x): ControlledPoint {
      const current = gain * (volt(x, cp.index) - volt(x, cm.index));
      const voltage = volt(x, plus.index) - volt(x, minus.index);
      return { kind: c.kind, current, voltage, power: voltage * current };
    },
  };
}

export function currentControlled(c: CurrentControlled, ctx: SetupContext): DeviceInstance {
  const plus = terminal(ctx, "plus", c.pins.plus);
  const minus = terminal(ctx, "minus", c.pins.minus);
  const gain = c.gain;
  const br = c.kind === "ccvs" ? ctx.branch(c.id) : -1;
  let ctrl = -1;
  const bind = (b: BindContext): string | undefined => {
    const j = b.voltageSourceBranch(c.control);
    if (j === undefined) return `${c.kind} ${c.id} is controlled by \`${c.control}\`, which is not a voltage source in this circuit`;
    ctrl = j;
    return undefined;
  };
  if (c.kind === "ccvs") {
    return {
      id: c.id,
      kind: c.kind,
      terminals: [plus, minus],
      nonlinear: false,
      dcLinks: [[plus, minus]],
      voltageLinks: [[plus, minus]],
      bind,
      stampStatic(m: StampTarget) {
        addA(m, plus.index, br, 1);
        addA(m, minus.index, br, -1);
        // V(plus) − V(minus) − gain·(−j_ctrl) = 0
        addA(m, br, plus.index, 1);
        addA(m, br, minus.index, -1);
        addA(m, br, ctrl, gain);
      },
      point(x): ControlledPoint {
        const current = -x[br]!;
        const voltage = volt(x, plus.index) - volt(x, minus.index);
        return { kind: c.kind, current, voltage, power: voltage * current };
      },
    };
  }
  return {
    id: c.id,
    kind: c.kind,
    terminals: [plus, minus],
    nonlinear: false,
    dcLinks: [],
    voltageLinks: [],
    bind,
    stampStatic(m: StampTarget) {
      // Output gain·(−j_ctrl) enters node plus: the current leaving plus is gain·j_ctrl.
      addA(m, plus.index, ctrl, gain);
      addA(m, minus.index, ctrl, -gain);
    },
    point(x): ControlledPoint {
      const current = -gain * x[ctrl]!;
      const voltage = volt(x, plus.index) - volt(x, minus.index);
      return { kind: c.kind, current, voltage, power: voltage * current };
    },
  };
}
