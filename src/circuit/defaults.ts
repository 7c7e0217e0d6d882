// Defaults of circuit format v1 (DESIGN.md section 3), one named constant each with its source.

/** Nominal ambient when the file gives none: 25 °C = 298.15 K, the reference temperature datasheets quote parameters at (common practice). */
export const DEFAULT_TEMPERATURE_K = 298.15;
/** Name of the reference node when the file gives none. */
export const DEFAULT_GROUND = "gnd";

/** Reverse beta βR: 1 (common practice: small-signal BJTs are rarely used inverted; 1 keeps the model well-posed). */
export const DEFAULT_REVERSE_BETA = 1;
/** Diode ideality n: 1, the ideal Shockley junction (textbook form). */
export const DEFAULT_IDEALITY = 1;
/**
 * Ideality n of a diode described by its forward voltage (`forward:`, an LED's datasheet form):
 * 2, whatever the colour (from memory: recombination in the depletion region gives n = 2, the
 * Sah–Noyce–Shockley result, and measured LEDs sit at about 2 or above; give `ideality` when a
 * datasheet's I–V curve says otherwise).
 */
export const DEFAULT_FORWARD_FORM_IDEALITY = 2;
/** Drift of a breakdown (Zener) voltage when the model gives none: 0 V/K. */
export const DEFAULT_BREAKDOWN_TEMPCO_V_PER_K = 0;
/** Diode series resistance: 0 Ω (ideal junction). */
export const DEFAULT_DIODE_SERIES_RESISTANCE = 0;
/** Early voltage: none (Infinity), as DESIGN.md section 3 asks when the file omits it. */
export const DEFAULT_EARLY_VOLTAGE = Infinity;
/** |VCE| at the edge of saturation: 0.3 V (common practice: VCE(sat) of a small-signal silicon BJT is 0.1–0.3 V). */
export const DEFAULT_SATURATION_EDGE_V = 0.3;
/**
 * Drift of a silicon junction's forward voltage (diode VF, BJT VBE) at constant current: −2 mV/°C
 * (common practice: the textbook rule that VBE falls about 2 mV per °C; datasheets of small-signal
 * diodes and transistors show −1.8 to −2.2 mV/°C near 1 mA).
 */
export const DEFAULT_JUNCTION_DRIFT_V_PER_K = -0.002;
/**
 * Test condition of a BJT's `beta` when the model gives none: VCE = 5 V, IC = 2 mA (common practice:
 * a usual hFE test condition on small-signal transistor datasheets; from memory).
 */
export const DEFAULT_BETA_TEST_VCE_V = 5;
export const DEFAULT_BETA_TEST_IC_A = 2e-3;
/** Current the junction drift is stated at when the model gives none: 1 mA (a typical small-signal test current). */
export const DEFAULT_DRIFT_CURRENT_A = 1e-3;
/**
 * Relative drift of a BJT's current gain: +0.5 %/°C (common practice; from memory: small-signal
 * silicon transistors' hFE rises about 0.5 %/°C, roughly doubling from −55 °C to 125 °C).
 */
export const DEFAULT_BETA_DRIFT_PER_K = 0.005;

/** Channel-length modulation λ: 0 (no output-conductance term unless given). */
export const DEFAULT_CHANNEL_LENGTH_MODULATION = 0;
/** Body-effect coefficient γ: 0 (body effect off unless given). */
export const DEFAULT_BODY_EFFECT = 0;
/**
 * Fermi potential φF of the substrate: 0.35 V. Textbook formula φF = (kT/q)·ln(NA/ni) with a
 * lightly doped substrate NA = 1e16 cm⁻³ and silicon's intrinsic density ni ≈ 1e10 cm⁻³
 * (textbook value; from memory) at 25 °C: 25.69 mV · ln(1e6) = 0.355 V, rounded; so 2φF ≈ 0.7 V.
 */
export const DEFAULT_FERMI_POTENTIAL_V = 0.35;
/** d|Vt|/dT: −2 mV/K (common practice for silicon MOSFETs). */
export const DEFAULT_THRESHOLD_TEMPCO_V_PER_K = -0.002;
/** k'(T) ∝ (T/T0)^−1.5 (mobility falls with temperature; common practice). */
export const DEFAULT_KPRIME_EXPONENT = -1.5;

/** Bare temperature numbers below this are probably meant as °C: 25 K is far colder than any board. */
export const SUSPICIOUS_KELVIN_BELOW = 150;

/**
 * Highest ambient a circuit file may state: 200 °C. Silicon devices are rated to 150–200 °C
 * junction (common practice: datasheet absolute maximum ratings); far above it the junction
 * models give numbers that mean nothing (1e6 °C once ended in "singular at node …").
 */
export const MAX_TEMPERATURE_K = 473.15;
