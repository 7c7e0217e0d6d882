// The Lambert W function (principal branch) for the diode tests, written here so the reference
// does not share code with the solver. Works from ln(x) so arguments like e^400 do not overflow.

/**
 * W(x) for x = e^lx > 0, by Halley iteration on f(w) = w + ln(w) − lx (the logarithm of the
 * defining equation w·e^w = x), which stays well scaled for huge x.
 */
export function lambertWOfExp(lx: number): number {
  // Start: asymptotic ln x − ln ln x for large x, ln(1 + x) (an upper bound of W) otherwise.
  let w = lx > 1 ? lx - Math.log(lx) : Math.log1p(Math.exp(lx));
  for (let k = 0; k < 100; k++) {
    const f = w + Math.log(w) - lx;
    const f1 = 1 + 1 / w;
    const f2 = -1 / (w * w);
    const step = (2 * f * f1) / (2 * f1 * f1 - f * f2);
    const next = w - step;
    w = next > 0 ? next : w / 2;
    if (Math.abs(step) <= 1e-16 * Math.abs(w)) break;
  }
  return w;
}

/**
 * Current of a diode IS(exp(Vd/(n·VT)) − 1) in series with R across V, exact:
 *   I = (n·VT/R)·W((IS·R/(n·VT))·exp((V + IS·R)/(n·VT))) − IS
 * (the closed form of the diode–resistor loop by the Lambert W function; Banwell and
 * Jayakumar, Electronics Letters 36 (2000) 291, from memory).
 */
export function diodeResistorCurrent(v: number, r: number, is: number, nvt: number): number {
  const lx = Math.log((is * r) / nvt) + (v + is * r) / nvt;
  return (nvt / r) * lambertWOfExp(lx) - is;
}
