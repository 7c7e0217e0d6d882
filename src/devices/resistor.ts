// Resistor: a constant conductance between its two pins.
import type { Resistor } from "../circuit/types.js";
import type { ResistorPoint } from "../solve/types.js";
import { DeviceSetupError, NO_LINKS, stampConductance, terminal, volt, type DeviceInstance, type SensedCurrent, type SetupContext, type StampTarget, type Terminal } from "./device.js";

/**
 * A class, not an object of closures: a plan builds one per resistor on every solve, and
 * shared prototype methods make that a single small allocation.
 */
class ResistorInstance implements DeviceInstance {
  readonly kind = "resistor" as const;
  readonly nonlinear = false;
  readonly terminals: readonly Terminal[];
  readonly dcLinks: readonly (readonly [Terminal, Terminal])[];
  readonly voltageLinks = NO_LINKS;
  constructor(
    readonly id: string,
    private readonly a: Terminal,
    private readonly b: Terminal,
    private readonly g: number,
  ) {
    // One array serves as the pin list and as the single DC link.
    const pins: readonly [Terminal, Terminal] = [a, b];
    this.terminals = pins;
    this.dcLinks = [pins];
  }
  /** A getter, so a plan that senses no resistor allocates nothing for it. */
  get sensed(): SensedCurrent {
    return { kind: "conductance", a: this.a.index, b: this.b.index, g: this.g };
  }
  stampStatic(m: StampTarget): void {
    stampConductance(m, this.a.index, this.b.index, this.g);
  }
  point(x: Float64Array): ResistorPoint {
    const voltage = volt(x, this.a.index) - volt(x, this.b.index);
    const current = voltage * this.g;
    return { kind: "resistor", current, voltage, power: voltage * current };
  }
}

export function resistor(c: Resistor, ctx: SetupContext): DeviceInstance {
  const a = terminal(ctx, "a", c.pins.a);
  const b = terminal(ctx, "b", c.pins.b);
  const r = c.value.nominal;
  if (!(r > 0) || !Number.isFinite(r)) {
    throw new DeviceSetupError(`resistor ${c.id} has value ${r} Ω; the DC solve needs a positive, finite resistance`, [c.id]);
  }
  return new ResistorInstance(c.id, a, b, 1 / r);
}
