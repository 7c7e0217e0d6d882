// A seeded generator of random bias circuits (chains of BJT and MOS stages with resistor
// bias, diodes, mirrors and pairs) and their polarity mirror image, for property tests.
import type { Circuit } from "../../src/circuit/types.js";
import { seededRandom } from "../../src/variation/random.js";
import { circuit } from "./build.js";

/** The project's seeded generator (mulberry32), so every run sees the same circuits. */
export const prng = seededRandom;

/**
 * Random bias circuit; with `mirrored`, the same circuit with every device and source flipped.
 * A diode's series resistance sits on its anode side, so a flipped diode with series resistance
 * is not the exact mirror of the original (the resistance changes ends); `seriesResistance`
 * false leaves it out for the mirror property.
 */
export function randomBiasCircuit(seed: number, mirrored: boolean, seriesResistance = true): Circuit {
  const rnd = prng(seed);
  const logU = (lo: number, hi: number): number => lo * Math.pow(hi / lo, rnd());
  const s = mirrored ? -1 : 1;
  const bjtKind = mirrored ? "pnp" : "npn";
  const mosKind = mirrored ? "pmos" : "nmos";
  const vcc = 3 + 12 * rnd();
  const b = circuit()
    .bjtModel("qm", bjtKind, { beta: 50 + 250 * rnd(), saturationCurrent: logU(1e-16, 1e-13), earlyVoltage: rnd() < 0.5 ? Infinity : 20 + 100 * rnd(), reverseBeta: 1 + 4 * rnd() })
    .mosModel("mm", mosKind, { threshold: s * (0.4 + 1.2 * rnd()), kPrime: logU(20e-6, 400e-6), width: logU(1e-6, 50e-6), length: 1e-6, lambda: rnd() < 0.5 ? 0 : 0.1 * rnd(), bodyEffect: rnd() < 0.5 ? 0 : 0.6 * rnd() })
    .diodeModel("dm", { saturationCurrent: logU(1e-15, 1e-9), ideality: 1 + rnd(), seriesResistance: rnd() < 0.5 || !seriesResistance ? 0 : 10 * rnd() })
    .v("VCC", "vcc", "gnd", s * vcc);
  const diode = (id: string, anode: string, cathode: string): void => {
    if (mirrored) b.d(id, cathode, anode, "dm");
    else b.d(id, anode, cathode, "dm");
  };
  const stages = 1 + Math.floor(rnd() * 5);
  let prev: string | undefined;
  for (let k = 0; k < stages; k++) {
    const inp = `in${k}`;
    const out = `out${k}`;
    const low = `low${k}`;
    if (prev !== undefined && rnd() < 0.5) {
      b.r(`RC${k}`, prev, inp, logU(100, 10e3));
    } else {
      b.r(`RT${k}`, "vcc", inp, logU(10e3, 470e3));
    }
    b.r(`RB${k}`, inp, "gnd", logU(10e3, 470e3));
    b.r(`RL${k}`, "vcc", out, logU(470, 47e3));
    const pick = rnd();
    if (pick < 0.35) {
      b.q(`Q${k}`, bjtKind, out, inp, low, "qm");
      b.r(`RE${k}`, low, "gnd", logU(100, 10e3));
    } else if (pick < 0.6) {
      b.m(`M${k}`, mosKind, out, inp, low, "mm", rnd() < 0.5 ? undefined : "gnd");
      b.r(`RS${k}`, low, "gnd", logU(100, 10e3));
    } else if (pick < 0.75) {
      // Current mirror fed from this stage's input node.
      b.q(`QA${k}`, bjtKind, inp, inp, "gnd", "qm");
      b.q(`QB${k}`, bjtKind, out, inp, "gnd", "qm");
    } else if (pick < 0.9) {
      // Differential pair with a resistor tail and a diode-referenced second input.
      b.q(`QP${k}`, bjtKind, out, inp, low, "qm");
      b.q(`QN${k}`, bjtKind, "vcc", `ref${k}`, low, "qm");
      b.r(`RR${k}`, "vcc", `ref${k}`, logU(10e3, 100e3));
      diode(`DR${k}`, `ref${k}`, `refl${k}`);
      b.r(`RRL${k}`, `refl${k}`, "gnd", logU(10e3, 100e3));
      b.r(`RTL${k}`, low, "gnd", logU(1e3, 10e3));
    } else {
      // Diode stack from the output to ground.
      diode(`DA${k}`, out, low);
      diode(`DB${k}`, low, "gnd");
    }
    if (rnd() < 0.3) b.i(`I${k}`, out, "gnd", s * logU(1e-6, 1e-3));
    prev = out;
  }
  return b.build();
}
