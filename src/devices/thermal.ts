// Physical constants and the temperature laws of DESIGN.md section 3 (model parameters are
// given at 25 °C and moved to the circuit's temperature here, once per plan).

/** Boltzmann constant, J/K (CODATA 2018, exact by the 2019 SI definition). */
export const BOLTZMANN = 1.380649e-23;
/** Elementary charge, C (CODATA 2018, exact by the 2019 SI definition). */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
/** Temperature at which model parameters are given: 25 °C, the datasheet reference (common practice). */
export const MODEL_TEMPERATURE = 298.15;

/** Thermal voltage kT/q, V. */
export function thermalVoltage(temperature: number): number {
  return (BOLTZMANN * temperature) / ELEMENTARY_CHARGE;
}

/**
 * IS(T) from the datasheet statement "the forward voltage at current I drifts by dV/dT": the
 * junction voltage at I is V(T) = V(T0) + dV/dT·(T − T0), with V(T0) = n·VT0·ln(I/IS + 1)
 * (Shockley), and IS(T) is the saturation current that puts the junction at V(T) when it
 * carries I: IS(T) = I / (exp(V(T)/(n·VT(T))) − 1). So the stated drift holds exactly at I;
 * at another current I2 it is dV/dT + (n·k/q)·ln(I2/I), the textbook dependence on current.
 */
export function saturationCurrentAt(is: number, temperature: number, ideality: number, drift: { readonly voltage: number; readonly current: number }): number {
  if (temperature === MODEL_TEMPERATURE) return is;
  const i = drift.current;
  const v0 = ideality * thermalVoltage(MODEL_TEMPERATURE) * Math.log1p(i / is);
  const v = v0 + drift.voltage * (temperature - MODEL_TEMPERATURE);
  return i / Math.expm1(v / (ideality * thermalVoltage(temperature)));
}

/** A constant relative drift (per kelvin): x(T) = x·exp(drift·(T − T0)), so (dx/dT)/x = drift at every T. */
export function relativeDriftAt(value: number, temperature: number, drift: number): number {
  return value * Math.exp(drift * (temperature - MODEL_TEMPERATURE));
}

/** Power-law temperature dependence x(T) = x·(T/T0)^exponent (k', the mobility law). */
export function powerLawAt(value: number, temperature: number, exponent: number): number {
  return value * Math.pow(temperature / MODEL_TEMPERATURE, exponent);
}
