// Node names are text (issue 12 item 12): YAML reads `01`, `0x2`, `0o3` and `1.0e0` as numbers,
// which once made them nodes `1`, `2`, `3` and `1` — silently joining nodes the author kept apart.
import { describe, expect, it } from "vitest";
import { loadCircuitText } from "../../src/circuit/index.js";

const TEXT = `format: opgate-circuit/1
name: node-names
ground: 00
components:
  - { id: V1, kind: voltage-source, pins: { plus: 01, minus: 00 }, voltage: 12 V }
  - { id: R1, kind: resistor, pins: [01, 1], value: 1k }
  - { id: R2, kind: resistor, pins: [1, 0x2], value: 1k }
  - { id: R3, kind: resistor, pins: [0x2, 0o3], value: 1k }
  - { id: R4, kind: resistor, pins: [0o3, 1.0e0], value: 1k }
  - { id: R5, kind: resistor, pins: [1.0e0, 00], value: 1k }
`;

describe("node names written as numbers", () => {
  it("keeps each name as written, so `01` and `1` stay two nodes", () => {
    const r = loadCircuitText(TEXT, "nodes.yaml");
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join("; "));
    const pins = Object.fromEntries(r.circuit.components.map((c) => [c.id, Object.values(c.pins)]));
    expect(pins).toEqual({ V1: ["01", "00"], R1: ["01", "1"], R2: ["1", "0x2"], R3: ["0x2", "0o3"], R4: ["0o3", "1.0e0"], R5: ["1.0e0", "00"] });
    expect(r.circuit.ground).toBe("00");
  });

  it("still reads a plain whole number as the same node", () => {
    const r = loadCircuitText(TEXT.replace("ground: 00", "ground: 0").replaceAll("00 }", "0 }").replaceAll("00]", "0]"), "nodes.yaml");
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join("; "));
    expect(r.circuit.ground).toBe("0");
    expect(r.circuit.components.find((c) => c.id === "V1")!.pins).toEqual({ plus: "01", minus: "0" });
  });
});
