// resistor-power: I²R against the derated rating, ratings from powerRating or chip size.
import { describe, expect, it } from "vitest";
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { deratingFactor } from "../src/review/quantities.js";
import { analysis, circuit, op, resistor } from "../test/review/fixtures.js";
import { npnStage, pnpStage, relayDriver } from "../test/review/circuits.js";
import resistorPower from "./resistor-power.js";

// A 1 kΩ resistor straight across the 12 V rail: P = V²/R = 144 mW (Joule's law).
const bleeder = (extra: string) => `  - { id: RB, kind: resistor, pins: [vcc, gnd], value: 1k${extra} }`;
const dissipating = (power: number, temperature = 298.15) => {
  const c = circuit({ components: [resistor("R1", 10, { package: "0603" })], temperature });
  return { circuit: c, analyses: [analysis(c, op({ R1: { kind: "resistor", current: 0, voltage: 0, power } }))] };
};

testsFromVerdict(await verifyRule(resistorPower, [
  { name: "every resistor of the NPN stage is far below half of 1/10 W", circuit: npnStage(), expect: [], passed: ["RC", "RE", "R1", "R2"] },
  { name: "PNP stage passes too", circuit: pnpStage(), expect: [], passed: ["RC", "RE"] },
  { name: "144 mW in an 0603 (50 mW allowed) fails", circuit: npnStage({ parts: bleeder(', package: "0603"') }), expect: [{ subject: "RB", messageIncludes: "50% of 100 mW, a typical 0603 chip" }] },
  { name: "144 mW in a 2512 (500 mW allowed) passes", circuit: npnStage({ parts: bleeder(', package: "2512"') }), expect: [], passed: ["RB"] },
  { name: "a datasheet powerRating wins over the package", circuit: npnStage({ parts: bleeder(', package: "0603", powerRating: 0.5 W') }), expect: [], passed: ["RB"] },
  { name: "no rating and no package: the 1/16 W default applies", circuit: npnStage({ parts: bleeder("") }), expect: [{ subject: "RB", messageIncludes: "assumed rating" }] },
  // Derated to 50% at 112.5 °C (halfway between 70 °C and 155 °C): 0.5 W·0.5·0.5 = 125 mW < 144 mW.
  { name: "at 112.5 °C ambient the 0.5 W part is derated below 144 mW", circuit: npnStage({ head: "temperature: 112.5 °C", parts: bleeder(", powerRating: 0.5 W") }), expect: [{ subject: "RB", messageIncludes: "at 113 °C ambient" }] },
  { name: "a higher fraction from the config lets it pass", circuit: npnStage({ parts: bleeder(', package: "0603"') }), options: { fraction: 1, packageRatings: { "0603": 0.2 } }, expect: [], passed: ["RB"] },
  { name: "boundary: 50.001 mW in an 0603 fails", ...dissipating(0.050001), expect: [{ subject: "R1" }] },
  { name: "boundary: 49.999 mW in an 0603 passes", ...dissipating(0.049999), expect: [], passed: ["R1"] },
]));

describe("derating curve", () => {
  it("has the IEC 60115-1 shape: full to 70 °C, linear to zero at 155 °C", () => {
    expect(deratingFactor(25, 70, 155)).toBe(1);
    expect(deratingFactor(70, 70, 155)).toBe(1);
    expect(deratingFactor(112.5, 70, 155)).toBeCloseTo(0.5, 12);
    expect(deratingFactor(155, 70, 155)).toBe(0);
    expect(deratingFactor(170, 70, 155)).toBe(0);
  });
});

// Issue 14 item 6: a relay coil modelled as a resistor dissipates ≈ 12 V·30 mA ≈ 350 mW, far over
// an assumed 1/16 W — but it is a coil, rated by the relay's own datasheet.
testsFromVerdict(await verifyRule(resistorPower, [
  { name: "the relay driver's coil, unmarked, fails as a resistor", circuit: relayDriver(), expect: [{ subject: "K1", messageIncludes: "assumed rating" }] },
  { name: "an LED/relay driver with its coil marked produces no resistor-power finding on the coil", circuit: relayDriver({ coil: ", role: coil" }), expect: [], passed: ["RB", "RLED"] },
  { name: "a resistor marked as a load is skipped too", circuit: relayDriver({ coil: ", role: load" }), expect: [] },
]));
