// Newton aids inside one iteration: limit how far a device's controlling voltages may move,
// so that exp() in a pn junction is never evaluated far beyond the last trusted point and a
// MOS square law does not swing wildly between regions.

/**
 * Critical voltage of a pn junction: above it the exponential is steep enough that a full
 * Newton step is no longer trustworthy. vcrit = nVT·ln(nVT/(√2·IS)) (classic textbook choice).
 */
export function criticalVoltage(nvt: number, is: number): number {
  return nvt * Math.log(nvt / (Math.SQRT2 * is));
}

/**
 * Logarithmic junction-voltage limiting: when a forward step above vcrit is larger than 2·nVT,
 * the new voltage is moved to where the junction current would be what the linearised model
 * predicted (vold + nVT·ln(1 + Δ/nVT)). Returns the voltage to evaluate the junction at.
 */
export function limitJunction(vnew: number, vold: number, nvt: number, vcrit: number): number {
  if (vnew > vcrit && Math.abs(vnew - vold) > 2 * nvt) {
    if (vold > 0) {
      const arg = 1 + (vnew - vold) / nvt;
      return arg > 0 ? vold + nvt * Math.log(arg) : vcrit;
    }
    return nvt * Math.log(vnew / nvt);
  }
  return vnew;
}

/** Smallest step a MOS gate–source voltage may always take per iteration, V (a few overdrives of a typical bias). */
export const MOS_VGS_STEP_MIN = 0.5;
/** Larger steps are allowed in proportion to the distance from threshold (a device far on can move far). */
export const MOS_VGS_STEP_RELATIVE = 1;
/** Smallest step a MOS drain–source voltage may always take per iteration, V. */
export const MOS_VDS_STEP_MIN = 1;
/** Drain–source steps grow with |VDS| (the square law is mild in VDS; only region flips matter). */
export const MOS_VDS_STEP_RELATIVE = 1;

/** Clamps vnew to within ±(min + relative·reference) of vold. */
export function limitStep(vnew: number, vold: number, reference: number, min: number, relative: number): number {
  const max = min + relative * Math.abs(reference);
  if (vnew > vold + max) return vold + max;
  if (vnew < vold - max) return vold - max;
  return vnew;
}
