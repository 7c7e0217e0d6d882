// `opgate inspect FILE --sensitivity`, run in-process: the table's normalised sensitivities
// against closed forms.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { cli } from "../run/repo.js";
import { DEGENERATED_CE } from "../variation/helpers.js";

const dir = mkdtempSync(join(tmpdir(), "opgate-sensitivity-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

writeFileSync(
  join(dir, "divider.yaml"),
  `format: opgate-circuit/1
name: tide-gauge-divider
components:
  - { id: VREF, kind: voltage-source, pins: { plus: ref, minus: gnd }, voltage: 5 V }
  - { id: R1, kind: resistor, pins: [ref, out], value: 10k, tolerance: 1% }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 4k7, tolerance: 1% }
specs:
  nodes:
    out: { min: 1 V, max: 2 V }
`,
);

writeFileSync(
  join(dir, "ce-stage.yaml"),
  `format: opgate-circuit/1
name: tide-gauge-ce-stage
${DEGENERATED_CE}`,
);

/** The table's rows as [quantity, parameter, %/%]: a row without a quantity continues the one above. */
function rows(stdout: string): { quantity: string; parameter: string; normalised: number | null }[] {
  const table = stdout.slice(stdout.indexOf("Sensitivities ("));
  const out: { quantity: string; parameter: string; normalised: number | null }[] = [];
  let quantity = "";
  for (const line of table.split("\n").slice(2)) {
    // "  rule subject | nominal | parameter | %/% | band" opens a quantity; "   | parameter | %/% | band" continues it.
    const cells = line.split(" | ").map((c) => c.trim());
    if (cells.length < 4) continue;
    if (cells[0] !== "") quantity = cells[0]!;
    const [parameter, normalised] = cells[0] !== "" ? [cells[2]!, cells[3]!] : [cells[1]!, cells[2]!];
    const m = /^(-?[\d.]+(?:e[+-]?\d+)?) %\/%$/.exec(normalised.replace("\u2212", "-"));
    out.push({ quantity, parameter, normalised: m ? Number(m[1]) : null });
  }
  return out;
}

describe("opgate inspect --sensitivity", () => {
  it("a divider's output: −R1/(R1 + R2) %/% to R1 and +R1/(R1 + R2) to R2 (common practice)", async () => {
    const r = await cli(["inspect", join(dir, "divider.yaml"), "--sensitivity"], dir);
    expect(r.code, r.stderr).toBe(0);
    const out = rows(r.stdout).filter((x) => x.quantity === "node-level out");
    const s = (p: string) => out.find((x) => x.parameter === p)!.normalised!;
    // Vout = V·R2/(R1 + R2): ∂ln Vout/∂ln R1 = −R1/(R1 + R2), ∂ln Vout/∂ln R2 = +R1/(R1 + R2).
    const share = 10e3 / (10e3 + 4.7e3);
    expect(Math.abs(s("R1") - -share)).toBeLessThan(1e-3); // the table prints 3 significant digits
    expect(Math.abs(s("R2") - share)).toBeLessThan(1e-3);
    // Vout scales with the reference (an exact part: differentiated, never moved): 1 %/%.
    expect(s("VREF")).toBeCloseTo(1, 2);
  });

  it("a degenerated CE stage's gain: +1 %/% to RC and about −1 %/% to RE (−RC/RE, from memory)", async () => {
    const r = await cli(["inspect", join(dir, "ce-stage.yaml"), "--sensitivity"], dir);
    expect(r.code, r.stderr).toBe(0);
    const out = rows(r.stdout).filter((x) => x.quantity === "gain-window av");
    const s = (p: string) => out.find((x) => x.parameter === p)!.normalised!;
    expect(s("RC")).toBeCloseTo(1, 2);
    // −RE/(RE + re), and the bias current falling with RE: close to −1.
    expect(s("RE")).toBeGreaterThan(-1.05);
    expect(s("RE")).toBeLessThan(-0.95);
  });
});
