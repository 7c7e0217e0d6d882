// Hand bias calculations for the closed-form checks: what an engineer does on paper, kept
// separate from the tool so the "formula from hand bias values" checks are independent of the
// solver. Each function states its method.

/** Thermal voltage kT/q at 25 °C with CODATA 2018 k and q (exact SI values). */
export const VT = (1.380649e-23 * 298.15) / 1.602176634e-19;

/**
 * Hand bias of a BJT whose emitter current is set by a resistor RE from a base held at VB:
 * IE = (VB − VBE − VEE)/RE with VBE = VT·ln(IC/IS), iterated from 0.65 V (three passes
 * converge to well under 0.1 %); IC = α·IE with α = β/(β+1). Early effect ignored in the bias.
 */
export function emitterBias(vb: number, vee: number, re: number, beta: number, is: number) {
  let vbe = 0.65;
  let ic = 0;
  for (let pass = 0; pass < 3; pass++) {
    const ie = (vb - vbe - vee) / re;
    ic = (beta / (beta + 1)) * ie;
    vbe = VT * Math.log(ic / is);
  }
  return { ic, vbe, gm: ic / VT, rBaseInput: beta / (ic / VT), re: VT / (ic * (1 + 1 / beta)) };
}

/**
 * Square-law saturation current of a MOSFET with source resistor RS (λ ignored, body effect by
 * the textbook threshold formula): solves ID = ½β(VG − ID·RS − VS0 − Vt(VSB))² by bisection on
 * ID, exactly what the paper method's quadratic gives when γ = 0.
 */
export function sourceBias(vg: number, rs: number, beta: number, vt0: number, gamma = 0, phi2 = 0.6, vs0 = 0, vb = 0) {
  const vtAt = (vs: number) => vt0 + gamma * (Math.sqrt(phi2 + Math.max(vs - vb, 0)) - Math.sqrt(phi2));
  let lo = 0;
  let hi = (vg - vs0) / rs;
  for (let i = 0; i < 200; i++) {
    const id = (lo + hi) / 2;
    const vs = vs0 + id * rs;
    const vov = vg - vs - vtAt(vs);
    const f = vov > 0 ? 0.5 * beta * vov * vov - id : -id;
    if (f > 0) lo = id;
    else hi = id;
  }
  const id = (lo + hi) / 2;
  const vs = vs0 + id * rs;
  const vov = vg - vs - vtAt(vs);
  const gm = beta * vov;
  const gmb = (gm * gamma) / (2 * Math.sqrt(phi2 + Math.max(vs - vb, 0)));
  return { id, vs, vov, gm, gmb };
}
