// Kirchhoff's current law checked from the reported operating point alone (device currents and
// source currents), independently of the solver's matrices.
import type { Circuit } from "../../src/circuit/types.js";
import type { OperatingPoint } from "../../src/solve/types.js";

/** Largest |Σ currents into the node| over every non-ground node, A. */
export function kclError(c: Circuit, op: OperatingPoint): { worst: number; node: string } {
  const sum = new Map<string, number>();
  const add = (node: string, into: number): void => {
    sum.set(node, (sum.get(node) ?? 0) + into);
  };
  for (const comp of c.components) {
    const src = op.sources[comp.id];
    const dev = op.devices[comp.id];
    switch (comp.kind) {
      case "voltage-source":
        add(comp.pins.plus, src!.current);
        add(comp.pins.minus, -src!.current);
        break;
      case "current-source":
        add(comp.pins.to, src!.current);
        add(comp.pins.from, -src!.current);
        break;
      case "resistor":
      case "inductor": {
        const d = dev as { current: number };
        add(comp.pins.a, -d.current);
        add(comp.pins.b, d.current);
        break;
      }
      case "capacitor":
        break;
      case "diode": {
        const d = dev as { current: number };
        add(comp.pins.anode, -d.current);
        add(comp.pins.cathode, d.current);
        break;
      }
      case "npn":
      case "pnp": {
        const d = dev as { collectorCurrent: number; baseCurrent: number; emitterCurrent: number };
        const p = comp.kind === "npn" ? 1 : -1;
        add(comp.pins.collector, -p * d.collectorCurrent);
        add(comp.pins.base, -p * d.baseCurrent);
        add(comp.pins.emitter, p * d.emitterCurrent);
        break;
      }
      case "nmos":
      case "pmos": {
        const d = dev as { drainCurrent: number };
        const p = comp.kind === "nmos" ? 1 : -1;
        add(comp.pins.drain, -p * d.drainCurrent);
        add(comp.pins.source, p * d.drainCurrent);
        break;
      }
      default: {
        const d = dev as { current: number };
        add(comp.pins.plus, d.current);
        add(comp.pins.minus, -d.current);
      }
    }
  }
  let worst = 0;
  let node = "";
  for (const [n, s] of sum) {
    if (n === c.ground) continue;
    if (Math.abs(s) > worst) {
      worst = Math.abs(s);
      node = n;
    }
  }
  return { worst, node };
}
