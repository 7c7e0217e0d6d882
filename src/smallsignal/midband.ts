// The flat-band (midband) gain: coupling and bypass capacitors short, capacitors that set the
// upper band edge open. Which is which is decided by each capacitor's effect on the gain, not
// by its value or position: with the others as currently classified, a capacitor is left open
// when opening it gives a larger |gain| than shorting it (a load, cable, Miller or feedback
// capacitor), and shorted otherwise (a coupling or bypass capacitor, or one with no effect).
// The passes repeat until nothing changes, since one capacitor's class can hide another's
// (a coupling capacitor in front of a shorted load capacitor changes nothing at first).
// Device capacitances are always open here; the "every capacitor a short" figure is kept as
// the hand-analysis reference.

import { factorView, GROUND, type Reactive, type SmallSignalNetwork } from "./network.js";
import { inputShort, solveGain, type ResolvedGain } from "./probe.js";

/**
 * Two states whose |gain| differ by less than this (relative) are the same: the capacitor has
 * no effect and stays short, as in hand analysis. 1e-9 is far above rounding (~1e-15 per
 * solve on these small systems) and far below any effect a designer would read.
 */
const NO_EFFECT = 1e-9;
/** Classification passes: each settles at least one capacitor hidden by another; 6 covers chains far deeper than any stage. */
const MAX_PASSES = 6;

/** The signed midband gain with these capacitors open, or null when that view is singular or non-finite. */
export function midbandGain(net: SmallSignalNetwork, g: ResolvedGain, open?: Uint8Array): number | null {
  if (inputShort(net, g, open) !== null) return null;
  if (factorView(net, open ? { kind: "midband", open } : { kind: "midband" }) !== null) return null;
  const v = solveGain(net, g).re;
  return Number.isFinite(v) ? v : null;
}

/** Circuit capacitors whose state can matter at midband (not across an ideal source, not device capacitances). */
export function switchable(c: Reactive): boolean {
  return c.branch !== GROUND && !c.redundantShort && c.a !== c.b;
}

/** Marks (1) the capacitors left open at midband for this gain. */
export function classifyCapacitors(net: SmallSignalNetwork, g: ResolvedGain): Uint8Array {
  const open = new Uint8Array(net.capacitors.length);
  const candidates: number[] = [];
  net.capacitors.forEach((c, i) => {
    if (switchable(c)) candidates.push(i);
  });
  if (candidates.length === 0) return open;
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    let changed = false;
    let current = midbandGain(net, g, open);
    for (const i of candidates) {
      open[i] = open[i] === 1 ? 0 : 1;
      const toggled = midbandGain(net, g, open);
      open[i] = open[i] === 1 ? 0 : 1;
      const wasOpen = open[i] === 1;
      const whenOpen = wasOpen ? current : toggled;
      const whenShort = wasOpen ? toggled : current;
      const mOpen = whenOpen === null ? -1 : Math.abs(whenOpen);
      const mShort = whenShort === null ? -1 : Math.abs(whenShort);
      const wantOpen = mOpen > 0 && mOpen > mShort * (1 + NO_EFFECT);
      if (wantOpen !== wasOpen) {
        open[i] = wantOpen ? 1 : 0;
        current = wantOpen ? whenOpen : whenShort;
        changed = true;
      }
    }
    if (!changed) break;
  }
  return open;
}
