// `opgate inspect`: solves one file and prints the table; unsolvable → reason and parts, exit 2.
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { run } from "../../src/cli/main.js";
import type { CliIo } from "../../src/cli/io.js";

function fakeIo(cwd: string): CliIo & { out: string; err: string } {
  const io = {
    cwd,
    env: {},
    isTTY: false,
    out: "",
    err: "",
    stdout(t: string) {
      io.out += t;
    },
    stderr(t: string) {
      io.err += t;
    },
  };
  return io;
}

const dir = mkdtempSync(join(tmpdir(), "opgate-inspect-"));
writeFileSync(
  join(dir, "tide-gauge-buffer.yaml"),
  `format: opgate-circuit/1
name: tide-gauge-buffer
models:
  small-npn:
    kind: npn
    beta: 150
    saturationCurrent: 1e-14 A
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 9 V }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 47k }
  - { id: Q1, kind: npn, model: small-npn, pins: { collector: vcc, base: b, emitter: out } }
  - { id: RE, kind: resistor, pins: [out, gnd], value: 2k2 }
`,
);
writeFileSync(
  join(dir, "cancelled.yaml"),
  `format: opgate-circuit/1
name: cancelled
components:
  - { id: I1, kind: current-source, pins: { from: gnd, to: a }, current: 1 mA }
  - { id: R1, kind: resistor, pins: [a, gnd], value: 1k }
  - { id: G1, kind: vccs, pins: { plus: a, minus: gnd, controlPlus: a, controlMinus: gnd }, gain: 1e-3 }
`,
);
writeFileSync(
  join(dir, "floating.yaml"),
  `format: opgate-circuit/1
name: floating
components:
  - { id: V1, kind: voltage-source, pins: { plus: a, minus: gnd }, voltage: 5 V }
  - { id: C1, kind: capacitor, pins: [a, b], value: 1u }
  - { id: VG, kind: voltage-source, pins: { plus: b, minus: gnd }, voltage: 1 V }
  - { id: VH, kind: voltage-source, pins: { plus: b, minus: gnd }, voltage: 2 V }
`,
);

describe("opgate inspect", () => {
  it("prints node voltages and the transistor's operating point", async () => {
    const io = fakeIo(dir);
    const code = await run(["inspect", "tide-gauge-buffer.yaml"], io);
    expect(io.err).toBe("");
    expect(code).toBe(0);
    expect(io.out).toMatch(/^tide-gauge-buffer \(tide-gauge-buffer\.yaml\) at 25\.0 °C/);
    expect(io.out).toMatch(/Q1\s+npn\s+active/);
    expect(io.out).toMatch(/out\s+3\.\d\d V/);
  });

  it("an unsolvable circuit gives the reason and the parts, exit 2", async () => {
    const io = fakeIo(dir);
    const code = await run(["inspect", "cancelled.yaml"], io);
    expect(code).toBe(2);
    expect(io.out).toBe("");
    expect(io.err).toMatch(/^cancelled\.yaml: error: no DC operating point: the DC equations are singular at node `a`/);
    expect(io.err).toMatch(/\n  parts: I1, R1, G1\n/);
  });

  it("a file the loader rejects (a source loop) exits 2 with file:line", async () => {
    const io = fakeIo(dir);
    expect(await run(["inspect", "floating.yaml"], io)).toBe(2);
    expect(io.err).toMatch(/^floating\.yaml:\d+:\d+: error: /);
  });

  it("--help shows examples", async () => {
    const io = fakeIo(dir);
    expect(await run(["inspect", "--help"], io)).toBe(0);
    expect(io.out).toMatch(/Examples:/);
  });
});
