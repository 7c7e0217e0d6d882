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

/** IS(T) = IS·(T/T0)^XTI·exp(Eg/VT0 − Eg/VT), with Eg in eV (so Eg/VT is dimensionless). */
export function saturationCurrentAt(is: number, temperature: number, energyGap: number, exponent: number): number {
  const ratio = temperature / MODEL_TEMPERATURE;
  const vt0 = thermalVoltage(MODEL_TEMPERATURE);
  const vt = thermalVoltage(temperature);
  return is * Math.pow(ratio, exponent) * Math.exp(energyGap / vt0 - energyGap / vt);
}

/** Power-law temperature dependence x(T) = x·(T/T0)^exponent (beta, k'). */
export function powerLawAt(value: number, temperature: number, exponent: number): number {
  return value * Math.pow(temperature / MODEL_TEMPERATURE, exponent);
}
