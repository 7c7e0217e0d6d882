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
 * A junction further than this many nVT below vcrit carries under e^−10 of the critical current:
 * as a limiting reference it says nothing about the junction's current, so an upward step is
 * limited from here instead of from the old voltage (from a reverse-biased or barely conducting
 * old voltage, the logarithmic step crept up by ~0.1 V per Newton iteration: 5–6 iterations of a
 * saturating transistor's base–collector junction in the bench chains).
 */
export const JUNCTION_REFERENCE_FLOOR = 10;

/**
 * A downward Newton step of a conducting junction larger than this many nVT is taken in the
 * current (see limitJunction). Smaller steps are left alone, so the last steps of a converging
 * solve are plain Newton steps and the convergence test is not held up.
 */
export const JUNCTION_DOWN_STEP = 0.5;

/**
 * The largest fall of a junction's current (a factor) one downward step follows in the current;
 * a linearised prediction beyond it (or a reversal) means the junction is turning off, and the
 * step goes at least this far and otherwise as Newton gives it.
 */
export const JUNCTION_DOWN_FACTOR = 0.01;

/**
 * The voltage at which a junction (saturation current is, nVT) carries `current`, for a warm
 * start: the junction at `v` in the solved point it came from carried `current`, and a sample at
 * another temperature or saturation current carries about the same current at another voltage
 * (the bias network, not the junction, sets it). A junction that was not conducting there
 * (below vcrit − JUNCTION_REFERENCE_FLOOR·nVT, or no forward current) keeps v.
 */
export function warmJunctionVoltage(v: number, current: number, is: number, nvt: number, vcrit: number): number {
  if (!(v > vcrit - JUNCTION_REFERENCE_FLOOR * nvt) || !(current > 0)) return v;
  return nvt * Math.log1p(current / is);
}

/**
 * Logarithmic junction-voltage limiting. Upward: when a forward step above vcrit is larger than
 * 2·nVT, the new voltage is moved to where the junction current would be what the linearised
 * model predicted (vold + nVT·ln(1 + Δ/nVT)), with vold taken no lower than
 * vcrit − JUNCTION_REFERENCE_FLOOR·nVT. Downward, from a conducting junction: the same rule in
 * the other direction. Newton on an exponential approached from above moves under one nVT per
 * iteration (the linearisation overstates the current left at the new voltage), so a junction
 * driven too far forward took one iteration per ~25 mV to come back; following the predicted
 * current takes it there in one. Returns the voltage to evaluate the junction at.
 */
export function limitJunction(vnew: number, vold: number, nvt: number, vcrit: number): number {
  const floor = vcrit - JUNCTION_REFERENCE_FLOOR * nvt;
  if (vnew > vcrit) {
    const from = vold < floor ? floor : vold;
    if (vnew - from > 2 * nvt) {
      if (from > 0) return from + nvt * Math.log(1 + (vnew - from) / nvt);
      return nvt * Math.log(vnew / nvt);
    }
    if (vold - vnew <= 2 * nvt) return vnew;
  }
  if (vold > floor && vnew < vold - JUNCTION_DOWN_STEP * nvt) {
    const arg = 1 + (vnew - vold) / nvt;
    if (arg > JUNCTION_DOWN_FACTOR) return vold + nvt * Math.log(arg);
    return Math.min(vnew, vold + nvt * Math.log(JUNCTION_DOWN_FACTOR));
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
