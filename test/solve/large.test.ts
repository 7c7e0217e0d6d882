// Circuits large enough (from PATTERN_RESTORE_MIN_UNKNOWNS on) that the Newton loop restores only
// the stamp pattern of its matrix between passes and the LU follows a stored structure: the
// answer must still satisfy KCL from the reported currents (an outside check, independent of the
// solver's matrices) and must not depend on what an earlier solve left in the scratch memory.
import { describe, expect, it } from "vitest";
import type { Circuit } from "../../src/circuit/types.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import { PATTERN_RESTORE_MIN_UNKNOWNS } from "../../src/solve/newton.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { prng } from "./generate.js";
import { kclError } from "./kcl.js";

/** A chain of divider-biased BJT and NMOS stages (a sensor front end), DC-coupled stage to stage. */
function longChain(stages: number, seed: number): Circuit {
  const rnd = prng(seed);
  const vary = (v: number): number => v * (0.8 + 0.4 * rnd());
  const b = circuit()
    .bjtModel("qm", "npn", { beta: 80 + 200 * rnd(), earlyVoltage: 60 + 60 * rnd() })
    .mosModel("mm", "nmos", { threshold: 0.7 + 0.5 * rnd(), kPrime: 120e-6, width: 20e-6, length: 1e-6, lambda: 0.02 })
    .v("VCC", "vcc", "gnd", 9 + 6 * rnd());
  for (let i = 0; i < stages; i++) {
    b.r(`RT${i}`, "vcc", `b${i}`, vary(82e3));
    b.r(`RB${i}`, `b${i}`, "gnd", vary(22e3));
    b.r(`RL${i}`, "vcc", `c${i}`, vary(4.7e3));
    b.r(`RS${i}`, `e${i}`, "gnd", vary(1e3));
    if (i > 0) b.r(`RK${i}`, `c${i - 1}`, `b${i}`, vary(470e3));
    if (rnd() < 0.5) b.q(`Q${i}`, "npn", `c${i}`, `b${i}`, `e${i}`, "qm");
    else b.m(`M${i}`, "nmos", `c${i}`, `b${i}`, `e${i}`, "mm");
  }
  return b.build();
}

function solved(r: SolveResult, what: string): OperatingPoint {
  if (!r.ok) throw new Error(`${what}: ${r.reason}`);
  return r;
}

describe(`circuits of ${PATTERN_RESTORE_MIN_UNKNOWNS} unknowns and more`, () => {
  // Dense storage is forced as well: from SPARSE_MIN_UNKNOWNS the default is sparse, and the
  // dense path's pattern restore must stay exercised.
  it.each(["auto", "dense"] as const)("satisfy KCL to 1e-9 A and re-solve bit-identically after another circuit of the same size (%s storage)", (storage) => {
    // 3 unknowns per stage plus the rail and the source branch.
    const stages = Math.ceil(PATTERN_RESTORE_MIN_UNKNOWNS / 3) + 3;
    for (let seed = 1; seed <= 12; seed++) {
      const c = longChain(stages, seed);
      const op = solved(solveOperatingPoint(c, { storage }), `seed ${seed}`);
      expect(Object.keys(op.nodes).length + 1).toBeGreaterThanOrEqual(PATTERN_RESTORE_MIN_UNKNOWNS);
      const k = kclError(c, op);
      expect(k.worst, `seed ${seed} node ${k.node}`).toBeLessThan(1e-9);
      solved(solveOperatingPoint(longChain(stages, seed + 100), { storage }), `seed ${seed + 100}`);
      expect(JSON.stringify(solveOperatingPoint(c, { storage }))).toBe(JSON.stringify(op));
    }
  });

  it("gmin and source stepping reach the same point (1e-9 relative) on a large chain", () => {
    const c = longChain(Math.ceil(PATTERN_RESTORE_MIN_UNKNOWNS / 3) + 10, 7);
    const plain = solved(solveOperatingPoint(c), "plain");
    for (const aid of ["conductance-stepping", "source-stepping"] as const) {
      const op = solved(solveOperatingPoint(c, { startWith: aid }), aid);
      expect(op.stats.aid).toBe(aid);
      expect(kclError(c, op).worst).toBeLessThan(1e-9);
      for (const [node, v] of Object.entries(plain.nodes)) expect(Math.abs(op.nodes[node]! - v), `${aid} ${node}`).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(v)));
    }
  });
});
