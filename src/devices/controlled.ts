// Controlled sources (conventions of src/circuit/types.ts). Voltage-output kinds get a branch
// unknown j (current plus → minus inside the source, like an independent voltage source);
// current-output kinds deliver their current into node `plus` and take it back from `minus`.
// A current-controlled kind senses the current through the two-terminal part named by `sense`,
// from its first pin to its second: V/R of a resistor, the branch unknown of an inductor or a
// voltage source, the value of a current source, nothing through a capacitor (open at DC).
import type { CurrentControlled, VoltageControlled } from "../circuit/types.js";
import type { ControlledPoint } from "../solve/types.js";
import { SENSED_KINDS_TEXT } from "../circuit/sense.js";
import { addA, addB, terminal, volt, type BindContext, type SensedCurrent, type DeviceInstance, type SetupContext, type StampTarget } from "./device.js";

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
  let sensed: SensedCurrent = { kind: "none" };
  /** The sensed current at x (constant kinds at full source value). */
  const sensedAt = (x: Float64Array): number => {
    switch (sensed.kind) {
      case "conductance":
        return sensed.g * (volt(x, sensed.a) - volt(x, sensed.b));
      case "branch":
        return x[sensed.index]!;
      case "constant":
        return sensed.current;
      case "none":
        return 0;
    }
  };
  const base = {
    id: c.id,
    kind: c.kind,
    terminals: [plus, minus],
    nonlinear: false,
    bind(b: BindContext): string | undefined {
      const s = b.sensedCurrent(c.sense);
      if (s === undefined) return `${c.kind} ${c.id} senses \`${c.sense}\`, which is not a ${SENSED_KINDS_TEXT} in this circuit`;
      sensed = s;
      return undefined;
    },
  } as const;
  if (c.kind === "ccvs") {
    return {
      ...base,
      dcLinks: [[plus, minus]],
      voltageLinks: [[plus, minus]],
      stampStatic(m: StampTarget) {
        addA(m, plus.index, br, 1);
        addA(m, minus.index, br, -1);
        // V(plus) − V(minus) − gain·I = 0
        addA(m, br, plus.index, 1);
        addA(m, br, minus.index, -1);
        if (sensed.kind === "conductance") {
          addA(m, br, sensed.a, -gain * sensed.g);
          addA(m, br, sensed.b, gain * sensed.g);
        } else if (sensed.kind === "branch") addA(m, br, sensed.index, -gain);
      },
      stampSource(b: Float64Array) {
        // A sensed current source: V(plus) − V(minus) = gain·I, I scaled with the other sources.
        if (sensed.kind === "constant") addB(b, br, gain * sensed.current);
      },
      point(x): ControlledPoint {
        const current = -x[br]!;
        const voltage = volt(x, plus.index) - volt(x, minus.index);
        return { kind: c.kind, current, voltage, power: voltage * current };
      },
    };
  }
  return {
    ...base,
    dcLinks: [],
    voltageLinks: [],
    stampStatic(m: StampTarget) {
      // gain·I enters node plus (a current −gain·I leaving it) and leaves node minus.
      if (sensed.kind === "conductance") {
        const k = gain * sensed.g;
        addA(m, plus.index, sensed.a, -k);
        addA(m, plus.index, sensed.b, k);
        addA(m, minus.index, sensed.a, k);
        addA(m, minus.index, sensed.b, -k);
      } else if (sensed.kind === "branch") {
        addA(m, plus.index, sensed.index, -gain);
        addA(m, minus.index, sensed.index, gain);
      }
    },
    stampSource(b: Float64Array) {
      if (sensed.kind === "constant") {
        addB(b, plus.index, gain * sensed.current);
        addB(b, minus.index, -gain * sensed.current);
      }
    },
    point(x): ControlledPoint {
      const current = gain * sensedAt(x);
      const voltage = volt(x, plus.index) - volt(x, minus.index);
      return { kind: c.kind, current, voltage, power: voltage * current };
    },
  };
}
