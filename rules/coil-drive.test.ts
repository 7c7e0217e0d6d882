// coil-drive: a relay coil's current and voltage against its must-operate values, copper warmed
// to the scenario's ambient.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { relayDriver } from "../test/review/circuits.js";
import coilDrive from "./coil-drive.js";

// A coil straight across the supply: I = V/R (Ohm's law), 12 V/400 Ω = 30 mA at the datasheet
// temperature. At 60 °C the copper is 1 + 0.00393·(60 − 23) = 1.1454 times the resistance
// (IEC 60028 tempco of annealed copper, from memory): 26.19 mA.
const across = (coil: string, temperature = "23 °C") => `temperature: ${temperature}
models: {}
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: K1, kind: resistor, pins: [vcc, gnd], value: 400, role: coil${coil} }
`;

testsFromVerdict(await verifyRule(coilDrive, [
  { name: "30 mA against a 25 mA must-operate current passes", circuit: across(", mustOperateCurrent: 25 mA"), expect: [], passed: ["K1"] },
  { name: "30 mA against 31 mA fails", circuit: across(", mustOperateCurrent: 31 mA"), expect: [{ subject: "K1", messageIncludes: "carries 30 mA at 23 °C ambient; it needs 31 mA" }] },
  { name: "at 60 °C the warm coil carries 26.2 mA, short of 27 mA", circuit: across(", mustOperateCurrent: 27 mA", "60 °C"), expect: [{ subject: "K1", messageIncludes: "carries 26.2 mA at 60 °C" }] },
  { name: "at 60 °C 26.2 mA still meets 26 mA", circuit: across(", mustOperateCurrent: 26 mA", "60 °C"), expect: [], passed: ["K1"] },
  { name: "12 V meets a 9 V must-operate voltage", circuit: across(", mustOperateVoltage: 9 V"), expect: [], passed: ["K1"] },
  // 11 V·1.1454 = 12.6 V needed at 60 °C.
  { name: "at 60 °C an 11 V must-operate voltage needs 12.6 V", circuit: across(", mustOperateVoltage: 11 V", "60 °C"), expect: [{ subject: "K1", messageIncludes: "it needs 12.6 V there" }] },
  // The saturated driver leaves ≈ 0.05–0.1 V across the transistor: ≈ 29.8 mA through the coil.
  { name: "the relay driver's saturated NPN gives the coil its 25 mA", circuit: relayDriver({ head: "temperature: 23 °C", coil: ", role: coil, mustOperateCurrent: 25 mA" }), expect: [], passed: ["K1"] },
  { name: "at the low-supply corner (11.4 V) 29 mA is not enough", circuit: relayDriver({ head: "temperature: 23 °C", coil: ", role: coil, mustOperateCurrent: 29 mA" }), variation: { mode: "corners", samples: 1, seed: 1 }, expect: [{ subject: "K1", messageIncludes: "it needs 29 mA" }] },
  { name: "a coil without must-operate values is not judged", circuit: across(""), expect: [] },
]));
