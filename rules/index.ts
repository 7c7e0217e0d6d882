// The built-in rules: an explicit registry, sorted by id (a meta-test keeps it in step with the
// files in this folder). No filesystem scanning.
import type { OptionsOf, Rule } from "../src/review/rule.js";
import bandEdges from "./band-edges.js";
import bandFlatness from "./band-flatness.js";
import capacitorPolarity from "./capacitor-polarity.js";
import capacitorVoltage from "./capacitor-voltage.js";
import coilDrive from "./coil-drive.js";
import deviceCurrent from "./device-current.js";
import devicePower from "./device-power.js";
import deviceRatings from "./device-ratings.js";
import gainWindow from "./gain-window.js";
import headroom from "./headroom.js";
import impedanceWindow from "./impedance-window.js";
import nodeLevel from "./node-level.js";
import region from "./region.js";
import resistorPower from "./resistor-power.js";
import signalSwing from "./signal-swing.js";
import solve from "./solve.js";
import supplyBudget from "./supply-budget.js";

export const BUILTIN_RULES: ReadonlyMap<string, Rule> = new Map<string, Rule>([
  ["band-edges", bandEdges],
  ["band-flatness", bandFlatness],
  ["capacitor-polarity", capacitorPolarity],
  ["capacitor-voltage", capacitorVoltage],
  ["coil-drive", coilDrive],
  ["device-current", deviceCurrent],
  ["device-power", devicePower],
  ["device-ratings", deviceRatings],
  ["gain-window", gainWindow],
  ["headroom", headroom],
  ["impedance-window", impedanceWindow],
  ["node-level", nodeLevel],
  ["region", region],
  ["resistor-power", resistorPower],
  ["signal-swing", signalSwing],
  ["solve", solve],
  ["supply-budget", supplyBudget],
]);

export function builtinRules(): readonly Rule[] {
  return [...BUILTIN_RULES.values()];
}

// Option types of the built-in rules, derived from their schemas (defaults filled in).
export type CapacitorVoltageOptions = OptionsOf<typeof capacitorVoltage>;
export type BandFlatnessOptions = OptionsOf<typeof bandFlatness>;
export type DevicePowerOptions = OptionsOf<typeof devicePower>;
export type HeadroomOptions = OptionsOf<typeof headroom>;
export type ResistorPowerOptions = OptionsOf<typeof resistorPower>;
